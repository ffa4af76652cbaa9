package dev.watcher.detect.stats;

/**
 * Fisher's g test for a hidden periodicity (Fisher 1929, <i>Proc. R. Soc. A</i> 125:54-59): with periodogram
 * ordinates I_1..I_m at the Fourier frequencies (zero and Nyquist excluded), g = max I_k / sum I_k, and under
 * Gaussian white noise P(G &gt; g) = sum_{j=1}^{floor(1/g)} (-1)^{j-1} C(m, j) (1 - j g)^{m-1}.
 *
 * <p>The alternating sum loses precision when g is small and m large; those are p-values near one, where
 * only "not significant" matters: when the first term m (1 - g)^(m-1), an upper bound, is at least 1, the
 * p-value is reported as 1. The result is clamped to [0, 1].
 *
 * @param g      the statistic
 * @param m      number of ordinates
 * @param peak   index (1-based Fourier frequency) of the largest ordinate
 * @param pValue P(G &gt; g) under white noise
 */
public record FisherG(double g, int m, int peak, double pValue) {

    /** The test on the ordinates {@code ordinates[0..m)}, where {@code ordinates[k-1]} belongs to frequency k. */
    public static FisherG of(double[] ordinates, int m) {
        double sum = 0;
        double max = -1;
        int at = 0;
        for (int k = 0; k < m; k++) {
            sum += ordinates[k];
            if (ordinates[k] > max) {
                max = ordinates[k];
                at = k + 1;
            }
        }
        if (m < 2 || !(sum > 0)) {
            return new FisherG(Double.NaN, m, at, 1.0);
        }
        double g = max / sum;
        return new FisherG(g, m, at, pValue(g, m));
    }

    /** P(G &gt; g) for m ordinates of Gaussian white noise (Fisher 1929). */
    public static double pValue(double g, int m) {
        if (!(g > 0)) {
            return 1.0;
        }
        if (g >= 1) {
            return 0.0;
        }
        // the first term m (1 - g)^(m-1) bounds the p-value from above (Bonferroni); at or above 1 the statistic
        // is nowhere near significance, and the alternating sum would only lose itself in cancellation
        if (Math.log(m) + (m - 1) * Math.log1p(-g) >= 0) {
            return 1.0;
        }
        int top = (int) Math.floor(1 / g);
        double sum = 0;
        double logBinom = 0; // log C(m, j), built up term by term
        for (int j = 1; j <= Math.min(top, m); j++) {
            logBinom += Math.log((double) (m - j + 1) / j);
            double base = 1 - j * g;
            if (base <= 0) {
                break;
            }
            double term = Math.exp(logBinom + (m - 1) * Math.log(base));
            sum += (j % 2 == 1) ? term : -term;
            if (term < 1e-17) {
                break;
            }
        }
        return Math.max(0, Math.min(1, sum));
    }
}
