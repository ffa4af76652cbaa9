package dev.watcher.history;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.node.ArrayNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.Samples;
import java.io.IOException;
import java.nio.file.AtomicMoveNotSupportedException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.util.Iterator;
import java.util.LinkedHashMap;
import java.util.Map;

/**
 * The bounded history of one run for the morning report and the live view: every residual and monitor as
 * a downsampled {@link Series} over the iteration, and for unsteady runs each residual's per-step peak
 * (first inner iteration) and floor (last inner iteration) over the step index, with each step's first
 * iteration (so that whatever refers to an iteration, a detection, can be placed at its step). Memory and file
 * size are bounded by the bucket capacity, not by the run's length.
 *
 * <p>The step starts are one {@link Series} over the step index whose value is the step's first iteration:
 * a bucket covering steps {@code x0..x1} holds the first iteration of step {@code x0} as its minimum and that
 * of step {@code x1} as its last value (iterations rise with the steps). Saved as {@code step_first_iter};
 * a history saved before it existed has none.
 *
 * <p>Written by the run's thread ({@link #observe}); {@link #save} writes {@code history/RUN.json}
 * atomically; {@link #load} reads it back.
 */
public final class RunHistory {

    /** Buckets per series: enough to show every spike at a report's width. */
    public static final int CAPACITY = 1024;

    private static final ObjectMapper JSON = new ObjectMapper();

    private final String run;
    private final Path dir;
    private final Map<String, Series> residuals = new LinkedHashMap<>();
    private final Map<String, Series> monitors = new LinkedHashMap<>();
    private final Map<String, Series> peaks = new LinkedHashMap<>();
    private final Map<String, Series> floors = new LinkedHashMap<>();
    private Series stepStarts = new Series(CAPACITY);
    private long step = IterationRecord.NONE;
    private long lastIter;
    private double[] stepLast;
    private java.util.List<String> stepNames;
    // series of the last names list seen: records usually share one list per header
    private java.util.List<String> resNames;
    private Series[] resSeries;
    private java.util.List<String> monNames;
    private Series[] monSeries;

    private static Series[] lookup(Map<String, Series> group, java.util.List<String> names) {
        Series[] out = new Series[names.size()];
        for (int i = 0; i < out.length; i++) {
            out[i] = group.computeIfAbsent(names.get(i), k -> new Series(CAPACITY));
        }
        return out;
    }

    public RunHistory(String run, Path dir) {
        this.run = run;
        this.dir = dir;
    }

    public String run() {
        return run;
    }

    public void observe(IterationRecord r) {
        lastIter = r.iter();
        Samples res = r.residuals();
        if (res.names() != resNames) {
            resNames = res.names();
            resSeries = lookup(residuals, resNames);
        }
        for (int i = 0; i < res.size(); i++) {
            resSeries[i].add(r.iter(), res.value(i));
        }
        Samples mon = r.monitors();
        if (mon.names() != monNames) {
            monNames = mon.names();
            monSeries = lookup(monitors, monNames);
        }
        for (int i = 0; i < mon.size(); i++) {
            monSeries[i].add(r.iter(), mon.value(i));
        }
        if (r.hasStep()) {
            if (r.step() != step) {
                closeStep();
                step = r.step();
                stepStarts.add(step, r.iter());
                for (int i = 0; i < res.size(); i++) {
                    peaks.computeIfAbsent(res.name(i), k -> new Series(CAPACITY)).add(step, res.value(i));
                }
            }
            stepNames = res.names();
            stepLast = res.values();
        }
    }

    private void closeStep() {
        if (stepLast != null && step != IterationRecord.NONE) {
            for (int i = 0; i < stepLast.length; i++) {
                floors.computeIfAbsent(stepNames.get(i), k -> new Series(CAPACITY)).add(step, stepLast[i]);
            }
        }
        stepLast = null;
    }

    public Map<String, Series> residuals() {
        return residuals;
    }

    public Map<String, Series> monitors() {
        return monitors;
    }

    public Map<String, Series> peaks() {
        return peaks;
    }

    public Map<String, Series> floors() {
        return floors;
    }

    /** Each time step's first iteration over the step index (empty for a steady run). */
    public Series stepStarts() {
        return stepStarts;
    }

    public long lastIter() {
        return lastIter;
    }

