package dev.watcher.detect;

import dev.watcher.detect.stats.BatchMeans;
import dev.watcher.detect.stats.FisherG;
import dev.watcher.detect.stats.GeometricDecay;
import dev.watcher.detect.stats.Mser;
import dev.watcher.detect.stats.Periodogram;
import dev.watcher.detect.stats.TheilSen;

/**
 * Judges one monitor's recent values: settled to a value, or settled into a stable periodic state. Shared by
 * the monitor and convergence detectors, each of which keeps its own samples. Parameters are read once from
 * {@link DetectSettings} with the keys of the {@code monitor-settled} and {@code monitor-periodic} patterns
 * (so that {@code converged} judges monitors exactly as those detectors do). Stateless after construction.
 *
 * <p>Cost: one judgement is O(w) in the window w, plus O(w log w) for the spectral test of a series whose
 * cycles already look stable (see {@link #periodic}); callers judge every k samples, not every record.
 */
final class MonitorJudge {

    /** The reason given while a window holds fewer than {@code min_samples} values: neither for nor against. */
    static final String TOO_FEW = "too few samples";

    /** A verdict on one monitor: does the condition hold, and if not, why. */
    interface Verdict {
        boolean holds();

        String reason();

        /** True when the window is too short to judge: an open condition neither clears nor holds on it. */
        default boolean inconclusive() {
            return TOO_FEW.equals(reason());
        }
    }

    /** Parameters of the settling judgement. */
    record SettleParams(double relativeTolerance, double absoluteTolerance, int minSamples, int batches,
            double confidence) {
        static SettleParams from(DetectSettings s) {
            String p = "monitor-settled.";
            return new SettleParams(s.number(p + "relative_tolerance", 1e-3), s.number(p + "absolute_tolerance", 1e-6),
                    s.integer(p + "min_samples", 100), s.integer(p + "batches", 20), s.number(p + "confidence", 0.95));
        }
    }

    /** Parameters of the periodic judgement. */
    record PeriodicParams(double alpha, double relativeTolerance, int minCycles, int minSamples,
            double absoluteTolerance) {
        static PeriodicParams from(DetectSettings s) {
            String p = "monitor-periodic.";
            return new PeriodicParams(s.number(p + "alpha", 0.01), s.number(p + "relative_tolerance", 0.02),
                    s.integer(p + "min_cycles", 4), s.integer(p + "min_samples", 64),
                    s.number(p + "absolute_tolerance", 1e-6));
        }
    }

    /**
     * The settling verdict.
     *
     * @param settled        true when all criteria hold
     * @param reason         why not (or "settled")
     * @param samples        values judged
     * @param truncation     values cut: by MSER-5, or those before the stretch held (see {@link #settled(double[],
     *                       int, double, int)})
     * @param mean           batch-means grand mean of the kept values
     * @param halfWidth      confidence half-width of that mean, widened for correlated batch means (see
     *                       {@link BatchMeans#effectiveHalfWidth()})
     * @param tolerance      max(relative * |mean|, absolute), times the scale asked for
     * @param drift          Theil–Sen drift across the kept values (slope per batch times the batches); NaN
     *                       when the half-width alone decided
     * @param predicted      predicted final value: the geometric limit when the approach is geometric, else the mean
     * @param remainingError predicted final minus the latest value (0 when no geometric approach is visible)
     * @param geometric      true when a geometric approach was seen and used
     * @param batchCorrelation lag-one autocorrelation of the batch means (NaN when not computed)
     */
    record Settling(boolean settled, String reason, int samples, int truncation, double mean, double halfWidth,
            double tolerance, double drift, double predicted, double remainingError, boolean geometric,
            double batchCorrelation) implements Verdict {
        @Override
        public boolean holds() {
            return settled;
        }
    }

    /**
     * The periodic verdict.
     *
     * @param stable          true when a significant period with stable period, amplitude and cycle mean is seen
     * @param reason          why not (or "stable")
     * @param period          mean period of the judged cycles, in samples
     * @param amplitude       mean half peak-to-peak amplitude of the judged cycles
     * @param cycleMean       mean of the judged cycles' means
     * @param cycles          complete cycles in the window; -1 when not counted (cycles that failed the
     *                        judgement are found from the end of the window back, and only as many as judged)
     * @param periodSpread    (max - min) / mean of the judged periods
     * @param amplitudeSpread (max - min) / mean of the judged amplitudes
     * @param meanSpread      (max - min) of the cycle means over max(|cycle mean|, amplitude)
     * @param g               Fisher's g (NaN when the cycles already failed and the test was not run)
     * @param pValue          its p-value (NaN when not run)
     */
    record Cycles(boolean stable, String reason, double period, double amplitude, double cycleMean, int cycles,
            double periodSpread, double amplitudeSpread, double meanSpread, double g, double pValue)
            implements Verdict {
        @Override
        public boolean holds() {
            return stable;
        }
    }

