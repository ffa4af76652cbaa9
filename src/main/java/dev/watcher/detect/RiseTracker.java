package dev.watcher.detect;

import dev.watcher.detect.stats.Cusum;
import dev.watcher.detect.stats.MannKendall;
import dev.watcher.detect.stats.RollingWindow;
import dev.watcher.detect.stats.TheilSen;

/**
 * The cheap per-equation state behind the rise detectors ({@code single-equation-blowup},
 * {@code family-divergence}), on log10 r (METHODS.md, blow-up onset):
 * <ul>
 * <li>every record, O(1) amortised: a one-sided CUSUM (Page 1954) on first differences standardized by a
 *     noise scale from the running mean absolute second difference (floored at {@code minScale}; a steady
 *     trend does not inflate it); an exponentially smoothed level (weight 0.3) and its minimum over the last
 *     {@code baselineWindow} records after the segment's warm-up (a sliding-window minimum: the baseline of a
 *     noisy series must be recent, or its ever lower extremes make every wander look like a rise); how much
 *     log10 r wanders around the forecast of Holt's linear smoothing (level 0.05, trend 0.02: a steady
 *     convergence rate is not wandering), learnt after the warm-up and frozen while the CUSUM signals;</li>
 * <li>{@link #candidate}: the CUSUM has signalled and the smoothed level is {@link #required} above the
 *     baseline minimum ({@code minRise} plus {@code riseNoise} standard deviations of the wandering);</li>
 * <li>{@link #late}: on demand, the Theil–Sen fit and a one-sided Mann–Kendall test (exact up to 10 points,
 *     Hamed–Rao corrected above) of the values since the baseline minimum (the late phase of a two-phase
 *     split at the minimum), at most {@code window} values.</li>
 * </ul>
 * The first {@code warmup} records of a segment set no baseline, so start-up transients and the jump after a
 * restart are not taken for a rise. Not thread-safe.
 */
final class RiseTracker {
    private static final double SMOOTH = 0.3;
    private static final double HOLT_LEVEL = 0.05;
    private static final double HOLT_TREND = 0.02;
    private static final double SCALE_WEIGHT = 0.05;
    /**
     * For white noise of standard deviation s, first differences have standard deviation s sqrt 2 and second
     * differences a mean absolute value s sqrt 6 sqrt(2/pi); their ratio, 0.7236, turns the mean absolute
     * second difference into the noise scale of the first differences.
     */
    private static final double SECOND_TO_FIRST = 0.7236;
    static final int MIN_LATE = 6;

    final String name;
    final String family;
    private final int warmup;
    private final double minScale;
    private final double riseNoise;
    private final RollingWindow iters;
    private final RollingWindow logs;
    private final Cusum cusum;
    // sliding-window minimum of the smoothed level (monotonic deque of values and record counts)
    private final int baselineWindow;
    private final double[] dqVal;
    private final long[] dqAt;
    private int dqHead;
    private int dqSize;
    long count;
    double last = Double.NaN;
    double smooth;
    private double holtLevel;
    private double holtTrend;
    private double wander;
    private double scale;
    private double lastD;
    /** Lowest raw value since the segment's warm-up (evidence only). */
    double minRaw = Double.POSITIVE_INFINITY;
    long lastEval = Long.MIN_VALUE / 2;

    RiseTracker(String name, int window, int baselineWindow, int warmup, double cusumK, double cusumH,
            double minScale, double riseNoise) {
        this.name = name;
        this.family = EquationFamilies.familyOf(name);
        this.warmup = warmup;
        this.minScale = minScale;
        this.riseNoise = riseNoise;
        this.baselineWindow = Math.max(window, baselineWindow);
        iters = new RollingWindow(window);
        logs = new RollingWindow(window);
        cusum = new Cusum(cusumK, cusumH, 0);
        dqVal = new double[this.baselineWindow + 1];
        dqAt = new long[this.baselineWindow + 1];
    }

