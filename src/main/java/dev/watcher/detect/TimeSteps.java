package dev.watcher.detect;

import dev.watcher.model.IterationRecord;
import dev.watcher.model.Samples;
import java.util.Arrays;
import java.util.LinkedHashMap;
import java.util.Map;

/**
 * Splits an unsteady run's records into time steps and summarises each finished step: the residuals at its
 * first inner iteration (the peak), at its last (the floor), and the monitors at its last inner iteration.
 * Step boundaries come, in this order of preference, from the record's step field, from the reset of its
 * inner counter, or from the jump pattern: a record whose residuals rise by more than {@code jumpDecades}
 * (median over the equations, on log10) above the previous record's. Jump-based steps count as a time
 * stepping only once the last {@link #REGULAR_STEPS} step lengths are regular (spread at most a quarter of
 * their median, or one record), so a steady run with an occasional bump is not taken for an unsteady one.
 *
 * <p>A step is reported when the first record of the next step arrives. Cost per record: O(1) plus, for logs
 * without step or inner fields, one multiplication and comparison per residual for the jump test (the
 * logarithms are taken only in the rare case that half of the equations jump and half do not); no allocation
 * while the residual names stay the same list. A step's peak and floor are the records' own value arrays,
 * not copies. Memory: one step's values.
 *
 * <p>One instance per consumer, or one instance {@link #shared shared} by several consumers that feed it
 * the same records in the same order: a shared splitter handles each record once and hands the same step to
 * every consumer that passes that record. Not thread-safe.
 */
final class TimeSteps {

    /** How many regular jump-delimited steps make a time stepping. */
    static final int REGULAR_STEPS = 4;

    private static final int NONE = 0;
    private static final int STEP = 1;
    private static final int INNER = 2;
    private static final int JUMP = 3;
    private static final String[] BASIS = {"none", "step", "inner", "jump"};

    /**
     * One finished time step: its peak (the residuals at the first inner iteration), floor (the residuals at
     * the last; a name missing from the last record keeps its latest value in the step) and monitors (at the
     * last inner iteration). The {@code Samples} views are the records' own values; the map views are built
     * on first use. Immutable.
     */
    static final class Step {
        private final long index;
        private final long firstIter;
        private final long lastIter;
        private final int records;
        private final double time;
        private final Samples peaks;
        private final Samples floors;
        private final Samples monitorValues;
        private Map<String, Double> peakMap;
        private Map<String, Double> floorMap;
        private Map<String, Double> monitorMap;

        Step(long index, long firstIter, long lastIter, int records, double time, Samples peaks, Samples floors,
                Samples monitorValues) {
            this.index = index;
            this.firstIter = firstIter;
            this.lastIter = lastIter;
            this.records = records;
            this.time = time;
            this.peaks = peaks;
            this.floors = floors;
            this.monitorValues = monitorValues;
        }

        long index() {
            return index;
        }

        long firstIter() {
            return firstIter;
        }

        long lastIter() {
            return lastIter;
        }

        /** Records (inner iterations) in the step. */
        int records() {
            return records;
        }

        /** Physical time of the step's last record, or NaN. */
        double time() {
            return time;
        }

        /** Residuals at the step's first inner iteration, in the log's order. */
        Samples peaks() {
            return peaks;
        }

        /** Residuals at the step's last inner iteration, in first-seen order. */
        Samples floors() {
            return floors;
        }

        /** Monitors at the step's last inner iteration. */
        Samples monitorValues() {
            return monitorValues;
        }

        /** {@link #peaks()} as a name-to-value map. */
        Map<String, Double> peak() {
            if (peakMap == null) {
                peakMap = peaks.toMap();
            }
            return peakMap;
        }

        /** {@link #floors()} as a name-to-value map. */
        Map<String, Double> floor() {
            if (floorMap == null) {
                floorMap = floors.toMap();
            }
            return floorMap;
        }

        /** {@link #monitorValues()} as a name-to-value map. */
        Map<String, Double> monitors() {
            if (monitorMap == null) {
                monitorMap = monitorValues.toMap();
            }
            return monitorMap;
        }

