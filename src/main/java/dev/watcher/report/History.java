package dev.watcher.report;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.io.IOException;
import java.nio.file.Path;
import java.util.Iterator;
import java.util.LinkedHashMap;
import java.util.Map;

/**
 * A run's bounded series history as the report reads it from {@code history/RUN.json} (the file the history
 * stage saves: per group, per name, the bucket columns {@code x0 x1 min max last} with {@code width} and
 * {@code count}). The report reads the file format, not the history classes: stages share files and the
 * model, never each other's code.
 *
 * @param stepStarts unsteady runs: each time step's first iteration over the step index ({@code step_first_iter};
 *                   a bucket of steps {@code x0..x1} holds the first iteration of step {@code x0} as its minimum
 *                   and that of step {@code x1} as its last value), or null when the file has none (a steady run,
 *                   or a history saved before the file kept it)
 */
record History(String run, long lastIter, Map<String, Track> residuals, Map<String, Track> monitors,
        Map<String, Track> peaks, Map<String, Track> floors, Track stepStarts) {

    /** One downsampled series: bucket i covers x0[i]..x1[i] and holds the min, max and last value there. */
    record Track(long width, long count, long[] x0, long[] x1, double[] min, double[] max, double[] last) {
        int size() {
            return x0.length;
        }

        /** The middle of bucket i, where its point is drawn. */
        long mid(int i) {
            return x0[i] + (x1[i] - x0[i]) / 2;
        }
    }

    private static final ObjectMapper JSON = new ObjectMapper();

    static History read(Path file) throws IOException {
        JsonNode root = JSON.readTree(file.toFile());
        return new History(root.path("run").asText(), root.path("last_iter").asLong(),
                group(root.path("residuals")), group(root.path("monitors")), group(root.path("step_peaks")),
                group(root.path("step_floors")), root.path("step_first_iter").isObject()
                        ? track(root.path("step_first_iter")) : null);
    }

    private static Map<String, Track> group(JsonNode g) {
        Map<String, Track> out = new LinkedHashMap<>();
        for (Iterator<Map.Entry<String, JsonNode>> it = g.fields(); it.hasNext();) {
            Map.Entry<String, JsonNode> e = it.next();
            out.put(e.getKey(), track(e.getValue()));
        }
        return out;
    }

    private static Track track(JsonNode n) {
        int size = n.path("x0").size();
        long[] x0 = new long[size];
        long[] x1 = new long[size];
        double[] mn = new double[size];
        double[] mx = new double[size];
        double[] la = new double[size];
        for (int i = 0; i < size; i++) {
            x0[i] = n.path("x0").path(i).asLong();
            x1[i] = n.path("x1").path(i).asLong(x0[i]);
            mn[i] = Numbers.of(n.path("min").path(i));
            mx[i] = Numbers.of(n.path("max").path(i));
            la[i] = Numbers.of(n.path("last").path(i));
        }
        return new Track(n.path("width").asLong(1), n.path("count").asLong(size), x0, x1, mn, mx, la);
    }

    /** True when the file knows each time step's first iteration, so {@link #stepOf} can place iterations. */
    boolean knowsSteps() {
        return stepStarts != null && stepStarts.size() > 0;
    }

    /**
     * The time step that iteration {@code iter} belongs to: the last step that starts at or before it. Exact
     * while the step starts are one per bucket; once buckets hold several steps, a step inside a bucket is
     * found by linear interpolation between the bucket's first and last step start (the bucket's resolution,
     * which is also the per-step plot's). -1 when unknown: no step map, or {@code iter} before the first step.
     */
    long stepOf(long iter) {
        if (!knowsSteps()) {
            return -1;
        }
        Track t = stepStarts;
        int lo = 0;
        int hi = t.size() - 1;
        int found = -1;
        while (lo <= hi) { // the last bucket whose first step starts at or before iter
            int mid = (lo + hi) >>> 1;
            if (t.min()[mid] <= iter) {
                found = mid;
                lo = mid + 1;
            } else {
                hi = mid - 1;
            }
        }
        if (found < 0) {
            return -1;
        }
        long s0 = t.x0()[found];
        long s1 = t.x1()[found];
        double first = t.min()[found];
        double lastStart = t.last()[found];
        if (s1 <= s0 || iter >= lastStart || !(lastStart > first)) {
            return iter >= lastStart ? s1 : s0;
        }
        long s = s0 + (long) Math.floor((iter - first) / (lastStart - first) * (s1 - s0));
        return Math.max(s0, Math.min(s1 - 1, s));
    }

    boolean unsteady() {
        return !peaks.isEmpty();
    }
}