    private final SettleParams settle;
    private final PeriodicParams periodic;

    MonitorJudge(DetectSettings settings) {
        this.settle = SettleParams.from(settings);
        this.periodic = PeriodicParams.from(settings);
    }

    SettleParams settleParams() {
        return settle;
    }

    PeriodicParams periodicParams() {
        return periodic;
    }

    /**
     * Is {@code x[0..n)} settled? MSER-5 cuts the start-up transient (and a cut in the second half means the
     * transient is not over); the batch-means half-width of the kept values' mean, widened for correlation
     * between the batch means ({@link BatchMeans#effectiveHalfWidth()}: batches shorter than the series'
     * memory, e.g. than a slow oscillation's period, would otherwise understate it), must lie within the
     * tolerance; the Theil–Sen drift across the kept values must too (an equivalence criterion: a
     * significance test would reject a monitor whose approach is monotone yet negligible); when the batch
     * means show a geometric approach, its remaining error must as well; and a stable oscillation larger than
     * the tolerance is periodic, not settled. {@code scale} widens the tolerance (hysteresis for staying
     * settled). Same as {@link #settled(double[], int, double, int)} with MSER placing the cut.
     */
    Settling settled(double[] x, int n, double scale) {
        return settled(x, n, scale, -1);
    }

    /**
     * As {@link #settled(double[], int, double)}, but with {@code heldFrom >= 0} the values judged are
     * {@code x[heldFrom..n)} (keeping at least {@code min_samples}) instead of what MSER-5 keeps: the stretch
     * since a condition opened, for the judgement whether a settled monitor stays settled. MSER's cut on an
     * already settled series is noise (on a slow oscillation it swings between the start and the last quarter
     * of the window from one check to the next), and the start-up transient is behind it by then.
     */
    Settling settled(double[] x, int n, double scale, int heldFrom) {
        if (n < settle.minSamples()) {
            return notSettled(TOO_FEW, n, 0);
        }
        boolean holding = heldFrom >= 0;
        boolean transientOver = true;
        int cut;
        if (holding) {
            cut = Math.max(0, Math.min(heldFrom, n - settle.minSamples()));
        } else {
            Mser mser = Mser.of(x, n);
            transientOver = mser.reliable();
            // a transient MSER cannot place (a smooth, noise-free approach) is judged on the latest quarter of
            // the window (at least min_samples values): settled only if that stays within the tolerance
            cut = transientOver ? mser.truncation() : n - Math.min(n, Math.max(settle.minSamples(), n / 4));
        }
        int kept = n - cut;
        int batches = Math.max(10, Math.min(30, Math.min(settle.batches(), kept / 5)));
        BatchMeans bm = BatchMeans.of(x, cut, kept, batches, settle.confidence());
        if (bm == null || kept < 10 * 5) {
            return notSettled("too few values after the transient", n, cut);
        }
        double mean = bm.mean();
        double halfWidth = bm.effectiveHalfWidth();
        double tol = scale * Math.max(settle.relativeTolerance() * Math.abs(mean), settle.absoluteTolerance());
        // a geometric approach shows as block means whose steps are significant and shrink
        // (the three block means of GeometricDecay.ofBlocks, taken once for both uses)
        int block = kept / 3;
        double m0 = blockMean(x, n - 3 * block, block);
        double m1 = blockMean(x, n - 2 * block, block);
        double m2 = blockMean(x, n - block, block);
        GeometricDecay geo = GeometricDecay.of(m0, m1, m2);
        boolean geometric = false;
        double predicted = mean;
        double remaining = 0;
        if (geo.valid() && geo.lambda() > 0) {
            // the block means move by more than their noise: the scatter of first differences, which a smooth
            // trend hardly touches (the batch-means half-width would be inflated by the trend itself)
            double noise = diffScatter(x, cut, n) / Math.sqrt(block);
            double step = Math.abs(m1 - m0);
            // the steps shrink by more than their noise too (the second difference of three block means has
            // sqrt(3) times the spread of a first difference): a ramp within the noise is a drift, judged as
            // such, not a geometric approach whose extrapolated limit would swing with every check
            double shrink = Math.abs((m2 - m1) - (m1 - m0));
            if (step > 4 * noise && shrink > 4 * Math.sqrt(3) * noise) {
                geometric = true;
                predicted = geo.limit();
                remaining = geo.limit() - x[n - 1];
            }
        }
        // the drift (O(B^2) in the batches) only where the verdict turns on it: an interval already wider than
        // the tolerance decides alone (the drift is then NaN, and left out of the evidence)
        double drift = Double.NaN;
        String reason = "settled";
        if (halfWidth > tol) {
            reason = transientOver ? "confidence interval of the mean wider than the tolerance"
                    : "start-up transient not over";
        } else {
            double[] means = bm.means();
            drift = TheilSen.slope(means, means.length) * means.length;
            if (Math.abs(drift) > tol) {
                reason = transientOver ? "still drifting" : "start-up transient not over";
            } else if (geometric && Math.abs(remaining) > tol) {
                reason = "geometric approach not finished";
            } else {
                Cycles c = periodic(x, n, 1.0);
                if (c.stable() && c.amplitude() > tol) {
                    reason = "oscillating";
                }
            }
        }
        return new Settling("settled".equals(reason), reason, n, cut, mean, halfWidth, tol, drift, predicted,
                remaining, geometric, bm.lagOneCorrelation());
    }