    /** Writes the history to {@code dir/RUN.json} (atomically). */
    public void save() throws IOException {
        Files.createDirectories(dir);
        ObjectNode root = JSON.createObjectNode();
        root.put("run", run);
        root.put("last_iter", lastIter);
        root.put("capacity", CAPACITY);
        root.set("residuals", groupNode(residuals));
        root.set("monitors", groupNode(monitors));
        root.set("step_peaks", groupNode(peaks));
        Map<String, Series> fl = new LinkedHashMap<>(floors);
        if (stepLast != null) {
            // the step in progress: its floor so far
            for (int i = 0; i < stepLast.length; i++) {
                Series s = fl.containsKey(stepNames.get(i)) ? fl.get(stepNames.get(i)).copy() : new Series(CAPACITY);
                s.add(step, stepLast[i]);
                fl.put(stepNames.get(i), s);
            }
        }
        root.set("step_floors", groupNode(fl));
        if (stepStarts.size() > 0) {
            root.set("step_first_iter", seriesNode(JSON.createObjectNode(), stepStarts));
        }
        Path file = dir.resolve(fileName(run));
        Path tmp = dir.resolve(fileName(run) + ".tmp");
        Files.write(tmp, JSON.writeValueAsBytes(root));
        try {
            Files.move(tmp, file, StandardCopyOption.REPLACE_EXISTING, StandardCopyOption.ATOMIC_MOVE);
        } catch (AtomicMoveNotSupportedException e) {
            Files.move(tmp, file, StandardCopyOption.REPLACE_EXISTING);
        }
    }

    public static String fileName(String run) {
        return run.replaceAll("[^A-Za-z0-9._-]", "_") + ".json";
    }

    private static ObjectNode groupNode(Map<String, Series> group) {
        ObjectNode g = JSON.createObjectNode();
        group.forEach((name, s) -> seriesNode(g.putObject(name), s));
        return g;
    }

    private static ObjectNode seriesNode(ObjectNode n, Series s) {
        n.put("width", s.width());
        n.put("count", s.count());
        ArrayNode x0 = n.putArray("x0");
        ArrayNode x1 = n.putArray("x1");
        ArrayNode mn = n.putArray("min");
        ArrayNode mx = n.putArray("max");
        ArrayNode la = n.putArray("last");
        for (int i = 0; i < s.size(); i++) {
            x0.add(s.x0(i));
            x1.add(s.x1(i));
            num(mn, s.min(i));
            num(mx, s.max(i));
            num(la, s.last(i));
        }
        return n;
    }

    private static void num(ArrayNode a, double v) {
        if (Double.isFinite(v)) {
            a.add(v);
        } else {
            a.add(Double.isNaN(v) ? "NaN" : v > 0 ? "Infinity" : "-Infinity");
        }
    }

    /** Reads a saved history. */
    public static RunHistory load(Path file) throws IOException {
        JsonNode root = JSON.readTree(file.toFile());
        RunHistory h = new RunHistory(root.path("run").asText(), file.getParent());
        h.lastIter = root.path("last_iter").asLong();
        int cap = root.path("capacity").asInt(CAPACITY);
        readGroup(root.path("residuals"), h.residuals, cap);
        readGroup(root.path("monitors"), h.monitors, cap);
        readGroup(root.path("step_peaks"), h.peaks, cap);
        readGroup(root.path("step_floors"), h.floors, cap);
        if (root.path("step_first_iter").isObject()) {
            h.stepStarts = readSeries(root.path("step_first_iter"), cap);
        }
        return h;
    }

    private static void readGroup(JsonNode g, Map<String, Series> into, int cap) {
        for (Iterator<Map.Entry<String, JsonNode>> it = g.fields(); it.hasNext();) {
            Map.Entry<String, JsonNode> e = it.next();
            into.put(e.getKey(), readSeries(e.getValue(), cap));
        }
    }

    private static Series readSeries(JsonNode n, int cap) {
        int size = n.path("x0").size();
        long[] x0 = new long[size];
        long[] x1 = new long[size];
        double[] mn = new double[size];
        double[] mx = new double[size];
        double[] la = new double[size];
        for (int i = 0; i < size; i++) {
            x0[i] = n.path("x0").get(i).asLong();
            x1[i] = n.path("x1").get(i).asLong();
            mn[i] = val(n.path("min").get(i));
            mx[i] = val(n.path("max").get(i));
            la[i] = val(n.path("last").get(i));
        }
        return Series.restore(cap, n.path("width").asLong(1), n.path("count").asLong(), x0, x1, mn, mx, la);
    }

    private static double val(JsonNode n) {
        if (n.isNumber()) {
            return n.asDouble();
        }
        return switch (n.asText()) {
            case "Infinity" -> Double.POSITIVE_INFINITY;
            case "-Infinity" -> Double.NEGATIVE_INFINITY;
            default -> Double.NaN;
        };
    }
}
