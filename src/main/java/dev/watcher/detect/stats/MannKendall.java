package dev.watcher.detect.stats;

/**
 * The Mann–Kendall trend test of a series against its order (Mann 1945; Kendall 1975; worked form in
 * Gilbert 1987, <i>Statistical Methods for Environmental Pollution Monitoring</i>, ch. 16).
 *
 * <p>S = sum over i &lt; j of sgn(x_j - x_i); Var(S) = [n(n-1)(2n+5) - sum_t t(t-1)(2t+5)] / 18 over the tie
 * groups t; Z = (S - sgn S) / sqrt(Var S). For n &le; 10 without ties, the p-values come from the exact
 * null distribution of S (all n! orderings equally likely); otherwise from the normal approximation.
 * {@link #hamedRao} inflates Var(S) by n/n* for autocorrelated series (Hamed &amp; Rao 1998, <i>J.
 * Hydrology</i> 204:182-196), which residual histories always are.
 *
 * @param n                 number of values
 * @param s                 the statistic S
 * @param variance          Var(S) used for Z (tie-corrected, times {@code varianceInflation})
 * @param z                 the continuity-corrected standard score (S - sgn S) / sqrt(variance); 0 when
 *                          the variance is 0
 * @param pIncreasing       one-sided p-value against an upward trend: P(S' &ge; S) under no trend
 * @param pDecreasing       one-sided p-value against a downward trend: P(S' &le; S)
 * @param pTwoSided         two-sided p-value, at most 1
 * @param exact             true when the p-values come from the exact distribution
 * @param tiePairs          number of pairs (i &lt; j) with equal values, for Kendall's tau-b
 * @param varianceInflation n/n* of Hamed–Rao (1 for the plain test)
 */