    void add(long iter, double y) {
        count++;
        if (count == 1) {
            smooth = y;
            holtLevel = y;
            holtTrend = 0;
        } else {
            double d = y - last;
            cusum.add(d / Math.max(scale, minScale));
            if (count >= 3) {
                double dd = SECOND_TO_FIRST * Math.abs(d - lastD);
                scale = count == 3 ? dd : scale + SCALE_WEIGHT * (dd - scale);
            }
            lastD = d;
            smooth += SMOOTH * (y - smooth);
            // Holt's linear smoothing follows a steady trend without lag, so the deviation from its forecast
            // measures how the level wanders, not how fast it converges. The wandering is learnt after the
            // warm-up (not from the start-up transient) and frozen while a rise is under way, so the rise
            // does not raise its own bar.
            double forecast = holtLevel + holtTrend;
            if (count > warmup && !cusum.signalled()) {
                wander += SCALE_WEIGHT * (Math.abs(y - forecast) - wander);
            }
            double level = forecast + HOLT_LEVEL * (y - forecast);
            holtTrend += HOLT_TREND * (level - holtLevel - holtTrend);
            holtLevel = level;
        }
        last = y;
        iters.add(iter);
        logs.add(y);
        if (count > warmup) {
            minRaw = Math.min(minRaw, y);
            while (dqSize > 0 && dqVal[(dqHead + dqSize - 1) % dqVal.length] >= smooth) {
                dqSize--;
            }
            dqVal[(dqHead + dqSize) % dqVal.length] = smooth;
            dqAt[(dqHead + dqSize) % dqVal.length] = count;
            dqSize++;
            while (dqAt[dqHead] <= count - baselineWindow) {
                dqHead = (dqHead + 1) % dqVal.length;
                dqSize--;
            }
        }
    }

    boolean warm() {
        return count > warmup && dqSize > 0;
    }

    /** The baseline: the lowest smoothed level over the last baselineWindow records (+infinity before). */
    double minSmooth() {
        return dqSize == 0 ? Double.POSITIVE_INFINITY : dqVal[dqHead];
    }

    private long minAt() {
        return dqSize == 0 ? count : dqAt[dqHead];
    }

    double rise() {
        return smooth - minSmooth();
    }

    double cusum() {
        return cusum.value();
    }

    boolean cusumSignalled() {
        return cusum.signalled();
    }

    boolean candidate(double minRise) {
        return count > warmup && cusum.signalled() && rise() >= required(minRise);
    }

    /**
     * The rise that counts: {@code minRise} plus {@code riseNoise} standard deviations (1.2533 times the mean
     * absolute deviation) of the wandering around Holt's forecast: {@code minRise} on smooth histories, more
     * on noisy ones.
     */
    double required(double minRise) {
        return minRise + riseNoise * 1.2533 * wander;
    }

    /** How far the raw values fell within the window before the baseline minimum (0 when they did not). */
    double fall(double[] ys) {
        int n = logs.copyTo(ys);
        int since = (int) Math.min(n, count - minAt() + 1);
        double max = Double.NEGATIVE_INFINITY;
        for (int i = 0; i < n - since; i++) {
            max = Math.max(max, ys[i]);
        }
        return Double.isFinite(max) ? Math.max(0, max - minSmooth()) : 0;
    }

    /** The late phase: values since the baseline minimum (at most the window); null when fewer than MIN_LATE. */
    Late late(double[] xs, double[] ys) {
        int n = iters.copyTo(xs);
        logs.copyTo(ys);
        int since = (int) Math.min(n, count - minAt() + 1);
        if (since < MIN_LATE) {
            return null;
        }
        int from = n - since;
        double[] lx = java.util.Arrays.copyOfRange(xs, from, n);
        double[] ly = java.util.Arrays.copyOfRange(ys, from, n);
        TheilSen ts = TheilSen.fit(lx, ly, since, 0.95);
        MannKendall mk = since <= MannKendall.EXACT_MAX_N ? MannKendall.of(ly, since) : MannKendall.hamedRao(ly, since);
        return new Late(ts, mk);
    }

    /** The Theil–Sen fit of the whole window (for resolution after a restart). */
    TheilSen window(double[] xs, double[] ys) {
        int n = iters.copyTo(xs);
        logs.copyTo(ys);
        return TheilSen.fit(xs, ys, n, 0.95);
    }

    int size() {
        return logs.size();
    }

    record Late(TheilSen fit, MannKendall trend) {
    }

    void reset() {
        iters.clear();
        logs.clear();
        cusum.reset();
        count = 0;
        scale = 0;
        lastD = 0;
        wander = 0;
        dqHead = 0;
        dqSize = 0;
        minRaw = Double.POSITIVE_INFINITY;
        lastEval = Long.MIN_VALUE / 2;
    }
}