    private static Settling notSettled(String reason, int n, int cut) {
        return new Settling(false, reason, n, cut, Double.NaN, Double.NaN, Double.NaN, Double.NaN, Double.NaN,
                Double.NaN, false, Double.NaN);
    }

    /** Standard deviation of the first differences of x[from..n) over sqrt 2: the noise of one value. */
    private static double diffScatter(double[] x, int from, int n) {
        int m = n - from - 1;
        if (m < 2) {
            return 0;
        }
        double mean = (x[n - 1] - x[from]) / m;
        double ss0 = 0;
        double ss1 = 0;
        int i = from + 1;
        for (; i + 1 < n; i += 2) {
            double d0 = x[i] - x[i - 1] - mean;
            double d1 = x[i + 1] - x[i] - mean;
            ss0 += d0 * d0;
            ss1 += d1 * d1;
        }
        if (i < n) {
            double d = x[i] - x[i - 1] - mean;
            ss0 += d * d;
        }
        return Math.sqrt((ss0 + ss1) / (m - 1) / 2);
    }

    private static double blockMean(double[] x, int from, int len) {
        return sum(x, from, from + len) / len;
    }

    /**
     * x[from] + ... + x[to - 1], in four interleaved partial sums: a single running sum waits on each addition
     * in turn, and these sums over a window are most of a judgement's cost.
     */
    private static double sum(double[] x, int from, int to) {
        double s0 = 0;
        double s1 = 0;
        double s2 = 0;
        double s3 = 0;
        int i = from;
        for (; i + 3 < to; i += 4) {
            s0 += x[i];
            s1 += x[i + 1];
            s2 += x[i + 2];
            s3 += x[i + 3];
        }
        for (; i < to; i++) {
            s0 += x[i];
        }
        return (s0 + s1) + (s2 + s3);
    }

