package dev.watcher.act;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** Stopping real local processes by the identity taken at attach. */
class ProcessControlIT {

    @TempDir
    Path dir;

    private final Children children = new Children();

    @AfterEach
    void cleanUp() {
        children.close();
    }

    @Test
    void processThatHandlesTermEndsAfterTheGracefulSignal() throws Exception {
        Path out = dir.resolve("solver.log");
        Process p = children.loop(out, "echo bye; exit 0");
        await().atMost(10, TimeUnit.SECONDS).until(() -> Files.size(out) > 0);
        JobControl c = JobControl.attach(new JobRef.Pid(p.pid()));
        assertTrue(c.alive());
        List<StopStep> steps = new ArrayList<>();
        StopStep last = c.stop("TERM", Duration.ofSeconds(20), Duration.ofSeconds(10), steps::add);
        assertEquals("done", last.state());
        assertEquals(List.of("signalled", "done"), steps.stream().map(StopStep::state).toList());
        assertEquals("TERM", steps.get(0).signal());
        assertTrue(p.waitFor(10, TimeUnit.SECONDS));
        assertEquals(0, p.exitValue(), "the TERM trap ran and exited 0");
        assertTrue(Files.readString(out).contains("bye"));
        assertTrue(c.onEnd().isDone() || c.onEnd().get(5, TimeUnit.SECONDS) == null);
        assertFalse(c.alive());
    }

    @Test
    void processThatIgnoresTermIsKilledAfterTheGracePeriod() throws Exception {
        Path out = dir.resolve("stubborn.log");
        Process p = children.loop(out, "");
        await().atMost(10, TimeUnit.SECONDS).until(() -> Files.size(out) > 0);
        JobControl c = JobControl.attach(new JobRef.Pid(p.pid()));
        List<StopStep> steps = new ArrayList<>();
        StopStep last = c.stop("TERM", Duration.ofMillis(700), Duration.ofSeconds(10), steps::add);
        assertEquals(List.of("signalled", "signalled", "done"), steps.stream().map(StopStep::state).toList());
        assertEquals("TERM", steps.get(0).signal());
        assertEquals("KILL", steps.get(1).signal());
        assertEquals("KILL", last.signal());
        assertTrue(p.waitFor(10, TimeUnit.SECONDS));
        assertEquals(128 + 9, p.exitValue(), "killed by SIGKILL (bash reports 128 + signal number)");
    }

    @Test
    void recordedIdentityWithAnotherStartTimeIsRefusedAndNotSignalled() throws Exception {
        Process p = children.loop(dir.resolve("other.log"), "exit 0");
        ProcessIdentity real = ProcessIdentity.of(p.toHandle()).orElseThrow();
        // What a recycled pid looks like: the number we recorded now belongs to a process started later.
        ProcessIdentity recorded = new ProcessIdentity(real.pid(), real.start().minusSeconds(3600), real.command());
        JobControl c = JobControl.process(recorded);
        assertFalse(c.alive(), "the recorded process is gone");
        assertTrue(c.onEnd().isDone());
        List<StopStep> steps = new ArrayList<>();
        StopStep last = c.stop("TERM", Duration.ofMillis(200), Duration.ofSeconds(5), steps::add);
        assertEquals("refused", last.state());
        assertTrue(last.detail().contains("not the one attached"), last.detail());
        assertEquals(1, steps.size());
        assertFalse(p.waitFor(1, TimeUnit.SECONDS), "the other process keeps running");
        assertTrue(p.isAlive());
    }

    @Test
    void recordedIdentityWithAnotherCommandIsRefused() throws Exception {
        Process p = children.loop(dir.resolve("other.log"), "exit 0");
        ProcessIdentity real = ProcessIdentity.of(p.toHandle()).orElseThrow();
        ProcessIdentity recorded = new ProcessIdentity(real.pid(), real.start(), "/opt/cases/bin/heat-solver");
        JobControl c = JobControl.process(recorded);
        StopStep last = c.stop("TERM", Duration.ofMillis(200), Duration.ofSeconds(5), s -> { });
        assertEquals("refused", last.state());
        assertTrue(last.detail().contains("/opt/cases/bin/heat-solver"), last.detail());
        assertTrue(p.isAlive());
    }

    @Test
    void matchingRecordedIdentityReattachesAndStops() throws Exception {
        Process p = children.loop(dir.resolve("again.log"), "exit 0");
        JobControl c = JobControl.process(ProcessIdentity.of(p.toHandle()).orElseThrow());
        assertTrue(c.alive());
        assertEquals("done", c.stop("TERM", Duration.ofSeconds(20), Duration.ofSeconds(5), s -> { }).state());
        assertTrue(p.waitFor(10, TimeUnit.SECONDS));
    }

    @Test
    void otherGracefulSignalsGoThroughKill() throws Exception {
        Path out = dir.resolve("int.log");
        ProcessBuilder pb = new ProcessBuilder("bash", "-c",
                "trap 'echo got-int; exit 3' INT; while :; do echo x; sleep 0.1; done");
        pb.redirectErrorStream(true).redirectOutput(out.toFile());
        Process q = pb.start();
        try {
            await().atMost(10, TimeUnit.SECONDS).until(() -> Files.size(out) > 0);
            JobControl c = JobControl.attach(new JobRef.Pid(q.pid()));
            StopStep last = c.stop("INT", Duration.ofSeconds(20), Duration.ofSeconds(5), s -> { });
            assertEquals("done", last.state());
            assertTrue(q.waitFor(10, TimeUnit.SECONDS));
            assertEquals(3, q.exitValue());
            assertTrue(Files.readString(out).contains("got-int"));
        } finally {
            q.destroyForcibly();
        }
    }

    @Test
    void attachingToAMissingPidFailsWithAClearMessage() {
        IllegalStateException e = org.junit.jupiter.api.Assertions.assertThrows(IllegalStateException.class,
                () -> JobControl.attach(new JobRef.Pid(Integer.MAX_VALUE - 7)));
        assertTrue(e.getMessage().contains("no process with pid"), e.getMessage());
    }
}