        @Override
        public String toString() {
            return "Step[" + index + ", iter " + firstIter + ".." + lastIter + ", peak " + peaks + ", floor " + floors
                    + "]";
        }
    }

    private final double jumpDecades;
    // a record jumps past the previous one in an equation when b > a * jumpRatio, i.e. log10(b / a) > jumpDecades
    private final double jumpRatio;
    private final boolean shared;
    private int segment;
    private int basis = NONE;
    private long count;
    private final int[] lengths = new int[REGULAR_STEPS];
    private int lengthCount;
    private boolean regular;

    // the step in progress
    private boolean open;
    private long stepIndex = -1;
    private long firstIter;
    private int records;
    private Samples first;
    // the step's latest record (null before the first): its residuals, monitors, iteration, inner counter and
    // time; one reference kept per record
    private IterationRecord last;
    // only when the residual names change within a step: peak = first value per name, floor = latest value
    private Map<String, Double> peakMerged;
    private Map<String, Double> floorMerged;

    private double[] diffs = new double[8];

    // a shared splitter hands the step that its latest record finished to every consumer passing that record
    private Step lastDone;

    TimeSteps(double jumpDecades) {
        this(jumpDecades, false);
    }

    private TimeSteps(double jumpDecades, boolean shared) {
        this.jumpDecades = jumpDecades;
        this.jumpRatio = Math.pow(10, jumpDecades);
        this.shared = shared;
    }

    /**
     * A splitter for several consumers of one run's records (each passes every record, in order, and calls
     * {@link #segment(int)} at segment starts): the work per record is done once.
     */
    static TimeSteps shared(double jumpDecades) {
        return new TimeSteps(jumpDecades, true);
    }

    double jumpDecades() {
        return jumpDecades;
    }

    /** Forgets the step in progress (a new segment). */
    void reset() {
        open = false;
        first = null;
        last = null;
        peakMerged = null;
        floorMerged = null;
        stepIndex = -1;
        lengthCount = 0;
        regular = false;
        lastDone = null;
        if (basis == JUMP) {
            basis = NONE;
        }
    }

    /** Starts segment {@code s} (a {@link #reset}) unless it is the segment in progress: safe to call once per consumer. */
    void segment(int s) {
        if (s != segment) {
            segment = s;
            reset();
        }
    }

    /** True when the run is split into time steps: from the log's fields, or from a regular jump pattern. */
    boolean unsteady() {
        return basis == STEP || basis == INNER || (basis == JUMP && regular);
    }

    /** Where the boundaries come from: {@code step}, {@code inner}, {@code jump} or {@code none}. */
    String basis() {
        return BASIS[basis];
    }

    /** Steps finished so far. */
    long count() {
        return count;
    }

    /** Feeds one record; returns the step this record finished (the one before it), or null. */
    Step accept(IterationRecord r) {
        if (shared && r == last) {
            return lastDone;
        }
        Samples s = r.residuals();
        boolean boundary;
        if (r.hasStep()) {
            basis = STEP;
            boundary = open && r.step() != stepIndex;
        } else if (r.hasInner()) {
            basis = INNER;
            boundary = open && r.inner() <= last.inner();
        } else {
            // an infinite jump threshold never splits: skip the test
            boundary = open && jumpRatio != Double.POSITIVE_INFINITY && jumped(last.residuals(), s);
            if (boundary) {
                basis = JUMP;
            }
        }
        Step done = null;
        if (boundary) {
            done = finish();
            if (!r.hasStep() && !r.hasInner()) {
                System.arraycopy(lengths, 1, lengths, 0, REGULAR_STEPS - 1);
                lengths[REGULAR_STEPS - 1] = records;
                lengthCount++;
                regular = regular();
            }
        }
        if (!open) {
            open = true;
            stepIndex = r.hasStep() ? r.step() : stepIndex + 1;
            firstIter = r.iter();
            records = 0;
            first = s;
        } else if (peakMerged != null || !sameNames(last.residuals(), s)) {
            merge(last.residuals(), s);
        }
        last = r;
        records++;
        if (shared) {
            lastDone = done;
        }
        return done;
    }