public record MannKendall(int n, long s, double variance, double z, double pIncreasing, double pDecreasing,
        double pTwoSided, boolean exact, long tiePairs, double varianceInflation) {

    /** Largest n for which the exact distribution is used. */
    public static final int EXACT_MAX_N = 10;

    /** COUNTS[n][i]: number of orderings of n distinct values with i inversions (Mahonian numbers). */
    private static final long[][] COUNTS = mahonian(EXACT_MAX_N);

    /** The test on {@code x[0..n)}: exact p-values for n &le; 10 without ties, normal approximation otherwise. */
    public static MannKendall of(double[] x, int n) {
        long s = score(x, n);
        long ties = tiePairs(x, n);
        double var = variance(x, n);
        if (n >= 2 && n <= EXACT_MAX_N && ties == 0) {
            double up = exactUpperTail(n, s);
            double down = exactUpperTail(n, -s);
            return new MannKendall(n, s, var, zScore(s, var), up, down, Math.min(1.0, 2 * Math.min(up, down)),
                    true, ties, 1.0);
        }
        return normal(s, var, n, ties, 1.0);
    }

    public static MannKendall of(double[] x) {
        return of(x, x.length);
    }

    /** The test on {@code x[0..n)} with the normal approximation and tie-corrected variance, whatever n. */
    public static MannKendall normal(double[] x, int n) {
        return normal(score(x, n), variance(x, n), n, tiePairs(x, n), 1.0);
    }

    /**
     * The test with the Hamed–Rao correction for autocorrelation (Hamed &amp; Rao 1998): detrend with the
     * Theil–Sen slope, rank the detrended series, and from the lags k = 1..n-1 whose rank autocorrelation
     * rho_k lies outside +/- z_{1-alpha/2}/sqrt(n), form n/n* = 1 + 2/(n(n-1)(n-2)) sum (n-k)(n-k-1)(n-k-2)
     * rho_k. Var(S) is multiplied by n/n*. We never let n/n* fall below 1 (a negative autocorrelation
     * would shrink the variance and raise false alarms; the detectors want the conservative side).
     *
     * @param maxLag highest lag examined (at most n-1); the cost is O(n * maxLag) plus the O(n^2) slopes
     * @param alpha  significance level for a lag to count (0.05 in the paper)
     */
    public static MannKendall hamedRao(double[] x, int n, int maxLag, double alpha) {
        long s = score(x, n);
        double var = variance(x, n);
        double inflation = 1.0;
        if (n >= 3) {
            double slope = TheilSen.slope(x, n);
            double[] d = new double[n];
            for (int i = 0; i < n; i++) {
                d[i] = x[i] - slope * (i + 1);
            }
            double[] r = Ranks.of(d, n);
            double mean = (n + 1) / 2.0;
            double den = 0;
            for (int i = 0; i < n; i++) {
                den += (r[i] - mean) * (r[i] - mean);
            }
            double bound = Normal.quantile(1 - alpha / 2) / Math.sqrt(n);
            double sum = 0;
            int lags = Math.min(maxLag, n - 1);
            if (den > 0) {
                for (int k = 1; k <= lags; k++) {
                    double num = 0;
                    for (int i = 0; i + k < n; i++) {
                        num += (r[i] - mean) * (r[i + k] - mean);
                    }
                    double rho = num / den;
                    if (rho > bound || rho < -bound) {
                        sum += (double) (n - k) * (n - k - 1) * (n - k - 2) * rho;
                    }
                }
            }
            inflation = Math.max(1.0, 1 + 2.0 / ((double) n * (n - 1) * (n - 2)) * sum);
        }
        return normal(s, var * inflation, n, tiePairs(x, n), inflation);
    }

    public static MannKendall hamedRao(double[] x, int n) {
        return hamedRao(x, n, n - 1, 0.05);
    }

    /** Kendall's tau-b of the series against its order: S / sqrt(n0 (n0 - ties)), n0 = n(n-1)/2. */
    public double tauB() {
        double n0 = n * (n - 1) / 2.0;
        double den = Math.sqrt(n0 * (n0 - tiePairs));
        return den == 0 ? 0 : s / den;
    }

    /** S = sum over i &lt; j of sgn(x_j - x_i). O(n^2). */
    public static long score(double[] x, int n) {
        long s = 0;
        for (int i = 0; i < n - 1; i++) {
            double xi = x[i];
            for (int j = i + 1; j < n; j++) {
                double d = x[j] - xi;
                s += d > 0 ? 1 : d < 0 ? -1 : 0;
            }
        }
        return s;
    }

    /** Var(S) with the tie correction. */
    public static double variance(double[] x, int n) {
        double v = (double) n * (n - 1) * (2 * n + 5);
        double[] sorted = java.util.Arrays.copyOf(x, n);
        java.util.Arrays.sort(sorted);
        int i = 0;
        while (i < n) {
            int j = i + 1;
            while (j < n && sorted[j] == sorted[i]) {
                j++;
            }
            long t = j - i;
            if (t > 1) {
                v -= (double) t * (t - 1) * (2 * t + 5);
            }
            i = j;
        }
        return v / 18.0;
    }

    /** P(S' &ge; s) under no trend for n distinct values, n &le; {@link #EXACT_MAX_N}, by exact counting. */
    public static double exactUpperTail(int n, long s) {
        if (n < 2 || n > EXACT_MAX_N) {
            throw new IllegalArgumentException("exact distribution only for 2 <= n <= " + EXACT_MAX_N + ": " + n);
        }
        long n0 = (long) n * (n - 1) / 2;
        // S = n0 - 2 I with I the number of inversions, so S' >= s <=> I <= (n0 - s) / 2
        long maxInv = Math.floorDiv(n0 - s, 2);
        if (maxInv < 0) {
            return 0;
        }
        long[] c = COUNTS[n];
        long total = 0;
        long hit = 0;
        for (int i = 0; i < c.length; i++) {
            total += c[i];
            if (i <= maxInv) {
                hit += c[i];
            }
        }
        return (double) hit / total;
    }

    private static MannKendall normal(long s, double var, int n, long ties, double inflation) {
        double z = zScore(s, var);
        double up = var > 0 ? Normal.upperTail(z) : 1.0;
        double down = var > 0 ? Normal.upperTail(-z) : 1.0;
        double two = var > 0 ? Math.min(1.0, 2 * Normal.upperTail(Math.abs(z))) : 1.0;
        return new MannKendall(n, s, var, z, up, down, two, false, ties, inflation);
    }

    private static double zScore(long s, double var) {
        if (var <= 0 || s == 0) {
            return 0;
        }
        return (s - Long.signum(s)) / Math.sqrt(var);
    }

    private static long tiePairs(double[] x, int n) {
        double[] sorted = java.util.Arrays.copyOf(x, n);
        java.util.Arrays.sort(sorted);
        long pairs = 0;
        int i = 0;
        while (i < n) {
            int j = i + 1;
            while (j < n && sorted[j] == sorted[i]) {
                j++;
            }
            long t = j - i;
            pairs += t * (t - 1) / 2;
            i = j;
        }
        return pairs;
    }

    private static long[][] mahonian(int max) {
        long[][] c = new long[max + 1][];
        c[0] = new long[] {1};
        for (int m = 1; m <= max; m++) {
            long[] prev = c[m - 1];
            long[] cur = new long[m * (m - 1) / 2 + 1];
            // inserting the m-th element adds 0..m-1 inversions
            for (int i = 0; i < prev.length; i++) {
                for (int a = 0; a < m; a++) {
                    cur[i + a] += prev[i];
                }
            }
            c[m] = cur;
        }
        return c;
    }
}
