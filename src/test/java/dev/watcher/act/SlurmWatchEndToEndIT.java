package dev.watcher.act;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.watcher.demo.Scenario;
import dev.watcher.testing.SlurmCluster;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.attribute.PosixFilePermissions;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.concurrent.TimeUnit;
import java.util.stream.Collectors;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Tag;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The whole chain on a real one-node SLURM cluster (.ci/slurm-up.sh): the shipped wrapper
 * {@code deploy/slurm/watch-run.sbatch}, submitted with sbatch, runs the project's demo solver as a job step and
 * the real watcher (this build's classes, through the wrapper's {@code WATCHER} variable) in the batch shell.
 * The solver writes its jsonl log itself ({@code SOLVER_WRITES_LOG=1}); the watcher follows it with the
 * demo rules (short stop gates, rules/examples/demo-fast-gates.yaml) and decides on its own whether to stop.
 *
 * <p>With the {@code CI} environment variable set, a missing SLURM fails these tests; elsewhere they are
 * skipped when there is no SLURM.
 */
@Tag("slurm")
class SlurmWatchEndToEndIT {

    private static final ObjectMapper JSON = new ObjectMapper();
    private static final Path WRAPPER = Path.of("deploy/slurm/watch-run.sbatch").toAbsolutePath();
    private static final Path FAST_RULES = Path.of("rules/examples/demo-fast-gates.yaml").toAbsolutePath();
    /** The patterns the demo rules allow to stop a run (rules/default.yaml, demo-fast-gates.yaml). */
    private static final Set<String> STOPPING = Set.of("non-finite", "single-equation-blowup",
            "family-divergence", "stalled-oscillation");

    @TempDir
    Path dir;

    private final List<String> submitted = new ArrayList<>();
    private Path watcherLauncher;

    @BeforeAll
    static void slurmIsThere() throws Exception {
        SlurmCluster.requireUp();
    }

    /** A launcher like ./watcher, but on this build's classes: what the wrapper runs as $WATCHER. */
    @BeforeEach
    void launcher() throws IOException {
        watcherLauncher = dir.resolve("watcher-launcher");
        Files.writeString(watcherLauncher, "#!/bin/bash\nexec " + String.join(" ", javaCommand())
                + " dev.watcher.cli.Main \"$@\"\n");
        Files.setPosixFilePermissions(watcherLauncher, PosixFilePermissions.fromString("rwxr-xr-x"));
    }

    @AfterEach
    void cancelLeftovers() throws Exception {
        SlurmCluster.cancel(submitted);
    }

    private static List<String> javaCommand() {
        return List.of(Path.of(System.getProperty("java.home"), "bin", "java").toString(), "-Xmx128m",
                "-XX:+UseSerialGC", "-XX:TieredStopAtLevel=1", "-cp", System.getProperty("java.class.path"));
    }

    private static String run(List<String> cmd) throws IOException, InterruptedException {
        return SlurmCluster.run(cmd);
    }

    private static boolean listed(String id) throws Exception {
        return !run(List.of("squeue", "-h", "-j", id, "-o", "%i")).isBlank();
    }

