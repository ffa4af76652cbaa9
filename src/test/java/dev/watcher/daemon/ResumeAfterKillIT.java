package dev.watcher.daemon;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.watcher.cli.Main;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Set;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The resume contract: a daemon killed with SIGKILL while the solver is still writing, and started again,
 * neither loses nor repeats an event; its stream of detections equals what {@code replay} makes of the
 * finished log, and {@code seq} runs 1, 2, 3, ... without a gap or a repeat. The log is written live by the
 * project's own solver (a real child process), the daemon is a real child process too.
 */
class ResumeAfterKillIT {

    private static final ObjectMapper JSON = new ObjectMapper();

    private static Process java(Path dir, String name, String... args) throws IOException {
        List<String> cmd = new ArrayList<>(List.of(Path.of(System.getProperty("java.home"), "bin", "java").toString(),
                "-Xmx128m", "-XX:+UseSerialGC", "-XX:TieredStopAtLevel=1", "-cp", System.getProperty("java.class.path")));
        cmd.addAll(List.of(args));
        return new ProcessBuilder(cmd).redirectErrorStream(true).redirectOutput(dir.resolve(name + ".out").toFile())
                .start();
    }

    private static List<JsonNode> timeline(Path f) throws IOException {
        List<JsonNode> out = new ArrayList<>();
        if (!Files.exists(f)) {
            return out;
        }
        for (String l : Files.readAllLines(f)) {
            if (!l.isBlank()) {
                out.add(JSON.readTree(l));
            }
        }
        return out;
    }

    /** The events that follow from the log alone, reduced to what must match between watch and replay. */
    private static List<String> stream(List<JsonNode> events) {
        List<String> out = new ArrayList<>();
        for (JsonNode e : events) {
            String type = e.get("type").asText();
            boolean det = type.equals("detection") && !e.get("pattern").asText().equals("log-silent");
            boolean seg = type.equals("run") && e.get("state").asText().equals("segment");
            if (det || seg) {
                out.add(type + " " + e.path("pattern").asText("") + " " + e.get("state").asText() + " @"
                        + e.get("iter").asLong() + " " + e.path("equations") + " " + e.path("monitor").asText("")
                        + " " + e.path("evidence"));
            }
        }
        return out;
    }

    @Test
    void aDaemonKilledMidRunAndRestartedNeitherLosesNorRepeatsAnEvent(@TempDir Path dir) throws Exception {
        Path log = dir.resolve("intake.log");
        Path state = dir.resolve("state");
        Path tl = state.resolve("timeline.jsonl");
        Process solver = java(dir, "solver", "dev.watcher.demo.DemoSolverMain", "--scenario", "hot-relaxation",
                "--layout", "jsonl", "--out", log.toString(), "--pace-ms", "8");
        Process first = java(dir, "daemon1", "dev.watcher.cli.Main", "watch", log.toString(), "--state",
                state.toString(), "--poll-ms", "50", "--idle-poll-ms", "200", "-q");
        // wait until the first daemon has written some detections while the solver still runs
        await().atMost(Duration.ofSeconds(60)).until(() -> !stream(timeline(tl)).isEmpty());
        assertTrue(solver.isAlive(), "the solver must still be writing when the daemon is killed");
        first.destroyForcibly(); // SIGKILL: no flush, no goodbye
        assertTrue(first.waitFor(10, TimeUnit.SECONDS));
        int before = timeline(tl).size();
        int streamBefore = stream(timeline(tl)).size();

        Process second = java(dir, "daemon2", "dev.watcher.cli.Main", "watch", log.toString(), "--state",
                state.toString(), "--poll-ms", "50", "--idle-poll-ms", "200", "-q");
        assertTrue(solver.waitFor(120, TimeUnit.SECONDS), "the solver ends by itself");
        long lastIter = lastIter(log);
        await().atMost(Duration.ofSeconds(60)).until(() -> {
            Path rs = state.resolve("runs/intake.json");
            return Files.exists(rs) && JSON.readTree(rs.toFile()).path("last_iter").asLong() == lastIter;
        });
        second.destroy(); // SIGTERM: flush and exit 0
        assertTrue(second.waitFor(30, TimeUnit.SECONDS));
        assertEquals(0, second.exitValue(), Files.readString(dir.resolve("daemon2.out")));

        List<JsonNode> watched = timeline(tl);
        TimelineContract.check(watched);
        assertTrue(watched.size() > before, "the second daemon went on writing");
        assertTrue(watched.stream().anyMatch(e -> e.get("state").asText().equals("resumed")));
        // seq: 1, 2, 3, ... with no gap and no repeat, across the kill
        Set<Long> seqs = new HashSet<>();
        for (int i = 0; i < watched.size(); i++) {
            assertEquals(i + 1, watched.get(i).get("seq").asLong(), "seq at line " + (i + 1));
            assertTrue(seqs.add(watched.get(i).get("seq").asLong()));
        }

        assertEquals(0, Main.execute("replay", log.toString(), "--state", dir.resolve("replayed").toString(), "-q"));
        List<String> replayed = stream(timeline(dir.resolve("replayed/timeline.jsonl")));
        assertFalse(replayed.isEmpty(), "the hot-relaxation case raises detections");
        assertEquals(replayed, stream(watched));
        assertTrue(streamBefore > 0 && streamBefore < replayed.size(),
                "killed after some detections were written and before the last: " + streamBefore + " of "
                        + replayed.size());
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
}
