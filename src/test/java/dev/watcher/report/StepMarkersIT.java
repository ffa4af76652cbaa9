package dev.watcher.report;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.node.ObjectNode;
import dev.watcher.cli.Main;
import dev.watcher.history.RunHistory;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.Samples;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.ZoneOffset;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.stream.Stream;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The per-time-step plot of an unsteady run marks each condition at the time step of the iteration it refers
 * to, through the history's map of each step's first iteration. The run is the project's own solver with too
 * large a time step ({@code test-logs/big-step.jsonl}, see test-logs/README.md: it raises {@code rising-peaks});
 * the step of an iteration is read back from that log's own {@code step} field.
 */
class StepMarkersIT {

    private static final ObjectMapper JSON = new ObjectMapper();
    private static final Path LOG = Path.of("test-logs", "big-step.jsonl");

    @TempDir
    Path tmp;

    /** Replays the log into a fresh state directory. */
    private Path replay() {
        Path state = tmp.resolve("state");
        assertEquals(0, Main.execute("replay", LOG.toString(), "--state", state.toString(), "-q"));
        return state;
    }

    /** The plot specifications of the report's data block. */
    private static List<JsonNode> charts(Path report) throws Exception {
        String html = Files.readString(report);
        String open = "<script type=\"application/json\" id=\"report-data\">";
        int start = html.indexOf(open) + open.length();
        JsonNode root = JSON.readTree(html.substring(start, html.indexOf("</script>", start)));
        List<JsonNode> out = new ArrayList<>();
        root.path("charts").forEach(out::add);
        return out;
    }

    private static JsonNode chart(List<JsonNode> charts, String xLabel, String yLabel) {
        return charts.stream().filter(c -> c.path("xLabel").asText().equals(xLabel)
                && c.path("yLabel").asText().equals(yLabel)).findFirst().orElseThrow();
    }

    /** iteration to time step, as the log itself says. */
    private static Map<Long, Long> stepsOfTheLog() throws Exception {
        Map<Long, Long> out = new HashMap<>();
        for (String line : Files.readAllLines(LOG)) {
            JsonNode n = JSON.readTree(line);
            out.put(n.path("iter").asLong(), n.path("step").asLong());
        }
        return out;
    }

    @Test
    void perStepPlotMarksEachConditionAtTheTimeStepOfItsIteration() throws Exception {
        Path state = replay();
        Path report = ReportWriter.write(state, tmp.resolve("r.html"), ZoneOffset.UTC);
        List<JsonNode> charts = charts(report);
        JsonNode byIter = chart(charts, "iteration", "residual");
        JsonNode bySteps = chart(charts, "time step", "residual");
        Map<Long, Long> step = stepsOfTheLog();

        JsonNode spans = bySteps.path("spans");
        assertEquals(byIter.path("spans").size(), spans.size(), "the residual plot's conditions: " + spans);
        assertTrue(spans.size() > 0, "the run raises conditions");
        boolean risingPeaks = false;
        for (int i = 0; i < spans.size(); i++) {
            JsonNode it = byIter.path("spans").get(i);
            JsonNode st = spans.get(i);
            assertEquals(it.path("n").asLong(), st.path("n").asLong(), "the same condition, in the same order");
            long iter0 = it.path("x0").asLong();
            assertEquals(iter0, st.path("iter0").asLong());
            assertNotNull(step.get(iter0), "an iteration of the log: " + it);
            assertEquals((long) step.get(iter0), st.path("x0").asLong(), "opened at the step of iteration " + iter0);
            if (!it.path("x1").isNull()) {
                long iter1 = it.path("x1").asLong();
                assertEquals((long) step.get(iter1), st.path("x1").asLong(), "resolved at the step of " + iter1);
            } else {
                assertTrue(st.path("x1").isNull(), "still open: " + st);
            }
            risingPeaks |= st.path("pat").asText().equals("rising-peaks");
        }
        assertTrue(risingPeaks, "the scenario's pattern is marked: " + spans);
        String html = Files.readString(report);
        assertTrue(html.contains("Conditions and stops are marked at the time step of their iteration"), "caption");
    }

