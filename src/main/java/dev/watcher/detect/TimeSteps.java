package dev.watcher.detect;

import dev.watcher.model.IterationRecord;
import dev.watcher.model.Samples;
import java.util.Arrays;
import java.util.Collections;
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
 * <p>A step is reported when the first record of the next step arrives. One instance per consumer; not
 * thread-safe; memory is one step's values.
 */
final class TimeSteps {

    /** How many regular jump-delimited steps make a time stepping. */
    static final int REGULAR_STEPS = 4;

    /** One finished time step. Maps are name to value, in the log's order. */
    record Step(long index, long firstIter, long lastIter, int records, double time, Map<String, Double> peak,
            Map<String, Double> floor, Map<String, Double> monitors) {
        Step {
            peak = Collections.unmodifiableMap(peak);
            floor = Collections.unmodifiableMap(floor);
            monitors = Collections.unmodifiableMap(monitors);
        }
    }

    private final double jumpDecades;
    private String basis = "none";
    private long stepIndex = -1;
    private long lastInner = IterationRecord.NONE;
    private long firstIter;
    private long lastIter;
    private int records;
    private double time = Double.NaN;
    private Map<String, Double> peak;
    private Map<String, Double> floor;
    private Samples monitors = Samples.EMPTY;
    private Samples previous;
    private long count;
    private final int[] lengths = new int[REGULAR_STEPS];
    private int lengthCount;
    // cost per record: the floor is the latest record's residuals, merged into the map only when the names
    // list changes or the step ends; the peak takes new names only when the names list changes
    private Samples stepLast;
    private java.util.List<String> peakNames;
    // log10 of the previous record's residuals (NaN where not positive and finite), for the jump test
    private Samples logsOf;
    private double[] logs = new double[8];
    private double[] nowLogs = new double[8];
    private double[] diffs = new double[8];

    TimeSteps(double jumpDecades) {
        this.jumpDecades = jumpDecades;
    }

    /** Forgets the step in progress (a new segment). */
    void reset() {
        peak = null;
        previous = null;
        lastInner = IterationRecord.NONE;
        stepIndex = -1;
        lengthCount = 0;
        if ("jump".equals(basis)) {
            basis = "none";
        }
    }

    /** True when the run is split into time steps: from the log's fields, or from a regular jump pattern. */
    boolean unsteady() {
        if ("step".equals(basis) || "inner".equals(basis)) {
            return true;
        }
        if (!"jump".equals(basis) || lengthCount < REGULAR_STEPS) {
            return false;
        }
        int[] l = lengths.clone();
        Arrays.sort(l);
        double median = 0.5 * (l[(REGULAR_STEPS - 1) / 2] + l[REGULAR_STEPS / 2]);
        return l[0] >= 2 && l[REGULAR_STEPS - 1] - l[0] <= Math.max(1, 0.25 * median);
    }

    /** Where the boundaries come from: {@code step}, {@code inner}, {@code jump} or {@code none}. */
    String basis() {
        return basis;
    }

    /** Steps finished so far (since the last reset). */
    long count() {
        return count;
    }

    /** Feeds one record; returns the step this record finished (the one before it), or null. */
    Step accept(IterationRecord r) {
        boolean boundary;
        if (r.hasStep()) {
            basis = "step";
            boundary = peak != null && r.step() != stepIndex;
        } else if (r.hasInner()) {
            basis = "inner";
            boundary = peak != null && r.inner() <= lastInner;
        } else {
            // an infinite jump threshold never splits: skip the test
            boundary = peak != null && jumpDecades != Double.POSITIVE_INFINITY && jumped(previous, r.residuals());
            if (boundary) {
                basis = "jump";
            }
        }
        Step done = null;
        if (boundary) {
            flushFloor();
            done = new Step(stepIndex, firstIter, lastIter, records, time, peak, floor, monitors.toMap());
            count++;
            if (!r.hasStep() && !r.hasInner()) {
                System.arraycopy(lengths, 1, lengths, 0, REGULAR_STEPS - 1);
                lengths[REGULAR_STEPS - 1] = records;
                lengthCount++;
            }
            peak = null;
        }
        if (peak == null) {
            peak = new LinkedHashMap<>();
            floor = new LinkedHashMap<>();
            Samples s = r.residuals();
            for (int i = 0; i < s.size(); i++) {
                peak.put(s.name(i), s.value(i));
            }
            stepIndex = r.hasStep() ? r.step() : stepIndex + 1;
            firstIter = r.iter();
            records = 0;
            stepLast = null;
            peakNames = s.names();
        }
        Samples s = r.residuals();
        if (stepLast != null && stepLast.names() != s.names()) {
            flushFloor();
        }
        stepLast = s;
        if (s.names() != peakNames) {
            for (int i = 0; i < s.size(); i++) {
                peak.putIfAbsent(s.name(i), s.value(i));
            }
            peakNames = s.names();
        }
        monitors = r.monitors();
        lastIter = r.iter();
        lastInner = r.inner();
        time = r.time();
        records++;
        previous = s;
        return done;
    }

    /** Puts the latest record's residuals into the floor map (latest value per name, first-seen order). */
    private void flushFloor() {
        Samples last = stepLast;
        if (last != null) {
            for (int i = 0; i < last.size(); i++) {
                floor.put(last.name(i), last.value(i));
            }
            stepLast = null;
        }
    }

    private boolean jumped(Samples before, Samples now) {
        if (before == null || now.isEmpty()) {
            return false;
        }
        int n = now.size();
        if (nowLogs.length < n) {
            nowLogs = new double[n];
            diffs = new double[n];
        }
        double[] cur = nowLogs;
        for (int i = 0; i < n; i++) {
            double b = now.value(i);
            cur[i] = b > 0 && Double.isFinite(b) ? Math.log10(b) : Double.NaN;
        }
        boolean aligned = before == logsOf && before.names() == now.names();
        double[] d = diffs;
        int k = 0;
        for (int i = 0; i < n; i++) {
            double lb = cur[i];
            if (Double.isNaN(lb)) {
                continue;
            }
            double la;
            if (aligned) {
                la = logs[i];
            } else {
                double a = before.get(now.name(i), Double.NaN);
                la = a > 0 && Double.isFinite(a) ? Math.log10(a) : Double.NaN;
            }
            if (!Double.isNaN(la)) {
                d[k++] = lb - la;
            }
        }
        // keep this record's logs for the next call
        nowLogs = logs.length >= n ? logs : new double[n];
        logs = cur;
        logsOf = now;
        if (k == 0) {
            return false;
        }
        Arrays.sort(d, 0, k);
        double median = (k & 1) == 1 ? d[k / 2] : 0.5 * (d[k / 2 - 1] + d[k / 2]);
        return median > jumpDecades;
    }
}