    /**
     * Submits the wrapper for one demo run; returns the job id. The state directory is {@code dir/state}.
     */
    private String submitWatchedRun(boolean stop, Path log, String scenario, int paceMs) throws Exception {
        Map<String, String> env = new HashMap<>();
        env.put("WATCHER", watcherLauncher.toString());
        env.put("WATCHER_STOP", stop ? "1" : "0");
        env.put("WATCHER_ARGS", "--format jsonl --rules " + FAST_RULES + " --state " + dir.resolve("state")
                + " --poll-ms 200 --idle-poll-ms 1000");
        env.put("WATCHER_FLUSH", "60");
        env.put("SOLVER_WRITES_LOG", "1");
        List<String> cmd = new ArrayList<>(List.of("sbatch", "--parsable", "--export=ALL", "--chdir=" + dir,
                "--time=10", "--output=" + dir.resolve("job-%j.out"), WRAPPER.toString(), log.toString()));
        cmd.addAll(javaCommand());
        cmd.addAll(List.of("dev.watcher.demo.DemoSolverMain", "--scenario", scenario, "--layout", "jsonl",
                "--out", log.toString(), "--pace-ms", Integer.toString(paceMs)));
        ProcessBuilder pb = new ProcessBuilder(cmd).redirectErrorStream(true).directory(dir.toFile());
        pb.environment().putAll(env);
        Process p = pb.start();
        String out = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8).strip();
        assertTrue(p.waitFor(60, TimeUnit.SECONDS));
        assertEquals(0, p.exitValue(), "sbatch: " + out);
        String id = out.split(";")[0];
        assertTrue(id.matches("[0-9]+"), "sbatch printed " + out);
        submitted.add(id);
        return id;
    }

    private List<JsonNode> timeline() throws IOException {
        Path f = dir.resolve("state/timeline.jsonl");
        List<JsonNode> out = new ArrayList<>();
        if (Files.exists(f)) {
            for (String l : Files.readAllLines(f)) {
                if (!l.isBlank()) {
                    out.add(JSON.readTree(l));
                }
            }
        }
        return out;
    }

    private static List<String> actionStates(List<JsonNode> events) {
        return events.stream().filter(e -> e.path("type").asText().equals("action"))
                .map(e -> e.path("state").asText()).collect(Collectors.toList());
    }

    private static long lastIter(Path log) throws IOException {
        long last = -1;
        for (String l : Files.readAllLines(log)) {
            if (l.startsWith("{")) {
                JsonNode n = JSON.readTree(l);
                if (n.has("iter")) {
                    last = n.get("iter").asLong();
                }
            }
        }
        return last;
    }

    private String jobOutput(String id) throws IOException {
        Path f = dir.resolve("job-" + id + ".out");
        return Files.exists(f) ? Files.readString(f) : "(no job output)";
    }

    /**
     * The watcher in the batch shell ended by itself because the step it watched was gone (not because the
     * wrapper gave up waiting and sent it SIGTERM), and wrote the run's closing event; returns that event.
     */
    private static JsonNode assertRunEndedWithTheStep(List<JsonNode> events, String id, String context) {
        JsonNode ended = events.stream().filter(e -> e.path("type").asText().equals("run")
                && e.path("state").asText().equals("ended")).reduce((a, b) -> b).orElse(null);
        assertTrue(ended != null, "a run 'ended' event: " + context);
        assertTrue(ended.path("reason").asText().matches("the watched job slurm:" + id + "\\.[0-9]+ ended"),
                ended.toString());
        return ended;
    }

    @Test
    void aDivergingRunSubmittedWithStopIsCancelledByTheWatcherWhichThenFlushesItsTimeline() throws Exception {
        Path log = dir.resolve("hot-header.jsonl");
        int full = Scenario.byId("hot-relaxation").iterations();
        // 70 ms a pass: about a minute if nobody stops it; the fast gates allow a stop some 15 s after the
        // first critical detection.
        String id = submitWatchedRun(true, log, "hot-relaxation", 70);
        await().atMost(180, TimeUnit.SECONDS).pollInterval(2, TimeUnit.SECONDS).until(() -> !listed(id));
        String out = jobOutput(id);
        List<JsonNode> events = timeline();
        String context = "job output:\n" + out + "\ntimeline:\n" + events;

        assertTrue(out.matches("(?s).*watch-run: solver is step [0-9]+; watching \\S+ as slurm:" + id
                + "\\.[0-9]+ --stop.*"), context);
        assertTrue(lastIter(log) > 0 && lastIter(log) < full,
                "the solver step was stopped before its last pass: " + lastIter(log) + " of " + full);
        List<String> acts = actionStates(events);
        assertEquals(List.of("requested", "signalled", "done"),
                acts.stream().filter(s -> !s.equals("refused")).collect(Collectors.toList()), context);
        JsonNode requested = events.stream().filter(e -> e.path("type").asText().equals("action")
                && e.path("state").asText().equals("requested")).findFirst().orElseThrow();
        assertEquals("slurm", requested.path("method").asText(), requested.toString());
        assertTrue(requested.path("job").asText().matches("slurm:" + id + "\\.[0-9]+"), requested.toString());
        String cause = requested.path("pattern").asText();
        assertTrue(STOPPING.contains(cause), "stopped for a pattern the rules allow to stop: " + cause);
        long requestSeq = requested.path("seq").asLong();
        // the stop names the detection that caused it: a critical one of that pattern, earlier in the timeline,
        // whose summary the request repeats
        String reason = requested.path("reason").asText();
        assertTrue(events.stream().anyMatch(e -> e.path("type").asText().equals("detection")
                && e.path("pattern").asText().equals(cause) && e.path("severity").asText().equals("critical")
                && e.path("seq").asLong() < requestSeq && reason.contains(e.path("summary").asText())),
                "the critical " + cause + " detection precedes the stop: " + context);
        // SLURM's own word that the step was cancelled (the step's output file, SOLVER_WRITES_LOG=1)
        Path stepOut = dir.resolve("solver-" + id + ".out");
        assertTrue(Files.exists(stepOut) && Files.readString(stepOut).contains("CANCELLED"), context);
        for (JsonNode e : events) {
            if (e.path("type").asText().equals("action") && !e.path("state").asText().equals("refused")) {
                assertEquals("slurm", e.path("method").asText(), e.toString());
                assertEquals(cause, e.path("pattern").asText(), e.toString());
            }
        }
        JsonNode ended = assertRunEndedWithTheStep(events, id, context);
        assertTrue(ended.path("seq").asLong() > requestSeq, "the run ended after the stop: " + context);
        assertTrue(out.contains("watch-run: solver exit"), "the batch shell outlived the stopped step: " + context);
    }

    @Test
    void aConvergingRunSubmittedWithStopFinishesOnItsOwnAndIsNeverStopped() throws Exception {
        Path log = dir.resolve("tunnel-fan.jsonl");
        int full = Scenario.byId("converging").iterations();
        // 10 ms a pass: some twelve seconds of solving.
        String id = submitWatchedRun(true, log, "converging", 10);
        await().atMost(120, TimeUnit.SECONDS).pollInterval(2, TimeUnit.SECONDS).until(() -> !listed(id));
        String out = jobOutput(id);
        List<JsonNode> events = timeline();
        String context = "job output:\n" + out + "\ntimeline:\n" + events;

        assertEquals(full, lastIter(log), "the solver ran to its last pass");
        assertTrue(out.contains("watch-run: solver exit 0"), context);
        for (String s : actionStates(events)) {
            assertTrue(s.equals("refused") || s.equals("would-stop"), "no stop was attempted: " + context);
        }
        assertTrue(events.stream().anyMatch(e -> e.path("type").asText().equals("detection")
                && e.path("pattern").asText().equals("converged")), "the converged detection: " + context);
        assertFalse(events.stream().anyMatch(e -> e.path("type").asText().equals("detection")
                && STOPPING.contains(e.path("pattern").asText())), "nothing that could stop it: " + context);
        assertRunEndedWithTheStep(events, id, context);
    }

    @Test
    void inDryModeADivergingRunIsOnlyRecordedAsWouldStopAndRunsUntilTheSolverFinishes() throws Exception {
        Path log = dir.resolve("dry-header.jsonl");
        int full = Scenario.byId("hot-relaxation").iterations();
        String id = submitWatchedRun(false, log, "hot-relaxation", 60);
        // the decision comes while the solver is still writing
        await().atMost(120, TimeUnit.SECONDS).pollInterval(1, TimeUnit.SECONDS)
                .until(() -> actionStates(timeline()).contains("would-stop"));
        long atDecision = lastIter(log);
        assertTrue(atDecision < full, "decided while running: at pass " + atDecision);
        assertTrue(listed(id), "the job keeps running after the would-stop decision");
        await().atMost(180, TimeUnit.SECONDS).pollInterval(2, TimeUnit.SECONDS).until(() -> !listed(id));
        String out = jobOutput(id);
        List<JsonNode> events = timeline();
        String context = "job output:\n" + out + "\ntimeline:\n" + events;

        assertTrue(out.matches("(?s).*watch-run: solver is step [0-9]+; watching \\S+ as slurm:" + id
                + "\\.[0-9]+ \\(dry mode\\).*"), context);
        assertEquals(full, lastIter(log), "the solver ran to its last pass");
        assertTrue(out.contains("watch-run: solver exit 0"), context);
        List<String> acts = actionStates(events);
        assertTrue(acts.contains("would-stop"), context);
        assertFalse(acts.contains("requested") || acts.contains("signalled") || acts.contains("done"), context);
        JsonNode would = events.stream().filter(e -> e.path("type").asText().equals("action")
                && e.path("state").asText().equals("would-stop")).findFirst().orElseThrow();
        assertTrue(STOPPING.contains(would.path("pattern").asText()), would.toString());
        assertRunEndedWithTheStep(events, id, context);
    }
}
