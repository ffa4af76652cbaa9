package dev.watcher.act;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.model.EventType;
import dev.watcher.model.Severity;
import dev.watcher.model.StopGate;
import dev.watcher.model.StopRequest;
import dev.watcher.model.TimelineEvent;
import dev.watcher.testing.MutableClock;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.attribute.PosixFilePermissions;
import java.time.Duration;
import java.time.Instant;
import java.util.List;
import java.util.Map;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The stop gates, dry mode and the stop sequence, against real child processes. */
class StopCoordinatorIT {

    private static final StopGate NOW = new StopGate(0, Duration.ZERO, Duration.ZERO, Duration.ZERO);

    @TempDir
    Path dir;

    private final Children children = new Children();
    private final ListSink sink = new ListSink();
    /** Starts at real time: the run-age gate compares it with the real start of the child processes. */
    private final MutableClock clock = new MutableClock(Instant.now());

    @AfterEach
    void cleanUp() {
        children.close();
    }

    private static StopRequest blowup(long iter, StopGate gate) {
        return new StopRequest("fan-duct", "single-equation-blowup", Severity.CRITICAL, iter,
                "temp residual rising 0.08 decades/iteration while the others fall",
                Map.of("slope_decades_per_iter", 0.08, "rise_decades", 1.9), gate);
    }

    private Process solver() throws Exception {
        Path out = dir.resolve("solver.out");
        Process p = children.loop(out, "echo stopping; exit 0");
        await().atMost(10, TimeUnit.SECONDS).until(() -> Files.exists(out) && Files.size(out) > 0);
        return p;
    }

    @Test
    void armedRequestStopsTheRealProcessWithEveryStepInTheTimeline() throws Exception {
        Process p = solver();
        StopPolicy policy = StopPolicy.defaults().withGrace(Duration.ofSeconds(20)).withGiven(16, Duration.ofHours(10));
        try (StopCoordinator c = new StopCoordinator("fan-duct", JobControl.attach(new JobRef.Pid(p.pid())), true,
                policy, clock, sink)) {
            c.recordSeen(500);
            c.request(blowup(500, NOW));
            c.stopSequence().orElseThrow().get(30, TimeUnit.SECONDS);
        }
        assertTrue(p.waitFor(10, TimeUnit.SECONDS));
        assertEquals(List.of("requested", "signalled", "done"), sink.states());
        for (TimelineEvent e : sink.events()) {
            assertEquals(EventType.ACTION, e.type());
            assertEquals("pid", e.fields().get("method"));
            assertEquals("single-equation-blowup", e.fields().get("pattern"));
            assertEquals(500, e.iter());
        }
        TimelineEvent requested = sink.events().get(0);
        assertEquals(Map.of("slope_decades_per_iter", 0.08, "rise_decades", 1.9), requested.fields().get("evidence"));
        assertEquals("TERM", requested.fields().get("signal"));
        // Started moments ago with a given 10 h limit on 16 cores: up to 160 core-hours, a little less by now.
        double saved = (Double) requested.fields().get("core_hours_saved");
        assertTrue(saved > 150 && saved <= 160, "saved " + saved);
        assertEquals("TERM", sink.events().get(1).fields().get("signal"));
    }

    @Test
    void dryModeRecordsWouldStopWithTheSameEvidenceAndTheProcessKeepsRunning() throws Exception {
        Process p = solver();
        try (StopCoordinator c = new StopCoordinator("fan-duct", JobControl.attach(new JobRef.Pid(p.pid())), false,
                StopPolicy.defaults(), clock, sink)) {
            c.request(blowup(800, NOW));
            c.stopSequence().orElseThrow().get(30, TimeUnit.SECONDS);
            c.request(blowup(801, NOW));
        }
        assertEquals("would-stop", sink.events().get(0).state());
        TimelineEvent w = sink.events().get(0);
        assertEquals(Map.of("slope_decades_per_iter", 0.08, "rise_decades", 1.9), w.fields().get("evidence"));
        assertEquals("pid", w.fields().get("method"));
        assertEquals("TERM", w.fields().get("signal"));
        assertEquals(1, sink.states().stream().filter("would-stop"::equals).count(), "one would-stop per run");
        assertFalse(sink.states().contains("signalled"));
        assertFalse(p.waitFor(1, TimeUnit.SECONDS), "the job keeps running in dry mode");
    }

