package dev.watcher.act;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.attribute.PosixFilePermissions;
import java.time.Duration;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The PBS path against small recording {@code qsig}, {@code qdel} and {@code qstat} scripts that this test
 * puts on PATH: Debian ships no PBS server, so no real one is run here. The scripts record their arguments;
 * {@code qstat} answers "running" until the job has been deleted (or, for the TERM-aware job, signalled).
 */
class PbsRecordingScriptsIT {

    @TempDir
    Path dir;

    private Path bin;
    private Path calls;
    private Map<String, String> env;

    @BeforeEach
    void putRecordingScriptsOnPath() throws Exception {
        bin = Files.createDirectories(dir.resolve("bin"));
        calls = dir.resolve("calls.txt");
        Files.writeString(calls, "");
        Path state = dir.resolve("state");
        script("qsig", "echo \"qsig $*\" >> '" + calls + "'\n"
                + "if [ -f '" + dir.resolve("obeys-term") + "' ]; then echo ended > '" + state + "'; fi\n");
        script("qdel", "echo \"qdel $*\" >> '" + calls + "'\necho ended > '" + state + "'\n");
        script("qstat", "if [ -f '" + state + "' ]; then echo \"qstat: Unknown Job Id $2\" >&2; exit 153; fi\n"
                + "cat <<EOT\nJob Id: $2\n    job_state = R\n    Resource_List.ncpus = 48\n"
                + "    Resource_List.walltime = 12:00:00\nEOT\n");
        env = new HashMap<>(System.getenv());
        env.put("PATH", bin + ":" + System.getenv("PATH"));
    }

    private void script(String name, String body) throws Exception {
        Path p = bin.resolve(name);
        Files.writeString(p, "#!/bin/bash\n" + body);
        Files.setPosixFilePermissions(p, PosixFilePermissions.fromString("rwxr-xr-x"));
    }

    @Test
    void recordingQsigThenQdelScriptsOnPathSeeTheSignalThenTheForcedDelete() throws Exception {
        JobControl c = JobControl.attach(JobRef.parse("pbs:4711.head"), env);
        assertTrue(c.alive());
        List<StopStep> steps = new ArrayList<>();
        StopStep last = c.stop("TERM", Duration.ofMillis(600), Duration.ofSeconds(10), steps::add);
        assertEquals("done", last.state());
        assertEquals(List.of("signalled", "signalled", "done"), steps.stream().map(StopStep::state).toList());
        assertEquals(List.of("qsig -s SIGTERM 4711.head", "qdel 4711.head"),
                Files.readAllLines(calls));
        assertFalse(c.alive());
        assertTrue(c.onEnd().get(10, TimeUnit.SECONDS) == null);
    }

    @Test
    void recordingQsigScriptOnPathJobThatObeysTheSignalIsNotDeleted() throws Exception {
        Files.writeString(dir.resolve("obeys-term"), "");
        JobControl c = JobControl.attach(JobRef.parse("pbs:4712"), env);
        StopStep last = c.stop("USR1", Duration.ofSeconds(20), Duration.ofSeconds(10), s -> { });
        assertEquals("done", last.state());
        assertEquals(List.of("qsig -s SIGUSR1 4712"), Files.readAllLines(calls));
    }

    @Test
    void recordingQstatScriptOnPathGivesCoresAndWalltime() throws Exception {
        JobInfo info = JobControl.attach(JobRef.parse("pbs:4713"), env).info();
        assertEquals(48, info.cores());
        assertEquals(Duration.ofHours(12), info.timeLimit());
    }

    @Test
    void missingPbsToolsFailAttachWithAClearMessage() {
        Map<String, String> bare = Map.of("PATH", dir.resolve("empty").toString());
        IllegalStateException e = org.junit.jupiter.api.Assertions.assertThrows(IllegalStateException.class,
                () -> JobControl.attach(JobRef.parse("pbs:1"), bare));
        assertTrue(e.getMessage().contains("qsig not found on PATH"), e.getMessage());
    }
}
