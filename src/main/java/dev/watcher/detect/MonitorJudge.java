package dev.watcher.detect;

import dev.watcher.detect.stats.BatchMeans;
import dev.watcher.detect.stats.GeometricDecay;
import dev.watcher.detect.stats.Mser;
import dev.watcher.detect.stats.Periodogram;
import dev.watcher.detect.stats.TheilSen;

/**
 * Judges one monitor's recent values: settled to a value, or settled into a stable periodic state. Shared by
 * the monitor and convergence detectors, each of which keeps its own samples. Parameters are read once from
 * {@link DetectSettings} with the keys of the {@code monitor-settled} and {@code monitor-periodic} patterns
 * (so that {@code converged} judges monitors exactly as those detectors do). Stateless after construction.
 */
final class MonitorJudge {

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
     * @param truncation     values cut by MSER-5
     * @param mean           batch-means grand mean of the kept values
     * @param halfWidth      confidence half-width of that mean
     * @param tolerance      max(relative * |mean|, absolute), times the scale asked for
     * @param drift          Theil–Sen drift across the kept values (slope per batch times the batches)
     * @param predicted      predicted final value: the geometric limit when the approach is geometric, else the mean
     * @param remainingError predicted final minus the latest value (0 when no geometric approach is visible)
     * @param geometric      true when a geometric approach was seen and used
     */
    record Settling(boolean settled, String reason, int samples, int truncation, double mean, double halfWidth,
            double tolerance, double drift, double predicted, double remainingError, boolean geometric) {
    }

    /**
     * The periodic verdict.
     *
     * @param stable          true when a significant period with stable period, amplitude and cycle mean is seen
     * @param reason          why not (or "stable")
     * @param period          mean period of the judged cycles, in samples
     * @param amplitude       mean half peak-to-peak amplitude of the judged cycles
     * @param cycleMean       mean of the judged cycles' means
     * @param cycles          complete cycles found
     * @param periodSpread    (max - min) / mean of the judged periods
     * @param amplitudeSpread (max - min) / mean of the judged amplitudes
     * @param meanSpread      (max - min) of the cycle means over max(|cycle mean|, amplitude)
     * @param g               Fisher's g
     * @param pValue          its p-value
     */
    record Cycles(boolean stable, String reason, double period, double amplitude, double cycleMean, int cycles,
            double periodSpread, double amplitudeSpread, double meanSpread, double g, double pValue) {
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
     * transient is not over); the batch-means half-width of the kept values' mean must lie within the
     * tolerance; the Theil–Sen drift across the kept values must too (an equivalence criterion: a
     * significance test would reject a monitor whose approach is monotone yet negligible); when the batch
     * means show a geometric approach, its remaining error must as well; and a stable oscillation larger than
     * the tolerance is periodic, not settled. {@code scale} widens the tolerance (hysteresis for staying
     * settled).
     */
    Settling settled(double[] x, int n, double scale) {
        if (n < settle.minSamples()) {
            return notSettled("too few samples", n, 0);
        }
        Mser mser = Mser.of(x, n);
        // a transient MSER cannot place (a smooth, noise-free approach) is judged on the latest quarter of the
        // window (at least min_samples values): settled only if that stays within the tolerance
        int cut = mser.reliable() ? mser.truncation() : n - Math.min(n, Math.max(settle.minSamples(), n / 4));
        int kept = n - cut;
        int batches = Math.max(10, Math.min(30, Math.min(settle.batches(), kept / 5)));
        BatchMeans bm = BatchMeans.of(x, cut, kept, batches, settle.confidence());
        if (bm == null || kept < 10 * 5) {
            return notSettled("too few values after the transient", n, cut);
        }
        double mean = bm.mean();
        double tol = scale * Math.max(settle.relativeTolerance() * Math.abs(mean), settle.absoluteTolerance());
        double[] means = bm.means();
        double drift = TheilSen.slope(means, means.length) * means.length;
        // a geometric approach shows as block means whose steps are significant and shrink
        int block = kept / 3;
        GeometricDecay geo = GeometricDecay.ofBlocks(x, n, block);
        boolean geometric = false;
        double predicted = mean;
        double remaining = 0;
        if (geo != null) {
            // the block means move by more than their noise: the scatter of first differences, which a smooth
            // trend hardly touches (the batch-means half-width would be inflated by the trend itself)
            double noise = diffScatter(x, cut, n) / Math.sqrt(block);
            double step = Math.abs(blockMean(x, n - 2 * block, block) - blockMean(x, n - 3 * block, block));
            if (step > 4 * noise && geo.valid() && geo.lambda() > 0) {
                geometric = true;
                predicted = geo.limit();
                remaining = geo.limit() - x[n - 1];
            }
        }
        String reason = "settled";
        if (!mser.reliable() && (bm.halfWidth() > tol || Math.abs(drift) > tol)) {
            reason = "start-up transient not over";
        } else if (bm.halfWidth() > tol) {
            reason = "confidence interval of the mean wider than the tolerance";
        } else if (Math.abs(drift) > tol) {
            reason = "still drifting";
        } else if (geometric && Math.abs(remaining) > tol) {
            reason = "geometric approach not finished";
        } else {
            Cycles c = periodic(x, n, 1.0);
            if (c.stable() && c.amplitude() > tol) {
                reason = "oscillating";
            }
        }
        return new Settling("settled".equals(reason), reason, n, cut, mean, bm.halfWidth(), tol, drift, predicted,
                remaining, geometric);
    }