    /** Closes the step in progress and summarises it. */
    private Step finish() {
        Samples peaks = first;
        Samples floors = last.residuals();
        if (peakMerged != null) {
            for (int i = 0; i < floors.size(); i++) {
                floorMerged.put(floors.name(i), floors.value(i));
            }
            peaks = Samples.of(peakMerged);
            floors = Samples.of(floorMerged);
            peakMerged = null;
            floorMerged = null;
        }
        open = false;
        count++;
        return new Step(stepIndex, firstIter, last.iter(), records, last.time(), peaks, floors, last.monitors());
    }

    /**
     * The residual names changed within the step: from now on the peak keeps the first value seen per name
     * and the floor the latest, in first-seen order.
     */
    private void merge(Samples before, Samples s) {
        if (peakMerged == null) {
            peakMerged = new LinkedHashMap<>();
            floorMerged = new LinkedHashMap<>();
            for (int i = 0; i < first.size(); i++) {
                peakMerged.put(first.name(i), first.value(i));
            }
        }
        // the floor so far: the previous record's values
        for (int i = 0; i < before.size(); i++) {
            floorMerged.put(before.name(i), before.value(i));
        }
        for (int i = 0; i < s.size(); i++) {
            peakMerged.putIfAbsent(s.name(i), s.value(i));
        }
    }

    private boolean regular() {
        if (lengthCount < REGULAR_STEPS) {
            return false;
        }
        int[] l = lengths.clone();
        Arrays.sort(l);
        double median = 0.5 * (l[(REGULAR_STEPS - 1) / 2] + l[REGULAR_STEPS / 2]);
        return l[0] >= 2 && l[REGULAR_STEPS - 1] - l[0] <= Math.max(1, 0.25 * median);
    }

    /** The same names in the same order (usually the very same list). */
    private static boolean sameNames(Samples a, Samples b) {
        return a.names() == b.names() || a.names().equals(b.names());
    }

    private static boolean usable(double v) {
        return v > 0 && v < Double.POSITIVE_INFINITY;
    }

    /**
     * True when the median over the equations of log10(now / before) exceeds {@code jumpDecades} (equations
     * with a non-positive or non-finite value on either side left out). Counting the equations that jump
     * decides it without logarithms unless exactly half of an even number jump.
     */
    private boolean jumped(Samples before, Samples now) {
        if (before == null || now.isEmpty()) {
            return false;
        }
        if (sameNames(before, now)) {
            double[] a = before.values();
            double[] b = now.values();
            int k = 0;
            int up = 0;
            for (int i = 0; i < b.length; i++) {
                double x = a[i];
                double y = b[i];
                if (usable(x) && usable(y)) {
                    k++;
                    if (y > x * jumpRatio) {
                        up++;
                    }
                }
            }
            if (k == 0 || 2 * up < k) {
                return false;
            }
            if (2 * up > k) {
                return true;
            }
        }
        return medianJump(before, now);
    }

    /** The median of the log10 ratios, computed: names that differ, or a tie between jumping and not. */
    private boolean medianJump(Samples before, Samples now) {
        int n = now.size();
        if (diffs.length < n) {
            diffs = new double[n];
        }
        boolean aligned = sameNames(before, now);
        double[] d = diffs;
        int k = 0;
        for (int i = 0; i < n; i++) {
            double b = now.value(i);
            double a = aligned ? before.value(i) : before.get(now.name(i), Double.NaN);
            if (usable(a) && usable(b)) {
                d[k++] = Math.log10(b) - Math.log10(a);
            }
        }
        if (k == 0) {
            return false;
        }
        Arrays.sort(d, 0, k);
        double median = (k & 1) == 1 ? d[k / 2] : 0.5 * (d[k / 2 - 1] + d[k / 2]);
        return median > jumpDecades;
    }
}