    @Test
    void tooEarlyRequestIsRefusedWithItsReasonsThenActsOnceThePersistenceGatePasses() throws Exception {
        Process p = solver();
        StopGate gate = new StopGate(3, Duration.ofSeconds(10), Duration.ZERO, Duration.ZERO);
        try (StopCoordinator c = new StopCoordinator("fan-duct", JobControl.attach(new JobRef.Pid(p.pid())), true,
                StopPolicy.defaults().withGrace(Duration.ofSeconds(20)), clock, sink)) {
            c.request(blowup(100, gate));
            assertEquals(List.of("refused"), sink.states());
            TimelineEvent refused = sink.events().get(0);
            assertEquals(true, refused.fields().get("pending"));
            String reason = (String) refused.fields().get("reason");
            assertTrue(reason.contains("persisted 1 of 3 records"), reason);
            assertTrue(reason.contains("of 10.0 s"), reason);
            c.recordSeen(101);
            c.recordSeen(102);
            c.recordSeen(103);
            assertTrue(c.stopSequence().isEmpty(), "records alone are not enough: 10 s must pass too");
            assertTrue(p.isAlive());
            clock.advance(Duration.ofSeconds(11));
            c.recordSeen(104);
            c.stopSequence().orElseThrow().get(30, TimeUnit.SECONDS);
        }
        assertEquals(List.of("refused", "requested", "signalled", "done"), sink.states());
        assertEquals(104, sink.last("requested").iter());
        assertTrue(p.waitFor(10, TimeUnit.SECONDS));
    }

    @Test
    void heldRequestWhoseConditionClearsNeverActs() throws Exception {
        Process p = solver();
        StopGate gate = new StopGate(3, Duration.ZERO, Duration.ZERO, Duration.ZERO);
        try (StopCoordinator c = new StopCoordinator("fan-duct", JobControl.attach(new JobRef.Pid(p.pid())), true,
                StopPolicy.defaults(), clock, sink)) {
            c.request(blowup(100, gate));
            c.recordSeen(101);
            c.cleared("single-equation-blowup");
            for (long i = 102; i < 110; i++) {
                c.recordSeen(i);
            }
            assertTrue(c.stopSequence().isEmpty());
        }
        assertEquals(List.of("refused", "refused"), sink.states());
        assertTrue(((String) sink.events().get(1).fields().get("reason")).contains("cleared"));
        assertTrue(p.isAlive());
    }

    @Test
    void minimumRunAgeAndSegmentGraceHoldTheStop() throws Exception {
        Process p = solver();
        StopGate gate = new StopGate(0, Duration.ZERO, Duration.ofHours(2), Duration.ofMinutes(5));
        try (StopCoordinator c = new StopCoordinator("fan-duct", null, true,
                StopPolicy.defaults().withStopFile(dir.resolve(StopPolicy.STOP_FILE_NAME)), clock, sink)) {
            c.segment(50);
            c.request(blowup(60, gate));
            String reason = (String) sink.last("refused").fields().get("reason");
            assertTrue(reason.contains("less than the minimum 7200.0 s"), reason);
            assertTrue(reason.contains("since a new segment, less than the 300.0 s grace"), reason);
            clock.advance(Duration.ofHours(3));
            c.segment(70); // a restart: the held request is dropped and the grace starts again
            c.recordSeen(71);
            assertTrue(c.stopSequence().isEmpty());
            c.request(blowup(72, gate));
            assertTrue(c.stopSequence().isEmpty());
            clock.advance(Duration.ofMinutes(6));
            c.recordSeen(73);
            c.stopSequence().orElseThrow().get(30, TimeUnit.SECONDS);
        }
        assertTrue(p.isAlive());
        assertEquals(List.of("refused", "refused", "requested", "signalled", "done"), sink.states());
    }

    @Test
    void neverStopsWhileTheRunIsMarkedConverged() throws Exception {
        Process p = solver();
        try (StopCoordinator c = new StopCoordinator("fan-duct", JobControl.attach(new JobRef.Pid(p.pid())), true,
                StopPolicy.defaults(), clock, sink)) {
            c.converged(true);
            c.request(blowup(900, NOW));
            c.request(blowup(901, NOW));
            assertTrue(c.stopSequence().isEmpty());
        }
        assertEquals(List.of("refused"), sink.states(), "refused once, not on every request");
        assertTrue(((String) sink.events().get(0).fields().get("reason")).contains("converged"));
        assertTrue(p.isAlive());
    }

    @Test
    void atMostOneStopSequencePerRun() throws Exception {
        Process p = solver();
        try (StopCoordinator c = new StopCoordinator("fan-duct", JobControl.attach(new JobRef.Pid(p.pid())), true,
                StopPolicy.defaults().withGrace(Duration.ofSeconds(20)), clock, sink)) {
            c.request(blowup(10, NOW));
            c.stopSequence().orElseThrow().get(30, TimeUnit.SECONDS);
            c.request(new StopRequest("fan-duct", "non-finite", Severity.CRITICAL, 11, "NaN in temp", Map.of(), NOW));
        }
        assertEquals(List.of("requested", "signalled", "done", "refused"), sink.states());
        assertTrue(((String) sink.last("refused").fields().get("reason")).contains("at most one per run"));
    }