    private static Settling notSettled(String reason, int n, int cut) {
        return new Settling(false, reason, n, cut, Double.NaN, Double.NaN, Double.NaN, Double.NaN, Double.NaN,
                Double.NaN, false);
    }

    /** Standard deviation of the first differences of x[from..n) over sqrt 2: the noise of one value. */
    private static double diffScatter(double[] x, int from, int n) {
        int m = n - from - 1;
        if (m < 2) {
            return 0;
        }
        double mean = (x[n - 1] - x[from]) / m;
        double ss = 0;
        for (int i = from + 1; i < n; i++) {
            double d = x[i] - x[i - 1] - mean;
            ss += d * d;
        }
        return Math.sqrt(ss / (m - 1) / 2);
    }

    private static double blockMean(double[] x, int from, int len) {
        double s = 0;
        for (int i = 0; i < len; i++) {
            s += x[from + i];
        }
        return s / len;
    }

    /**
     * Is {@code x[0..n)} in a stable periodic state? Fisher's g on the periodogram of the latest values must
     * reject white noise at {@code alpha}; the series is then cut into cycles at its up-crossings of the mean
     * (with a dead band of a quarter of the amplitude against noise, crossing points interpolated), and over
     * the last {@code min_cycles} cycles the period, the amplitude (half of max - min) and the cycle mean (the
     * integral of the linear interpolant over the cycle) must each vary by at most the relative tolerance
     * times {@code scale}: period and amplitude relative to their means, the cycle mean relative to max(|mean|,
     * amplitude) so that monitors oscillating about zero are judged too.
     */
    Cycles periodic(double[] x, int n, double scale) {
        if (n < periodic.minSamples()) {
            return noCycles("too few samples", Double.NaN, 1);
        }
        Periodogram pg = Periodogram.of(x, n);
        if (pg == null || pg.fisher().pValue() >= periodic.alpha()) {
            return noCycles("no significant period", pg == null ? Double.NaN : pg.fisher().g(),
                    pg == null ? 1 : pg.fisher().pValue());
        }
        double g = pg.fisher().g();
        double p = pg.fisher().pValue();
        int from = n - pg.length();
        double level = 0;
        double lo = Double.POSITIVE_INFINITY;
        double hi = Double.NEGATIVE_INFINITY;
        for (int i = from; i < n; i++) {
            level += x[i];
            lo = Math.min(lo, x[i]);
            hi = Math.max(hi, x[i]);
        }
        level /= pg.length();
        double band = 0.25 * (hi - lo) / 2;
        double[] cross = new double[n];
        int nc = 0;
        boolean below = false;
        int lastBelow = -1;
        for (int i = from; i < n; i++) {
            if (x[i] < level - band) {
                below = true;
                lastBelow = i;
            } else if (below && x[i] > level + band) {
                below = false;
                for (int j = i; j > lastBelow; j--) {
                    if (x[j - 1] < level && x[j] >= level) {
                        cross[nc++] = j - 1 + (level - x[j - 1]) / (x[j] - x[j - 1]);
                        break;
                    }
                }
            }
        }
        int cycles = nc - 1;
        int k = periodic.minCycles();
        if (cycles < k) {
            return new Cycles(false, "too few complete cycles", Double.NaN, Double.NaN, Double.NaN, Math.max(0, cycles),
                    Double.NaN, Double.NaN, Double.NaN, g, p);
        }
        double[] per = new double[k];
        double[] amp = new double[k];
        double[] mid = new double[k];
        for (int c = 0; c < k; c++) {
            double a = cross[nc - 1 - k + c];
            double b = cross[nc - k + c];
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
        return new Cycles("stable".equals(reason), reason, mp, ma, mm, cycles, ps, as, ms, g, p);
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