    @Test
    void aHistoryWithoutTheStepMapStillGivesAReportWithoutMarkersOnThePerStepPlot() throws Exception {
        Path state = replay();
        // a state directory written before the history kept its step map
        List<Path> files;
        try (Stream<Path> s = Files.list(state.resolve("history"))) {
            files = s.filter(p -> p.toString().endsWith(".json")).toList();
        }
        assertFalse(files.isEmpty());
        for (Path f : files) {
            ObjectNode root = (ObjectNode) JSON.readTree(f.toFile());
            assertTrue(root.has("step_first_iter"), "written by this version: " + f);
            root.remove("step_first_iter");
            JSON.writeValue(f.toFile(), root);
        }
        Path report = ReportWriter.write(state, tmp.resolve("r.html"), ZoneOffset.UTC);
        List<JsonNode> charts = charts(report);
        JsonNode bySteps = chart(charts, "time step", "residual");
        assertEquals(0, bySteps.path("spans").size(), bySteps.path("spans").toString());
        assertEquals(0, bySteps.path("actions").size());
        assertTrue(bySteps.path("x").size() > 0, "the plot itself is drawn");
        assertTrue(chart(charts, "iteration", "residual").path("spans").size() > 0, "the residual plot keeps them");
        assertTrue(Files.readString(report).contains("Conditions are not marked here"), "said in the caption");
    }

    /**
     * Far more steps than a series has buckets: the map stays within the history's bound, and every iteration
     * is placed in the bucket of steps that holds its true step (the plot's own resolution); a bucket's first
     * step is found exactly from its first iteration. Steps here have 2 to 5 inner iterations in turn.
     */
    @Test
    void theStepMapStaysBoundedAndPlacesEachIterationWithinItsBucket() throws Exception {
        RunHistory h = new RunHistory("long-transient", tmp.resolve("history"));
        Samples res = Samples.of(Map.of("cont", 1e-3));
        int steps = 5 * RunHistory.CAPACITY + 17;
        long iter = 0;
        Map<Long, Long> trueStep = new HashMap<>();
        Map<Long, Long> firstIter = new HashMap<>();
        for (long s = 1; s <= steps; s++) {
            long inner = 2 + s % 4;
            for (long k = 1; k <= inner; k++) {
                iter++;
                h.observe(new IterationRecord(iter, s, s * 0.01, k, res, Samples.of(Map.of()), 0, 0));
                trueStep.put(iter, s);
                firstIter.putIfAbsent(s, iter);
            }
        }
        h.save();
        History read = History.read(tmp.resolve("history").resolve(RunHistory.fileName("long-transient")));
        assertTrue(read.knowsSteps());
        History.Track t = read.stepStarts();
        assertTrue(t.size() <= RunHistory.CAPACITY, "bounded: " + t.size());
        assertEquals(steps, t.count(), "every step counted");
        assertEquals(-1, read.stepOf(0), "before the first step");
        for (long i = 1; i <= iter; i++) {
            long s = trueStep.get(i);
            long placed = read.stepOf(i);
            int b = bucketOf(t, s);
            assertTrue(placed >= t.x0()[b] && placed <= t.x1()[b],
                    "iteration " + i + " of step " + s + " placed at " + placed + ", bucket " + t.x0()[b] + ".."
                            + t.x1()[b]);
        }
        for (int b = 0; b < t.size(); b++) {
            assertEquals(t.x0()[b], read.stepOf(firstIter.get(t.x0()[b])), "first step of bucket " + b);
            assertEquals(t.x1()[b], read.stepOf(firstIter.get(t.x1()[b])), "last step of bucket " + b);
        }
        assertEquals(steps, read.stepOf(iter + 100), "past the last start: the last step");
    }

    private static int bucketOf(History.Track t, long step) {
        for (int b = 0; b < t.size(); b++) {
            if (step >= t.x0()[b] && step <= t.x1()[b]) {
                return b;
            }
        }
        throw new AssertionError("step " + step + " in no bucket");
    }
}
