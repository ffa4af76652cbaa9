package dev.watcher.detect;

import dev.watcher.detect.stats.Cusum;
import dev.watcher.detect.stats.MannKendall;
import dev.watcher.detect.stats.RollingWindow;
import dev.watcher.detect.stats.TheilSen;

/**
 * The cheap per-equation state behind the rise detectors ({@code single-equation-blowup},
 * {@code family-divergence}), on log10 r (METHODS.md, blow-up onset):
 * <ul>
 * <li>every record, O(1): a one-sided CUSUM (Page 1954) on first differences standardized by a noise scale from
 *     the running mean absolute second difference (floored at {@code minScale}; a steady trend does not
 *     inflate it); an exponentially smoothed level (weight 0.3) and its
 *     minimum since the segment's warm-up; the position of the raw minimum;</li>
 * <li>{@link #candidate}: the CUSUM has signalled and the smoothed level is {@code minRise} above its minimum;</li>
 * <li>{@link #late}: on demand, the Theil–Sen fit and a one-sided Mann–Kendall test (exact up to 10 points,
 *     Hamed–Rao corrected above) of the values since the raw minimum (the late phase of a two-phase split at
 *     the minimum), at most {@code window} values.</li>
 * </ul>
 * The first {@code warmup} records of a segment set no minimum, so start-up transients and the jump after a
 * restart are not taken for a rise. Not thread-safe.
 */
final class RiseTracker {
    private static final double SMOOTH = 0.3;
    private static final double SCALE_WEIGHT = 0.05;
    /**
     * For white noise of standard deviation s, first differences have standard deviation s sqrt 2 and second
     * differences a mean absolute value s sqrt 6 sqrt(2/pi); their ratio, 0.7236, turns the mean absolute
     * second difference into the noise scale of the first differences. Second differences ignore a steady
     * trend, so a smooth rise is measured against the noise, not against itself.
     */
    private static final double SECOND_TO_FIRST = 0.7236;
    static final int MIN_LATE = 6;

    final String name;
    final String family;
    private final int warmup;
    private final double minScale;
    private final RollingWindow iters;
    private final RollingWindow logs;
    private final Cusum cusum;
    long count;
    double last = Double.NaN;
    double smooth;
    private double scale;
    private double lastD;
    double minSmooth = Double.POSITIVE_INFINITY;
    double minRaw = Double.POSITIVE_INFINITY;
    private long minAt;
    /** Highest smoothed level before the minimum was reached (to tell a turn from falling to rising). */
    double maxBeforeMin = Double.NEGATIVE_INFINITY;
    private double maxSoFar = Double.NEGATIVE_INFINITY;
    long lastEval = Long.MIN_VALUE / 2;

    RiseTracker(String name, int window, int warmup, double cusumK, double cusumH, double minScale) {
        this.name = name;
        this.family = EquationFamilies.familyOf(name);
        this.warmup = warmup;
        this.minScale = minScale;
        iters = new RollingWindow(window);
        logs = new RollingWindow(window);
        cusum = new Cusum(cusumK, cusumH, 0);
    }

    void add(long iter, double y) {
        count++;
        if (count == 1) {
            smooth = y;
        } else {
            double d = y - last;
            cusum.add(d / Math.max(scale, minScale));
            if (count >= 3) {
                double dd = SECOND_TO_FIRST * Math.abs(d - lastD);
                scale = count == 3 ? dd : scale + SCALE_WEIGHT * (dd - scale);
            }
            lastD = d;
            smooth += SMOOTH * (y - smooth);
        }
        last = y;
        iters.add(iter);
        logs.add(y);
        if (count > warmup) {
            maxSoFar = Math.max(maxSoFar, smooth);
            if (smooth < minSmooth) {
                minSmooth = smooth;
                maxBeforeMin = maxSoFar;
            }
            if (y <= minRaw) {
                minRaw = y;
                minAt = count;
            }
        }
    }

    boolean warm() {
        return count > warmup;
    }

    double rise() {
        return smooth - minSmooth;
    }

    double cusum() {
        return cusum.value();
    }

    boolean cusumSignalled() {
        return cusum.signalled();
    }

    boolean candidate(double minRise) {
        return count > warmup && cusum.signalled() && rise() >= minRise;
    }

    /** How far the smoothed level fell before the minimum (0 when it never fell after the warm-up). */
    double fall() {
        return Double.isFinite(maxBeforeMin) ? Math.max(0, maxBeforeMin - minSmooth) : 0;
    }

    /** The late phase: values since the raw minimum (at most the window); null when fewer than MIN_LATE. */
    Late late(double[] xs, double[] ys) {
        int n = iters.copyTo(xs);
        logs.copyTo(ys);
        int since = (int) Math.min(n, count - minAt + 1);
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
        minSmooth = Double.POSITIVE_INFINITY;
        minRaw = Double.POSITIVE_INFINITY;
        maxBeforeMin = Double.NEGATIVE_INFINITY;
        maxSoFar = Double.NEGATIVE_INFINITY;
        lastEval = Long.MIN_VALUE / 2;
    }
}
