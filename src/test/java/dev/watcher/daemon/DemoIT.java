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
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The demo end to end (CONTRACT.md, "The demo grows with the issues"): three real solver processes write
 * their logs live, the daemon watches them, each scenario raises the pattern it names, the diverging case
 * is stopped by the daemon, and the run ends by itself.
 */
class DemoIT {

    private static final ObjectMapper JSON = new ObjectMapper();

    @Test
    void eachScenarioRaisesItsPatternAndTheDivergingCaseIsStopped(@TempDir Path dir) throws Exception {
        int rc = Main.execute("demo", "--out", dir.toString(), "--pace-ms", "20", "--limit", "150");
        assertEquals(0, rc);
        Path tl = dir.resolve("state/timeline.jsonl");
        List<JsonNode> events = new ArrayList<>();
        for (String l : Files.readAllLines(tl)) {
            events.add(JSON.readTree(l));
        }
        TimelineContract.check(events);
        assertTrue(patterns(events, "east-header").contains("converged"), patterns(events, "east-header").toString());
        Set<String> hot = patterns(events, "east-header-hot");
        assertTrue(hot.contains("stalled-oscillation") || hot.contains("family-divergence"), hot.toString());
        assertTrue(patterns(events, "tunnel-fan").contains("rising-peaks"), patterns(events, "tunnel-fan").toString());
        assertTrue(events.stream().anyMatch(e -> e.get("run").asText().equals("east-header-hot")
                && e.get("type").asText().equals("action") && e.get("state").asText().equals("done")),
                "the diverging case was stopped");
        Path report = dir.resolve("report.html");
        assertTrue(Files.size(report) > 10_000, "the demo writes its report");
        assertTrue(Files.readString(report).contains("east-header-hot"));
        assertFalse(events.stream().anyMatch(e -> e.get("run").asText().equals("east-header")
                && e.get("type").asText().equals("action") && !e.get("state").asText().equals("refused")),
                "the converging case is never stopped");
    }

    private static Set<String> patterns(List<JsonNode> events, String run) {
        return events.stream().filter(e -> e.get("run").asText().equals(run))
                .filter(e -> e.get("type").asText().equals("detection")).map(e -> e.get("pattern").asText())
                .collect(Collectors.toSet());
    }
}
