package dev.watcher.act;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.testing.SlurmCluster;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.attribute.PosixFilePermissions;
import java.time.Duration;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Tag;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * Stopping jobs on a real one-node SLURM cluster (.ci/slurm-up.sh brings it up). With the {@code CI}
 * environment variable set, a missing or unreachable SLURM fails these tests: CI must bring it. Elsewhere
 * they are skipped when there is no SLURM.
 */
@Tag("slurm")
class SlurmStopIT {

    @TempDir
    Path dir;

    private final List<String> submitted = new ArrayList<>();

    @BeforeAll
    static void slurmIsThere() throws Exception {
        SlurmCluster.requireUp();
    }

    @AfterEach
    void cancelLeftovers() throws Exception {
        SlurmCluster.cancel(submitted);
    }

    private static String run(List<String> cmd) throws IOException, InterruptedException {
        return SlurmCluster.run(cmd);
    }

    private String submit(Map<String, String> extraEnv, String... args) throws Exception {
        List<String> cmd = new ArrayList<>(List.of("sbatch", "--parsable", "--chdir=" + dir, "--time=10",
                "--output=" + dir.resolve("job-%j.out")));
        cmd.addAll(List.of(args));
        ProcessBuilder pb = new ProcessBuilder(cmd).redirectErrorStream(true);
        pb.environment().putAll(extraEnv);
        Process p = pb.start();
        String out = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8).strip();
        assertTrue(p.waitFor(60, TimeUnit.SECONDS));
        assertEquals(0, p.exitValue(), "sbatch: " + out);
        String id = out.split(";")[0];
        assertTrue(id.matches("[0-9]+"), "sbatch printed " + out);
        submitted.add(id);
        return id;
    }

    private static boolean listed(String id) throws Exception {
        return !run(List.of("squeue", "-h", "-j", id, "-o", "%i")).isBlank();
    }

    private Path executable(String name, String body) throws IOException {
        Path p = dir.resolve(name);
        Files.writeString(p, body);
        Files.setPosixFilePermissions(p, PosixFilePermissions.fromString("rwxr-xr-x"));
        return p;
    }

    @Test
    void runningJobIsSignalledThroughJobControlAndSqueueNoLongerListsIt() throws Exception {
        Path solverOut = dir.resolve("solver.log");
        Path batch = executable("loop.sbatch", "#!/bin/bash\n"
                + "srun bash -c 'exec >> " + solverOut + "; trap \"echo caught-term; exit 0\" TERM; "
                + "while :; do echo \"~ pass $SECONDS | temp 1e+02\"; sleep 0.2; done' &\n"
                + "wait\n");
        String id = submit(Map.of(), batch.toString());
        await().atMost(60, TimeUnit.SECONDS).until(() -> Files.exists(solverOut) && Files.size(solverOut) > 0);
        JobControl c = JobControl.attach(JobRef.parse("slurm:" + id));
        assertTrue(c.alive());
        JobInfo info = c.info();
        assertEquals(Duration.ofMinutes(10), info.timeLimit());
        assertTrue(info.cores() != null && info.cores() >= 1);
        List<StopStep> steps = new ArrayList<>();
        StopStep last = c.stop("TERM", Duration.ofSeconds(30), Duration.ofSeconds(60), steps::add);
        assertEquals("done", last.state(), steps.toString());
        assertEquals("signalled", steps.get(0).state());
        assertTrue(steps.get(0).detail().equals("scancel --signal=TERM " + id), steps.get(0).detail());
        assertFalse(listed(id), "squeue no longer lists job " + id);
        assertTrue(Files.readString(solverOut).contains("caught-term"), "the solver's TERM trap ran");
        assertTrue(c.onEnd().get(30, TimeUnit.SECONDS) == null);
    }

    @Test
    void coordinatorStopsTheSolverStepAndTheTimelineHasEveryActionWithCoreHoursFromScontrol() throws Exception {
        Path solverOut = dir.resolve("solver.log");
        Path batch = executable("step.sbatch", "#!/bin/bash\n"
                + "srun --job-name=solver bash -c 'while :; do echo \"~ pass $SECONDS | temp NaN\"; sleep 0.2; done' > '"
                + solverOut + "' &\n"
                + "wait\necho batch-shell-still-here\n");
        String id = submit(Map.of(), batch.toString());
        await().atMost(60, TimeUnit.SECONDS).until(() -> Files.exists(solverOut) && Files.size(solverOut) > 0);
        String step = run(List.of("bash", "-c", "squeue -h -s -j " + id + " -o '%i %j' | awk '$2==\"solver\"{print $1}'"));
        assertTrue(step.matches(id + "\\.[0-9]+"), "step " + step);
        ListSink sink = new ListSink();
        try (StopCoordinator c = new StopCoordinator("vent-stack", JobControl.attach(JobRef.parse("slurm:" + step)),
                true, StopPolicy.defaults().withGrace(Duration.ofSeconds(30)), java.time.Clock.systemUTC(), sink)) {
            c.request(new dev.watcher.model.StopRequest("vent-stack", "non-finite", dev.watcher.model.Severity.CRITICAL,
                    12, "NaN in temp", Map.of("equation", "temp"),
                    new dev.watcher.model.StopGate(0, Duration.ZERO, Duration.ZERO, Duration.ZERO)));
            c.stopSequence().orElseThrow().get(120, TimeUnit.SECONDS);
        }
        assertEquals(List.of("requested", "signalled", "done"), sink.states(), sink.events().toString());
        assertEquals("slurm", sink.events().get(0).fields().get("method"));
        assertEquals("slurm:" + step, sink.events().get(0).fields().get("job"));
        // 10-minute limit on 1 CPU (sbatch --time=10 above): at most 10/60 core-hours are left (rounded to 0.01).
        double saved = (Double) sink.events().get(0).fields().get("core_hours_saved");
        assertTrue(saved > 0 && saved <= 0.17, "saved " + saved);
        assertTrue(((String) sink.events().get(1).fields().get("detail")).startsWith("scancel --signal=TERM " + step));
        await().atMost(90, TimeUnit.SECONDS).until(() -> !listed(id));
        assertTrue(Files.readString(dir.resolve("job-" + id + ".out")).contains("batch-shell-still-here"),
                "stopping the step left the batch shell to finish");
    }

    @Test
    void wrapperStartsTheWatcherWithTheSolversRealStepAndStoppingTheStepLeavesTheWatcherToFlush()
            throws Exception {
        // A stand-in for the launcher: records its arguments, then acts like the watcher at the end of its
        // job (waits until its step is gone, then "flushes").
        Path args = dir.resolve("watcher-args.txt");
        Path flushed = dir.resolve("flushed.txt");
        Path fakeWatcher = executable("fake-watcher", "#!/bin/bash\n"
                + "echo \"$@\" > '" + args + "'\n"
                + "job=$(echo \"$@\" | sed -n 's/.*--job slurm:\\([^ ]*\\).*/\\1/p')\n"
                + "step=${job##*.}; id=${job%.*}\n"
                + "for i in $(seq 1 300); do\n"
                + "  squeue -h -s -j \"$id\" -o %i | grep -q \"\\.$step\\$\" || break; sleep 0.2\n"
                + "done\n"
                + "echo flushed > '" + flushed + "'\n");
        Path wrapper = Path.of("deploy/slurm/watch-run.sbatch").toAbsolutePath();
        assertTrue(Files.isRegularFile(wrapper), wrapper.toString());
        Path log = dir.resolve("duct.log");
        Map<String, String> env = new HashMap<>();
        env.put("WATCHER", fakeWatcher.toString());
        String id = submit(env, "--export=ALL", wrapper.toString(), log.toString(), "bash", "-c",
                "while :; do echo \"~ pass $SECONDS | temp 1e+03\"; sleep 0.2; done");
        await().atMost(60, TimeUnit.SECONDS).until(() -> Files.exists(args) && Files.size(args) > 0);
        String recorded = Files.readString(args).strip();
        assertTrue(recorded.matches("watch \\S+duct\\.log --job slurm:" + id + "\\.[0-9]+ --stop"), recorded);
        String spec = recorded.replaceAll(".*--job (\\S+).*", "$1");
        JobControl step = JobControl.attach(JobRef.parse(spec));
        assertTrue(step.alive());
        StopStep last = step.stop("TERM", Duration.ofSeconds(30), Duration.ofSeconds(60), s -> { });
        assertEquals("done", last.state());
        await().atMost(60, TimeUnit.SECONDS).until(() -> Files.exists(flushed));
        await().atMost(90, TimeUnit.SECONDS).until(() -> !listed(id));
        String jobOut = Files.readString(dir.resolve("job-" + id + ".out"));
        assertTrue(jobOut.contains("watch-run: solver exit"), jobOut);
        assertTrue(Files.readString(log).contains("~ pass"));
    }
}
