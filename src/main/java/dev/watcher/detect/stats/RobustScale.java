package dev.watcher.detect.stats;

import java.util.Arrays;

/**
 * Robust location and scale of a sample: median, MAD scaled by 1.4826 (consistent with the standard
 * deviation under normality), and the modified z-score 0.6745 (x - median) / MAD_raw, flagged above 3.5
 * (Iglewicz &amp; Hoaglin 1993, <i>How to Detect and Handle Outliers</i>, ASQC).
 *
 * <p>Flat-plateau fallback: when more than half of the values are equal, MAD is 0. Then the scale falls back
 * to the mean absolute deviation around the median times 1.2533 (sqrt(pi/2), its consistency factor under
 * normality); when that is 0 too (every value equal) the scale is 0 and {@link #modifiedZ} returns 0 for
 * the median itself and +/-infinity for anything else.
 *
 * @param n              sample size
 * @param median         the sample median
 * @param mad            the raw median absolute deviation (unscaled)
 * @param meanAbsDev     the mean absolute deviation around the median
 * @param p05            5th percentile (linear interpolation between order statistics)
 * @param p95            95th percentile
 */
public record RobustScale(int n, double median, double mad, double meanAbsDev, double p05, double p95) {

    /** 1 / Phi^-1(3/4): MAD times this estimates the standard deviation of normal data. */
    public static final double MAD_TO_SIGMA = 1.4826;
    /** sqrt(pi/2): mean absolute deviation times this estimates the standard deviation of normal data. */
    public static final double MEAN_AD_TO_SIGMA = 1.2533;
    /** The usual flag for a modified z-score (Iglewicz &amp; Hoaglin 1993). */
    public static final double OUTLIER_Z = 3.5;

    /** Robust statistics of {@code x[0..n)}; the input is not changed. NaN fields when n = 0. */
    public static RobustScale of(double[] x, int n) {
        if (n == 0) {
            return new RobustScale(0, Double.NaN, Double.NaN, Double.NaN, Double.NaN, Double.NaN);
        }
        double[] s = Arrays.copyOf(x, n);
        Arrays.sort(s);
        double med = TheilSen.medianOfSorted(s, n);
        double[] d = new double[n];
        double sum = 0;
        for (int i = 0; i < n; i++) {
            d[i] = Math.abs(s[i] - med);
            sum += d[i];
        }
        Arrays.sort(d);
        return new RobustScale(n, med, TheilSen.medianOfSorted(d, n), sum / n, quantileOfSorted(s, n, 0.05),
                quantileOfSorted(s, n, 0.95));
    }

    /** A robust estimate of the standard deviation: 1.4826 MAD, or the mean-absolute-deviation fallback. */
    public double sigma() {
        return mad > 0 ? MAD_TO_SIGMA * mad : MEAN_AD_TO_SIGMA * meanAbsDev;
    }

    /** The robust amplitude p95 - p5. */
    public double spread() {
        return p95 - p05;
    }

    /** The modified z-score of x: (x - median) / sigma() (equal to 0.6745 (x - median) / MAD when MAD &gt; 0). */
    public double modifiedZ(double x) {
        double d = x - median;
        double sd = sigma();
        if (sd > 0) {
            return d / sd;
        }
        return d == 0 ? 0 : d > 0 ? Double.POSITIVE_INFINITY : Double.NEGATIVE_INFINITY;
    }

    /** The p-quantile of sorted values by linear interpolation (type 7, the default of R and numpy). */
    public static double quantileOfSorted(double[] sorted, int n, double p) {
        if (n == 1) {
            return sorted[0];
        }
        double h = (n - 1) * p;
        int lo = (int) Math.floor(h);
        int hi = Math.min(lo + 1, n - 1);
        return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
    }
}