    /**
     * Is {@code x[0..n)} in a stable periodic state? The latest N values (N the largest power of two not above
     * n) are cut into cycles at their up-crossings of the mean (with a dead band of a quarter of the amplitude
     * against noise, crossing points interpolated), and over the last {@code min_cycles} cycles the period,
     * the amplitude (half of max - min) and the cycle mean (the integral of the linear interpolant over the
     * cycle) must each vary by at most the relative tolerance times {@code scale}: period and amplitude
     * relative to their means, the cycle mean relative to max(|mean|, amplitude) so that monitors oscillating
     * about zero are judged too. Cycles that pass must also be a real period: Fisher's g on the periodogram of
     * the same N values must reject white noise at {@code alpha}.
     *
     * <p>The cycles are judged first because that costs O(N) and settles most windows (noise, a drift, too
     * few cycles); the spectral test runs only on cycles that already look stable, and then mostly in O(N)
     * too ({@link Periodogram#fisherNear}). The verdict is the same as testing the spectrum first; only the
     * reason given for a window that fails both is the cycles' one.
     */
    Cycles periodic(double[] x, int n, double scale) {
        if (n < periodic.minSamples()) {
            return noCycles(TOO_FEW, Double.NaN, 1);
        }
        if (n < Periodogram.MIN_LENGTH) {
            return noCycles("no significant period", Double.NaN, 1);
        }
        int len = Integer.highestOneBit(n);
        int from = n - len;
        double level = sum(x, from, n) / len;
        double lo = Double.POSITIVE_INFINITY;
        double hi = Double.NEGATIVE_INFINITY;
        for (int i = from; i < n; i++) {
            double v = x[i];
            if (v < lo) {
                lo = v;
            }
            if (v > hi) {
                hi = v;
            }
        }
        double band = 0.25 * (hi - lo) / 2;
        double below = level - band;
        double above = level + band;
        int k = periodic.minCycles();
        // only the latest k + 1 up-crossings are judged: they are found scanning back from the end, which on a
        // noisy window stops after a few dozen values. An up-crossing is a value below the band whose next value
        // outside the band lies above it; read backwards, a value below the band after (in time) values above.
        double[] cross = new double[k + 1]; // latest first
        int found = 0;
        int firstAbove = -1; // the earliest value above the band after the current index, with none below between
        for (int i = n - 1; i >= from && found <= k; i--) {
            double v = x[i];
            if (v > above) {
                firstAbove = i;
            } else if (v < below) {
                if (firstAbove >= 0) {
                    cross[found++] = crossing(x, i, firstAbove, level);
                }
                firstAbove = -1;
            }
        }
        if (found <= k) {
            // the whole window was scanned: found is the number of up-crossings in it
            return new Cycles(false, "too few complete cycles", Double.NaN, Double.NaN, Double.NaN,
                    Math.max(0, found - 1), Double.NaN, Double.NaN, Double.NaN, Double.NaN, Double.NaN);
        }
        double[] per = new double[k];
        double[] amp = new double[k];
        double[] mid = new double[k];
        for (int c = 0; c < k; c++) {
            double a = cross[k - c];
            double b = cross[k - c - 1];
            per[c] = b - a;
            double mn = Double.POSITIVE_INFINITY;
            double mx = Double.NEGATIVE_INFINITY;
            for (int i = (int) Math.ceil(a); i <= (int) Math.floor(b); i++) {
                mn = Math.min(mn, x[i]);
                mx = Math.max(mx, x[i]);
            }
            amp[c] = (mx - mn) / 2;
            mid[c] = integral(x, a, b) / (b - a);
        }
        double mp = avg(per);
        double ma = avg(amp);
        double mm = avg(mid);
        double ps = spread(per) / mp;
        double as = ma > 0 ? spread(amp) / ma : Double.POSITIVE_INFINITY;
        double ms = spread(mid) / Math.max(Math.max(Math.abs(mm), ma), periodic.absoluteTolerance());
        double tol = periodic.relativeTolerance() * scale;
        String reason = "stable";
        if (mp < 3) {
            reason = "period shorter than three samples";
        } else if (ps > tol) {
            reason = "period varies";
        } else if (as > tol) {
            reason = "amplitude varies";
        } else if (ms > tol) {
            reason = "cycle mean varies";
        }
        if (!"stable".equals(reason)) {
            return new Cycles(false, reason, mp, ma, mm, -1, ps, as, ms, Double.NaN, Double.NaN);
        }
        FisherG f = Periodogram.fisherNear(x, n, mp);
        if (f.pValue() >= periodic.alpha()) {
            return noCycles("no significant period", f.g(), f.pValue());
        }
        int cycles = upCrossings(x, from, n, below, above) - 1;
        return new Cycles(true, reason, mp, ma, mm, cycles, ps, as, ms, f.g(), f.pValue());
    }

    /** The interpolated point where x rises through level between a value below the band and one above it. */
    private static double crossing(double[] x, int lastBelow, int firstAbove, double level) {
        for (int j = firstAbove; j > lastBelow; j--) {
            if (x[j - 1] < level && x[j] >= level) {
                return j - 1 + (level - x[j - 1]) / (x[j] - x[j - 1]);
            }
        }
        return Double.NaN; // not reached: x[lastBelow] < level <= x[firstAbove]
    }

    /** The number of up-crossings of the band [below, above] in x[from..n). */
    private static int upCrossings(double[] x, int from, int n, double below, double above) {
        int count = 0;
        boolean wasBelow = false;
        for (int i = from; i < n; i++) {
            if (x[i] < below) {
                wasBelow = true;
            } else if (wasBelow && x[i] > above) {
                wasBelow = false;
                count++;
            }
        }
        return count;
    }

    private static Cycles noCycles(String reason, double g, double p) {
        return new Cycles(false, reason, Double.NaN, Double.NaN, Double.NaN, 0, Double.NaN, Double.NaN, Double.NaN,
                g, p);
    }

    /** Integral of the piecewise-linear interpolant of x over [a, b] (sample units). */
    private static double integral(double[] x, double a, double b) {
        double s = 0;
        double t = a;
        while (t < b) {
            int i = (int) Math.floor(t);
            double next = Math.min(b, i + 1);
            double va = at(x, t);
            double vb = at(x, next);
            s += 0.5 * (va + vb) * (next - t);
            t = next;
        }
        return s;
    }

    private static double at(double[] x, double t) {
        int i = (int) Math.floor(t);
        if (i + 1 >= x.length) {
            return x[Math.min(i, x.length - 1)];
        }
        double f = t - i;
        return x[i] + f * (x[i + 1] - x[i]);
    }

    private static double avg(double[] v) {
        double s = 0;
        for (double d : v) {
            s += d;
        }
        return s / v.length;
    }

    private static double spread(double[] v) {
        double lo = Double.POSITIVE_INFINITY;
        double hi = Double.NEGATIVE_INFINITY;
        for (double d : v) {
            lo = Math.min(lo, d);
            hi = Math.max(hi, d);
        }
        return hi - lo;
    }
}
