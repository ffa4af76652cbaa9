package dev.watcher.detect.stats;

import java.util.Arrays;

/**
 * The Theil–Sen line: slope = median of the pairwise slopes (y_j - y_i)/(x_j - x_i) over pairs with
 * x_i &lt; x_j (Theil 1950; Sen 1968, <i>JASA</i> 63:1379-1389), with Sen's distribution-free confidence
 * interval from the order statistics of the N pairwise slopes: with C = z_{1-a/2} sqrt(Var S) (Var S the
 * tie-corrected Mann–Kendall variance, ties counted in x and in y), the bounds are the slopes of ranks
 * round((N - C)/2) and round((N + C)/2) + 1 (1-based). The intercept is median(y) - slope median(x). These
 * conventions (rounding half to even, the separate-medians intercept) follow scipy.stats.theilslopes, whose
 * results the tests reproduce.
 *
 * <p>Cost O(n^2) expected for n points (the order statistics by selection, not by sorting): call it every k records on a bounded window, never per record.
 *
 * @param n         number of points
 * @param slope     the median pairwise slope
 * @param low       lower bound of the slope's confidence interval
 * @param high      upper bound
 * @param intercept median(y) - slope * median(x)
 * @param confidence the interval's confidence level, e.g. 0.95
 */
public record TheilSen(int n, double slope, double low, double high, double intercept, double confidence) {

    /** The fit of {@code y[0..n)} against {@code x[0..n)}. NaN everywhere when fewer than two distinct x. */
    public static TheilSen fit(double[] x, double[] y, int n, double confidence) {
        double[] slopes = new double[n * (n - 1) / 2];
        int m = 0;
        for (int i = 0; i < n; i++) {
            for (int j = 0; j < n; j++) {
                double dx = x[j] - x[i];
                if (dx > 0) {
                    slopes[m++] = (y[j] - y[i]) / dx;
                }
            }
        }
        if (m == 0) {
            return new TheilSen(n, Double.NaN, Double.NaN, Double.NaN, Double.NaN, confidence);
        }
        double var = (n * (n - 1.0) * (2 * n + 5) - tieTerm(x, n) - tieTerm(y, n)) / 18.0;
        double c = Normal.quantile(1 - (1 - confidence) / 2) * Math.sqrt(Math.max(var, 0));
        int upper = (int) Math.min(Math.rint((m + c) / 2), m - 1);
        int lower = (int) Math.max(Math.rint((m - c) / 2) - 1, 0);
        // order statistics by selection, O(m) expected, instead of sorting the m = O(n^2) slopes
        double lo = Select.kth(slopes, 0, m, lower);
        double hi = Select.kth(slopes, 0, m, upper);
        double slope = medianOf(slopes, m);
        double intercept = median(y, n) - slope * median(x, n);
        return new TheilSen(n, slope, lo, hi, intercept, confidence);
    }

    /** The fit of {@code y[0..n)} against the indices 0, 1, ..., n-1. */
    public static TheilSen fitIndexed(double[] y, int n, double confidence) {
        double[] x = new double[n];
        for (int i = 0; i < n; i++) {
            x[i] = i;
        }
        return fit(x, y, n, confidence);
    }

    /** Only the median slope of {@code y[0..n)} against its indices; 0 for fewer than two points. O(n^2). */
    public static double slope(double[] y, int n) {
        if (n < 2) {
            return 0;
        }
        double[] slopes = new double[n * (n - 1) / 2];
        int m = 0;
        for (int i = 0; i < n; i++) {
            for (int j = i + 1; j < n; j++) {
                slopes[m++] = (y[j] - y[i]) / (j - i);
            }
        }
        return medianOf(slopes, m);
    }

    /** The median of a[0..m) by selection; reorders a. */
    private static double medianOf(double[] a, int m) {
        double hi = Select.kth(a, 0, m, m / 2);
        if ((m & 1) == 1) {
            return hi;
        }
        // after the selection a[0..m/2) holds the smaller half: its maximum has rank m/2 - 1
        double lo = a[0];
        for (int i = 1; i < m / 2; i++) {
            lo = Math.max(lo, a[i]);
        }
        return 0.5 * (lo + hi);
    }

    /** True when the whole confidence interval lies inside [-delta, +delta]: an equivalence (TOST-like) test. */
    public boolean within(double delta) {
        return low >= -delta && high <= delta;
    }

    static double median(double[] v, int n) {
        double[] c = Arrays.copyOf(v, n);
        Arrays.sort(c);
        return medianOfSorted(c, n);
    }

    static double medianOfSorted(double[] s, int n) {
        return (n & 1) == 1 ? s[n / 2] : 0.5 * (s[n / 2 - 1] + s[n / 2]);
    }

    private static double tieTerm(double[] v, int n) {
        double[] s = Arrays.copyOf(v, n);
        Arrays.sort(s);
        double sum = 0;
        int i = 0;
        while (i < n) {
            int j = i + 1;
            while (j < n && s[j] == s[i]) {
                j++;
            }
            double t = j - i;
            if (t > 1) {
                sum += t * (t - 1) * (2 * t + 5);
            }
            i = j;
        }
        return sum;
    }
}
