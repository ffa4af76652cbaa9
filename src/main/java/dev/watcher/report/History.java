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
 */
record History(String run, long lastIter, Map<String, Track> residuals, Map<String, Track> monitors,
        Map<String, Track> peaks, Map<String, Track> floors) {

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
                group(root.path("step_floors")));
    }

    private static Map<String, Track> group(JsonNode g) {
        Map<String, Track> out = new LinkedHashMap<>();
        for (Iterator<Map.Entry<String, JsonNode>> it = g.fields(); it.hasNext();) {
            Map.Entry<String, JsonNode> e = it.next();
            JsonNode n = e.getValue();
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
            out.put(e.getKey(), new Track(n.path("width").asLong(1), n.path("count").asLong(size), x0, x1, mn, mx,
                    la));
        }
        return out;
    }

    boolean unsteady() {
        return !peaks.isEmpty();
    }
}
