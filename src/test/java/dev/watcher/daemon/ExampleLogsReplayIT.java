package dev.watcher.daemon;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.watcher.cli.Main;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Set;
import java.util.stream.Collectors;
import java.util.stream.Stream;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.Arguments;
import org.junit.jupiter.params.provider.MethodSource;

/**
 * {@code replay} of every example log in test-logs/ (written by the project's own solver; see its README)
 * raises the pattern the log's scenario is known for, the timeline validates against the contract, and a
 * second replay gives the same detections in the same order.
 */
class ExampleLogsReplayIT {

    private static final ObjectMapper JSON = new ObjectMapper();

    static Stream<Arguments> logs() {
        String pass = "test-logs/formats/pass-line.yaml";
        String table = "test-logs/formats/table.yaml";
        String block = "test-logs/formats/sweep-block.yaml";
        Set<String> conv = Set.of("converged");
        Set<String> hot = Set.of("family-divergence", "stalled-oscillation", "single-equation-blowup");
        Set<String> peaks = Set.of("rising-peaks");
        return Stream.of(
                Arguments.of("converging.jsonl", "jsonl", conv, Set.of()),
                Arguments.of("converging.pass-line.log", pass, conv, Set.of()),
                Arguments.of("converging.table.log", table, conv, Set.of()),
                Arguments.of("hot-relaxation.jsonl", "jsonl", hot, Set.of("converged")),
                Arguments.of("hot-relaxation.pass-line.log", pass, hot, Set.of("converged")),
                Arguments.of("hot-relaxation.table.log", table, hot, Set.of("converged")),
                Arguments.of("big-step.jsonl", "jsonl", peaks, Set.of("converged")),
                Arguments.of("big-step.sweep-block.log", block, peaks, Set.of("converged")),
                Arguments.of("big-step.pass-line.log", pass, peaks, Set.of("converged")),
                Arguments.of("big-step.table.log", table, peaks, Set.of("converged")),
                Arguments.of("quirk-nan-at-blowup.pass-line.log", pass, Set.of("non-finite"), Set.of("converged")),
                Arguments.of("quirk-restart.pass-line.log", pass, conv, Set.of()),
                Arguments.of("quirk-restart.table.log", table, conv, Set.of()));
    }

    /**
     * @param anyOf   at least one of these patterns must open
     * @param noneOf  none of these may open
     */
    @ParameterizedTest(name = "{0}")
    @MethodSource("logs")
    void replayRaisesTheScenariosPatternAndWritesAValidTimeline(String log, String format, Set<String> anyOf,
            Set<String> noneOf, @TempDir Path dir) throws Exception {
        Path src = Path.of("test-logs", log);
        assertEquals(0, Main.execute("replay", src.toString(), "--format", format, "--state",
                dir.resolve("a").toString(), "-q"));
        List<JsonNode> events = read(dir.resolve("a/timeline.jsonl"));
        TimelineContract.check(events);
        Set<String> opened = events.stream().filter(e -> e.get("type").asText().equals("detection"))
                .filter(e -> e.get("state").asText().equals("open")).map(e -> e.get("pattern").asText())
                .collect(Collectors.toSet());
        assertTrue(anyOf.stream().anyMatch(opened::contains), log + " opened " + opened + ", expected one of " + anyOf);
        assertTrue(noneOf.stream().noneMatch(opened::contains), log + " opened " + opened + ", none of " + noneOf);
        if (log.startsWith("quirk-restart")) {
            assertTrue(events.stream().anyMatch(e -> e.get("state").asText().equals("segment")), "restart segment");
            assertFalse(opened.contains("single-equation-blowup") || opened.contains("family-divergence"),
                    "the jump after a restart is not a blow-up: " + opened);
        }
        // deterministic: a second replay gives the same detections in the same order
        assertEquals(0, Main.execute("replay", src.toString(), "--format", format, "--state",
                dir.resolve("b").toString(), "-q"));
        assertEquals(detections(events), detections(read(dir.resolve("b/timeline.jsonl"))));
    }

    private static List<String> detections(List<JsonNode> events) {
        return events.stream().filter(e -> !e.get("type").asText().equals("run") || e.get("state").asText()
                .equals("segment")).map(e -> {
                    ((com.fasterxml.jackson.databind.node.ObjectNode) e).remove("at");
                    return e.toString();
                }).toList();
    }

    private static List<JsonNode> read(Path f) throws Exception {
        List<JsonNode> out = new ArrayList<>();
        for (String l : Files.readAllLines(f)) {
            out.add(JSON.readTree(l));
        }
        return out;
    }
}
