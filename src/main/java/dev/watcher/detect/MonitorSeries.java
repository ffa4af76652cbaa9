package dev.watcher.detect;

import dev.watcher.detect.stats.RollingWindow;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.Samples;
import java.util.LinkedHashMap;
import java.util.Map;
import java.util.Set;

/**
 * The recent samples of every monitor of a run, one window per monitor. In a steady run every record gives a
 * sample; in an unsteady run (records with a step field or an inner counter) only each time step's last inner
 * iteration does, so that monitors are judged on converged step values and not on the inner iterations'
 * excursions. Non-finite values are skipped. Memory: two windows of {@code capacity} per monitor.
 */
final class MonitorSeries {

    private final int capacity;
    private final TimeSteps steps = new TimeSteps(Double.POSITIVE_INFINITY);
    private final Map<String, RollingWindow> values = new LinkedHashMap<>();
    private final Map<String, RollingWindow> iters = new LinkedHashMap<>();
    private final Map<String, RollingWindow> times = new LinkedHashMap<>();
    private boolean unsteady;

    MonitorSeries(int capacity) {
        this.capacity = capacity;
    }

    /** Feeds a record; returns true when it added samples (always in steady runs, at step ends otherwise). */
    boolean accept(IterationRecord r) {
        if (r.hasStep() || r.hasInner()) {
            unsteady = true;
            TimeSteps.Step s = steps.accept(r);
            if (s == null) {
                return false;
            }
            s.monitors().forEach((name, v) -> add(name, v, s.lastIter(), s.time()));
            return !s.monitors().isEmpty();
        }
        Samples m = r.monitors();
        for (int i = 0; i < m.size(); i++) {
            add(m.name(i), m.value(i), r.iter(), r.time());
        }
        return !m.isEmpty();
    }

    private void add(String name, double v, long iter, double time) {
        if (!Double.isFinite(v)) {
            return;
        }
        values.computeIfAbsent(name, k -> new RollingWindow(capacity)).add(v);
        iters.computeIfAbsent(name, k -> new RollingWindow(capacity)).add(iter);
        times.computeIfAbsent(name, k -> new RollingWindow(capacity)).add(time);
    }

    /** Forgets every sample (a new segment). */
    void reset() {
        values.clear();
        iters.clear();
        times.clear();
        steps.reset();
    }

    boolean unsteady() {
        return unsteady;
    }

    Set<String> names() {
        return values.keySet();
    }

    int size(String name) {
        RollingWindow w = values.get(name);
        return w == null ? 0 : w.size();
    }

    /** The samples of a monitor, oldest first (a fresh array). */
    double[] values(String name) {
        return values.get(name).toArray();
    }

    /** Iterations per sample over the window (1 in a steady run logging every iteration). */
    double iterationsPerSample(String name) {
        RollingWindow w = iters.get(name);
        return w == null || w.size() < 2 ? 1 : (w.last() - w.get(0)) / (w.size() - 1);
    }

    /** Physical time per sample over the window, NaN when the log gives no time. */
    double timePerSample(String name) {
        RollingWindow w = times.get(name);
        return w == null || w.size() < 2 ? Double.NaN : (w.last() - w.get(0)) / (w.size() - 1);
    }

    /** The iteration of the latest sample. */
    long lastIteration(String name) {
        RollingWindow w = iters.get(name);
        return w == null ? -1 : (long) w.last();
    }
}
