package dev.watcher.detect;

import dev.watcher.model.IterationRecord;
import dev.watcher.model.Samples;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;

/**
 * The recent samples of every monitor of a run, one window per monitor. In a steady run every record gives a
 * sample; in an unsteady run (records with a step field or an inner counter) only each time step's last inner
 * iteration does, so that monitors are judged on converged step values and not on the inner iterations'
 * excursions. Non-finite values are skipped.
 *
 * <p>Cost per record: O(1) per monitor, without hashing in steady runs (the per-monitor tracks are cached by
 * the identity of the record's names list, see {@link PerName}); a monitor becomes {@linkplain #due() due}
 * every {@code every} samples (more often while its window fills), which is when its owner judges it.
 * Memory: three windows of {@code capacity} per monitor (values, iterations, times).
 */
final class MonitorSeries {

    /** One monitor's window: three parallel rings (value, iteration, time) sharing one index. */
    static final class Track {
        private final String name;
        private final double[] values;
        private final long[] iters;
        private final double[] times;
        private int next;
        private int size;
        private long count;
        private int pending;
        private boolean fullPace;

        private Track(String name, int capacity) {
            this.name = name;
            this.values = new double[capacity];
            this.iters = new long[capacity];
            this.times = new double[capacity];
        }

        private void add(double v, long iter, double time) {
            values[next] = v;
            iters[next] = iter;
            times[next] = time;
            next = next + 1 == values.length ? 0 : next + 1;
            if (size < values.length) {
                size++;
            }
            count++;
        }

        /** Ring index of the i-th sample in the window, 0 = oldest. */
        private int at(int i) {
            int j = next - size + i;
            return j < 0 ? j + values.length : j;
        }

        String name() {
            return name;
        }

        /**
         * With {@code true}, the track is due every {@code every} samples even while its window fills (for an
         * open condition: how long a failing verdict must persist before it clears is then counted in full
         * intervals, not in checks that come closer together while the window is short).
         */
        void fullPace(boolean full) {
            fullPace = full;
        }

        /** Samples in the window. */
        int size() {
            return size;
        }

        /** Samples taken since the segment began (the window holds the latest {@link #size()} of them). */
        long count() {
            return count;
        }

        /** Copies the window's values, oldest first, into {@code dst} (at least {@link #size()} long). */
        int copyValues(double[] dst) {
            int first = at(0);
            int head = Math.min(size, values.length - first);
            System.arraycopy(values, first, dst, 0, head);
            System.arraycopy(values, 0, dst, head, size - head);
            return size;
        }

        /** Iterations per sample over the window (1 in a steady run logging every iteration). */
        double iterationsPerSample() {
            return size < 2 ? 1 : (double) (iters[at(size - 1)] - iters[at(0)]) / (size - 1);
        }

        /** Physical time per sample over the window, NaN when the log gives no time. */
        double timePerSample() {
            return size < 2 ? Double.NaN : (times[at(size - 1)] - times[at(0)]) / (size - 1);
        }

        /** The iteration of the latest sample. */
        long lastIteration() {
            return size == 0 ? -1 : iters[at(size - 1)];
        }
    }

    private final int capacity;
    private final int every;
    private final TimeSteps steps = new TimeSteps(Double.POSITIVE_INFINITY);
    private final PerName<Track> tracks;
    private final Map<String, Track> sampled = new LinkedHashMap<>();
    private final List<Track> due = new ArrayList<>();
    private boolean unsteady;

    /** Windows of {@code capacity} samples; nothing is ever due (the owner judges when it likes). */
    MonitorSeries(int capacity) {
        this(capacity, Integer.MAX_VALUE);
    }

    /**
     * Windows of {@code capacity} samples; a monitor is due after every {@code every} samples it takes once its
     * window is full, and proportionally more often while it fills (every {@code every * size / capacity}
     * samples, at least one; see {@link Track#fullPace}), so that the judgement, which costs O(size), keeps
     * the same cost per sample and a short run is judged as often, relative to its length, as a long one.
     */
    MonitorSeries(int capacity, int every) {
        this.capacity = capacity;
        this.every = Math.max(1, every);
        this.tracks = new PerName<>(name -> new Track(name, this.capacity));
    }

    /**
     * Feeds a record; returns true when it added samples (in steady runs whenever a monitor value is finite,
     * in unsteady runs at step ends). The monitors due for a judgement after this record are in {@link #due()}.
     */
    boolean accept(IterationRecord r) {
        if (!due.isEmpty()) {
            due.clear();
        }
        if (r.hasStep() || r.hasInner()) {
            unsteady = true;
            TimeSteps.Step s = steps.accept(r);
            return s != null && addAll(s.monitorValues(), s.lastIter(), s.time());
        }
        return addAll(r.monitors(), r.iter(), r.time());
    }

    private boolean addAll(Samples m, long iter, double time) {
        if (m.isEmpty()) {
            return false;
        }
        List<Track> slots = tracks.slots(m.names());
        boolean added = false;
        for (int i = 0; i < slots.size(); i++) {
            added |= add(slots.get(i), m.value(i), iter, time);
        }
        return added;
    }

    private boolean add(Track t, double v, long iter, double time) {
        if (!Double.isFinite(v)) {
            return false;
        }
        if (t.count == 0) {
            sampled.put(t.name, t);
        }
        t.add(v, iter, time);
        // while the window fills, it is judged proportionally more often: the judgement costs O(size)
        if (++t.pending >= (t.fullPace ? every : Math.max(1, (int) ((long) every * t.size / capacity)))) {
            t.pending = 0;
            due.add(t);
        }
        return true;
    }

    /** The monitors that became due with the latest record (a list reused from record to record). */
    List<Track> due() {
        return due;
    }

    /** Forgets every sample (a new segment). */
    void reset() {
        tracks.clear();
        sampled.clear();
        due.clear();
        steps.reset();
    }

    boolean unsteady() {
        return unsteady;
    }

    /** The monitors with at least one sample in this segment, in the order they first gave one. */
    Set<String> names() {
        return sampled.keySet();
    }

    /** The samples of a monitor, oldest first (a fresh array). */
    double[] values(String name) {
        Track t = sampled.get(name);
        double[] x = new double[t.size()];
        t.copyValues(x);
        return x;
    }

    /** Iterations per sample over the window (1 in a steady run logging every iteration). */
    double iterationsPerSample(String name) {
        Track t = sampled.get(name);
        return t == null ? 1 : t.iterationsPerSample();
    }
}