    @Test
    void armedWithNothingAttachedRefusesWithTheReason() {
        try (StopCoordinator c = new StopCoordinator("fan-duct", null, true, StopPolicy.defaults(), clock, sink)) {
            c.request(blowup(10, NOW));
            assertTrue(c.stopSequence().isEmpty());
        }
        assertEquals(List.of("refused"), sink.states());
        assertTrue(((String) sink.events().get(0).fields().get("reason")).contains("no job attached"));
    }

    @Test
    void stopFileAppearsInTheCaseDirectoryThenTheProcessIsForcedIfItDoesNotListen() throws Exception {
        Path out = dir.resolve("deaf.out");
        Process p = children.loop(out, ""); // ignores TERM and reads no stop file
        await().atMost(10, TimeUnit.SECONDS).until(() -> Files.exists(out) && Files.size(out) > 0);
        Path stopFile = dir.resolve(StopPolicy.STOP_FILE_NAME);
        StopPolicy policy = StopPolicy.defaults().withSignal("none").withGrace(Duration.ofMillis(500))
                .withStopFile(stopFile);
        try (StopCoordinator c = new StopCoordinator("fan-duct", JobControl.attach(new JobRef.Pid(p.pid())), true,
                policy, clock, sink)) {
            c.request(blowup(40, NOW));
            c.stopSequence().orElseThrow().get(30, TimeUnit.SECONDS);
        }
        assertTrue(Files.readString(stopFile).contains("pattern: single-equation-blowup"));
        assertEquals(List.of("requested", "signalled", "signalled", "done"), sink.states());
        assertEquals("stop-file", sink.events().get(1).fields().get("method"));
        assertNull(sink.events().get(1).fields().get("signal"));
        assertEquals("KILL", sink.events().get(2).fields().get("signal"));
        assertTrue(p.waitFor(10, TimeUnit.SECONDS));
    }

    @Test
    void userCommandRunsAsAnArgumentListWithJobAndRunSubstituted() throws Exception {
        Process p = solver();
        Path record = dir.resolve("args.txt");
        Path script = dir.resolve("notify-queue.sh");
        Files.writeString(script, "#!/bin/bash\nfor a in \"$@\"; do echo \"[$a]\"; done > '" + record + "'\n");
        Files.setPosixFilePermissions(script, PosixFilePermissions.fromString("rwxr-xr-x"));
        StopPolicy policy = StopPolicy.defaults().withGrace(Duration.ofSeconds(20))
                .withCommand(List.of(script.toString(), "--job={job}", "run {run}; echo not-a-shell"));
        try (StopCoordinator c = new StopCoordinator("fan-duct", JobControl.attach(new JobRef.Pid(p.pid())), true,
                policy, clock, sink)) {
            c.request(blowup(40, NOW));
            c.stopSequence().orElseThrow().get(30, TimeUnit.SECONDS);
        }
        assertEquals("[--job=pid:" + p.pid() + "]\n[run fan-duct; echo not-a-shell]\n", Files.readString(record));
        assertEquals(List.of("requested", "signalled", "signalled", "done"), sink.states());
        assertEquals("command", sink.events().get(1).fields().get("method"));
    }

    @Test
    void failingUserCommandIsAFailedStepWithItsError() throws Exception {
        try (StopCoordinator c = new StopCoordinator("fan-duct", null, true,
                StopPolicy.defaults().withCommand(List.of("bash", "-c", "echo queue is locked >&2; exit 4")),
                clock, sink)) {
            c.request(blowup(40, NOW));
            c.stopSequence().orElseThrow().get(30, TimeUnit.SECONDS);
        }
        TimelineEvent failed = sink.last("failed");
        assertNotNull(failed);
        assertEquals("command", failed.fields().get("method"));
        assertTrue(((String) failed.fields().get("error")).contains("exit 4: queue is locked"),
                (String) failed.fields().get("error"));
        assertEquals(Severity.CRITICAL, failed.severity());
    }

    @Test
    void coreHoursSavedComeFromTheGivenSizeAndLimitWordedAsUpTo() throws Exception {
        Process p = solver();
        Instant started = ProcessIdentity.of(p.toHandle()).orElseThrow().start();
        // The test clock is set 2 h after the real start; a 10 h limit on 16 cores leaves 8 h x 16 = 128.
        MutableClock at = new MutableClock(started.plus(Duration.ofHours(2)));
        try (StopCoordinator c = new StopCoordinator("fan-duct", JobControl.attach(new JobRef.Pid(p.pid())), false,
                StopPolicy.defaults().withGiven(16, Duration.ofHours(10)), at, sink)) {
            c.request(blowup(40, NOW));
            c.stopSequence().orElseThrow().get(30, TimeUnit.SECONDS);
        }
        TimelineEvent w = sink.last("would-stop");
        assertEquals(128.0, (Double) w.fields().get("core_hours_saved"), 1e-9);
        assertTrue(((String) w.fields().get("core_hours_note")).startsWith("up to 128.0 core-hours"),
                (String) w.fields().get("core_hours_note"));
    }
}
