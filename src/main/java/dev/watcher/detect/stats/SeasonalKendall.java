package dev.watcher.detect.stats;

import java.util.Arrays;

/**
 * The seasonal Kendall trend test and the seasonal Sen slope (Hirsch, Slack &amp; Smith 1982, <i>Water
 * Resources Research</i> 18:107-121 [memory]) for a series with a known period P: the Mann–Kendall statistic
 * is taken within each phase g = 0..P-1 (the values x_g, x_{g+P}, ...) and summed, S = sum S_g, Var S =
 * sum Var S_g; so each value is compared only with values at the same phase of other periods, and a
 * periodic pattern that merely repeats gives no trend. The slope is the median of the within-phase pairwise
 * slopes (x_j - x_i) / (j - i), in units per sample. With P = 1 this is the ordinary Mann–Kendall test, and
 * the exact small-sample distribution of {@link MannKendall} is used for n &le; 10.
 *
 * @param period      P
 * @param n           number of values
 * @param s           the summed statistic S
 * @param variance    the summed tie-corrected variance
 * @param pIncreasing one-sided p-value against an upward trend
 * @param slope       the seasonal Sen slope per sample (NaN when no within-phase pair exists)
 * @param exact       true when the exact distribution was used (P = 1, n &le; 10, no ties)
 */
public record SeasonalKendall(int period, int n, long s, double variance, double pIncreasing, double slope,
        boolean exact) {

    /** The test on {@code x[0..n)} with period {@code period} (at least 1). */
    public static SeasonalKendall of(double[] x, int n, int period) {
        int p = Math.max(1, period);
        if (p == 1) {
            MannKendall mk = MannKendall.of(x, n);
            return new SeasonalKendall(1, n, mk.s(), mk.variance(), mk.pIncreasing(), TheilSen.slope(x, n),
                    mk.exact());
        }
        long s = 0;
        double var = 0;
        int pairs = 0;
        for (int g = 0; g < p; g++) {
            pairs += count(n, g, p) * (count(n, g, p) - 1) / 2;
        }
        double[] slopes = new double[pairs];
        int m = 0;
        double[] phase = new double[n / p + 1];
        for (int g = 0; g < p; g++) {
            int k = 0;
            for (int i = g; i < n; i += p) {
                phase[k++] = x[i];
            }
            if (k < 2) {
                continue;
            }
            s += MannKendall.score(phase, k);
            var += MannKendall.variance(phase, k);
            for (int a = 0; a < k; a++) {
                for (int b = a + 1; b < k; b++) {
                    slopes[m++] = (phase[b] - phase[a]) / ((double) (b - a) * p);
                }
            }
        }
        double slope = Double.NaN;
        if (m > 0) {
            Arrays.sort(slopes, 0, m);
            slope = (m & 1) == 1 ? slopes[m / 2] : 0.5 * (slopes[m / 2 - 1] + slopes[m / 2]);
        }
        double pUp = 1.0;
        if (var > 0) {
            double z = (s - Math.signum(s)) / Math.sqrt(var);
            pUp = Normal.upperTail(z);
        }
        return new SeasonalKendall(p, n, s, var, pUp, slope, false);
    }

    /**
     * The test without the slope (NaN in the result): S, Var S, the p-value and the exact flag as {@link #of}
     * gives them, in O(n^2 / P) comparisons, with nothing allocated unless values tie. The slope is the costly
     * part (every within-phase pair, then a median); a caller screening many series takes it with
     * {@link #slope} only where the p-value is small enough to matter.
     */
    public static SeasonalKendall test(double[] x, int n, int period) {
        int p = Math.max(1, period);
        if (p == 1) {
            long s = 0;
            long ties = 0;
            for (int i = 0; i < n - 1; i++) {
                double xi = x[i];
                for (int j = i + 1; j < n; j++) {
                    double d = x[j] - xi;
                    s += d > 0 ? 1 : d < 0 ? -1 : 0;
                    ties += d == 0 ? 1 : 0;
                }
            }
            double var = ties == 0 ? noTieVariance(n) : MannKendall.variance(x, n);
            if (n >= 2 && n <= MannKendall.EXACT_MAX_N && ties == 0) {
                return new SeasonalKendall(1, n, s, var, MannKendall.exactUpperTail(n, s), Double.NaN, true);
            }
            // as MannKendall's normal approximation
            double z = var <= 0 || s == 0 ? 0 : (s - Long.signum(s)) / Math.sqrt(var);
            return new SeasonalKendall(1, n, s, var, var > 0 ? Normal.upperTail(z) : 1.0, Double.NaN, false);
        }
        long s = 0;
        double var = 0;
        for (int g = 0; g < p; g++) {
            int k = count(n, g, p);
            if (k < 2) {
                continue;
            }
            long sg = 0;
            long ties = 0;
            for (int a = g; a < n; a += p) {
                double xa = x[a];
                for (int b = a + p; b < n; b += p) {
                    double d = x[b] - xa;
                    sg += d > 0 ? 1 : d < 0 ? -1 : 0;
                    ties += d == 0 ? 1 : 0;
                }
            }
            s += sg;
            var += ties == 0 ? noTieVariance(k) : MannKendall.variance(phase(x, n, g, p, k), k);
        }
        double pUp = 1.0;
        if (var > 0) {
            double z = (s - Math.signum(s)) / Math.sqrt(var);
            pUp = Normal.upperTail(z);
        }
        return new SeasonalKendall(p, n, s, var, pUp, Double.NaN, false);
    }

    /** The seasonal Sen slope of {@code x[0..n)} with period {@code period}, as {@link #of} gives it. O(n^2 / P). */
    public static double slope(double[] x, int n, int period) {
        int p = Math.max(1, period);
        if (p == 1) {
            return TheilSen.slope(x, n);
        }
        int pairs = 0;
        for (int g = 0; g < p; g++) {
            pairs += count(n, g, p) * (count(n, g, p) - 1) / 2;
        }
        if (pairs == 0) {
            return Double.NaN;
        }
        double[] slopes = new double[pairs];
        int m = 0;
        for (int g = 0; g < p; g++) {
            for (int a = g, ia = 0; a < n; a += p, ia++) {
                for (int b = a + p, ib = ia + 1; b < n; b += p, ib++) {
                    slopes[m++] = (x[b] - x[a]) / ((double) (ib - ia) * p);
                }
            }
        }
        // the median by selection, O(m): the same value as the middle of the sorted slopes
        double hi = Select.kth(slopes, 0, m, m / 2);
        if ((m & 1) == 1) {
            return hi;
        }
        double lo = slopes[0];
        for (int i = 1; i < m / 2; i++) {
            lo = Math.max(lo, slopes[i]);
        }
        return 0.5 * (lo + hi);
    }

    /** This result with its slope. */
    public SeasonalKendall withSlope(double newSlope) {
        return new SeasonalKendall(period, n, s, variance, pIncreasing, newSlope, exact);
    }

    /** Var S of k values without ties, computed as {@link MannKendall#variance} does. */
    private static double noTieVariance(int k) {
        double v = (double) k * (k - 1) * (2 * k + 5);
        return v / 18.0;
    }

    private static double[] phase(double[] x, int n, int g, int p, int k) {
        double[] phase = new double[k];
        for (int i = g, j = 0; i < n; i += p) {
            phase[j++] = x[i];
        }
        return phase;
    }

    private static int count(int n, int g, int p) {
        return g >= n ? 0 : (n - 1 - g) / p + 1;
    }
}
