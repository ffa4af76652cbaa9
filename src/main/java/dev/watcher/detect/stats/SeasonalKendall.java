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

    private static int count(int n, int g, int p) {
        return g >= n ? 0 : (n - 1 - g) / p + 1;
    }
}
