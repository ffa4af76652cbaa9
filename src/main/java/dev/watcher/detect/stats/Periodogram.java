package dev.watcher.detect.stats;

import org.apache.commons.math3.transform.DftNormalization;
import org.apache.commons.math3.transform.FastFourierTransformer;
import org.apache.commons.math3.transform.TransformType;

/**
 * The periodogram of the latest values of a series and the period it points at, with Fisher's g test that
 * the peak is real. Commons Math's {@link FastFourierTransformer} takes power-of-two lengths only, so the
 * latest N = 2^k values are used (N the largest power of two not above the available count). The values are
 * detrended by a least-squares line first, so that a drift does not pile up at the lowest frequency.
 * Ordinates I_k = |X_k|^2 / N for k = 1 .. N/2 - 1 (zero and Nyquist frequencies excluded, as Fisher's test
 * requires). The period estimate N / k* from the peak is then refined on the sample autocorrelation: the
 * highest autocorrelation within +/- 30 % of that lag, located to a fraction of a sample by a parabola
 * through the three points around it (the periodogram alone only resolves periods N / k).
 *
 * @param length   N, the number of values transformed
 * @param period   the refined period in samples (NaN when no peak)
 * @param coarse   N / k*, the period at the periodogram peak
 * @param fisher   Fisher's g test on the ordinates
 * @param acfAtPeriod sample autocorrelation at the (rounded) refined period
 */
public record Periodogram(int length, double period, double coarse, FisherG fisher, double acfAtPeriod) {

    /** Fisher p-value below which the period is refined on the autocorrelation (else the coarse N / k*). */
    public static final double REFINE_BELOW = 0.05;

    /** Smallest length transformed. */
    public static final int MIN_LENGTH = 16;

    /** The periodogram of the latest power-of-two values of {@code x[0..n)}; null when n &lt; {@link #MIN_LENGTH}. */
    public static Periodogram of(double[] x, int n) {
        if (n < MIN_LENGTH) {
            return null;
        }
        int len = Integer.highestOneBit(n);
        int from = n - len;
        double[] d = detrended(x, from, len);
        FisherG g = ordinates(d, len);
        if (g.peak() < 1 || Double.isNaN(g.g())) {
            return new Periodogram(len, Double.NaN, Double.NaN, g, Double.NaN);
        }
        double coarse = (double) len / g.peak();
        // the refinement costs O(N * period); spend it only on a peak that may be real
        double refined = g.pValue() < REFINE_BELOW ? refine(d, len, coarse) : coarse;
        double acf = autocorrelation(d, len, (int) Math.round(refined));
        return new Periodogram(len, refined, coarse, g, acf);
    }

    /**
     * Fisher's g test on the periodogram of the latest power-of-two values of {@code x[0..n)}, the same test
     * as {@code of(x, n).fisher()} (same detrending, same ordinates), computed in O(N) when the series has a
     * dominant period near {@code period} samples, as a series with stable cycles of that period has. The sum
     * of the ordinates I_1..I_{N/2-1} follows from Parseval's theorem, sum_k |X_k|^2 = N sum_t d_t^2, as
     * (sum_t d_t^2 - I_0 - I_{N/2}) / 2 (the ordinates of a real series are symmetric, I_k = I_{N-k}); the
     * ordinates at the Fourier frequencies within two of N / period come from Goertzel's recurrence (Goertzel
     * 1958, <i>Am. Math. Monthly</i> 65:34-35 [memory]). When the largest of them is at least the sum of all
     * the others, it is the largest ordinate of all, and g = max / sum is exact; otherwise, or without a usable
     * period, the whole periodogram is computed by FFT as in {@link #of}. Null when n &lt; {@link #MIN_LENGTH}.
     */
    public static FisherG fisherNear(double[] x, int n, double period) {
        if (n < MIN_LENGTH) {
            return null;
        }
        int len = Integer.highestOneBit(n);
        int m = len / 2 - 1;
        double[] d = detrended(x, n - len, len);
        if (period > 2 && Double.isFinite(period)) {
            double squares = 0;
            double sum = 0;
            double alternating = 0;
            for (int t = 0; t < len; t++) {
                squares += d[t] * d[t];
                sum += d[t];
                alternating += (t & 1) == 0 ? d[t] : -d[t];
            }
            double total = (squares - sum * sum / len - alternating * alternating / len) / 2;
            int k0 = (int) Math.round(len / period);
            int lo = Math.max(1, k0 - 2);
            int hi = Math.min(m, k0 + 2);
            double max = -1;
            int at = 0;
            double near = 0;
            for (int k = lo; k <= hi; k++) {
                double ik = goertzel(d, len, k) / len;
                near += ik;
                if (ik > max) {
                    max = ik;
                    at = k;
                }
            }
            if (total > 0 && at > 0 && max >= total - near) {
                double g = Math.min(1, max / total);
                return new FisherG(g, m, at, FisherG.pValue(g, m));
            }
        }
        return ordinates(d, len);
    }

    /** |X_k|^2 of d[0..n) at the Fourier frequency k, by Goertzel's second-order recurrence. */
    private static double goertzel(double[] d, int n, int k) {
        double c = 2 * Math.cos(2 * Math.PI * k / n);
        double s1 = 0;
        double s2 = 0;
        for (int t = 0; t < n; t++) {
            double s0 = d[t] + c * s1 - s2;
            s2 = s1;
            s1 = s0;
        }
        return Math.max(0, s1 * s1 + s2 * s2 - c * s1 * s2);
    }

    /** Fisher's g on the FFT periodogram of the detrended d[0..len) (d is not changed). */
    private static FisherG ordinates(double[] d, int len) {
        // the in-place form works on plain arrays (no Complex objects): several times faster on the hot path
        double[][] ri = {d.clone(), new double[len]};
        FastFourierTransformer.transformInPlace(ri, DftNormalization.STANDARD, TransformType.FORWARD);
        int m = len / 2 - 1;
        double[] ord = new double[m];
        for (int k = 1; k <= m; k++) {
            double re = ri[0][k];
            double im = ri[1][k];
            ord[k - 1] = (re * re + im * im) / len;
        }
        return FisherG.of(ord, m);
    }

    /** Sample autocorrelation of {@code d[0..n)} (mean already removed or not: it is removed here) at a lag. */
    public static double autocorrelation(double[] d, int n, int lag) {
        if (lag <= 0 || lag >= n) {
            return Double.NaN;
        }
        double mean = 0;
        for (int i = 0; i < n; i++) {
            mean += d[i];
        }
        mean /= n;
        double den = 0;
        for (int i = 0; i < n; i++) {
            den += (d[i] - mean) * (d[i] - mean);
        }
        if (den == 0) {
            return 0;
        }
        double num = 0;
        for (int i = 0; i + lag < n; i++) {
            num += (d[i] - mean) * (d[i + lag] - mean);
        }
        return num / den;
    }

    /**
     * The first local maximum of the sample autocorrelation of {@code x[0..n)} in lags [minLag, maxLag] that
     * exceeds {@code threshold}, or -1. A simple period estimate for short series (e.g. per-step peaks).
     * Found lag by lag and stopped at the first one: O(n) per lag examined, nothing allocated.
     */
    public static int firstAutocorrelationPeak(double[] x, int n, int minLag, int maxLag, double threshold) {
        int hi = Math.min(maxLag, n - 2);
        if (hi < Math.max(1, minLag)) {
            return -1;
        }
        double mean = 0;
        for (int i = 0; i < n; i++) {
            mean += x[i];
        }
        mean /= n;
        double den = 0;
        for (int i = 0; i < n; i++) {
            den += (x[i] - mean) * (x[i] - mean);
        }
        if (den == 0) {
            return -1;
        }
        int from = Math.max(1, minLag);
        double before = acf(x, n, mean, den, from - 1);
        double at = acf(x, n, mean, den, from);
        for (int lag = from; lag <= hi; lag++) {
            double after = acf(x, n, mean, den, lag + 1);
            if (at > threshold && at >= before && at >= after) {
                return lag;
            }
            before = at;
            at = after;
        }
        return -1;
    }

    private static double acf(double[] x, int n, double mean, double den, int lag) {
        double num = 0;
        for (int i = 0; i + lag < n; i++) {
            num += (x[i] - mean) * (x[i + lag] - mean);
        }
        return num / den;
    }

    private static double refine(double[] d, int n, double coarse) {
        int lo = Math.max(2, (int) Math.floor(coarse * 0.7));
        int hi = Math.min(n / 2, (int) Math.ceil(coarse * 1.3));
        if (hi <= lo) {
            return coarse;
        }
        double mean = 0;
        for (int i = 0; i < n; i++) {
            mean += d[i];
        }
        mean /= n;
        double den = 0;
        for (int i = 0; i < n; i++) {
            den += (d[i] - mean) * (d[i] - mean);
        }
        if (den == 0) {
            return coarse;
        }
        double[] r = new double[hi + 2];
        int best = -1;
        double bestR = Double.NEGATIVE_INFINITY;
        for (int lag = lo - 1; lag <= hi + 1; lag++) {
            double num = 0;
            for (int i = 0; i + lag < n; i++) {
                num += (d[i] - mean) * (d[i + lag] - mean);
            }
            r[lag] = num / den;
            if (lag >= lo && lag <= hi && r[lag] > bestR) {
                bestR = r[lag];
                best = lag;
            }
        }
        if (best <= lo || best >= hi) {
            return best < 0 ? coarse : best;
        }
        double a = r[best - 1];
        double c = r[best + 1];
        double curv = a - 2 * bestR + c;
        double shift = curv < 0 ? 0.5 * (a - c) / curv : 0;
        return best + Math.max(-0.5, Math.min(0.5, shift));
    }

    private static double[] detrended(double[] x, int from, int len) {
        double mt = (len - 1) / 2.0;
        double my = 0;
        for (int i = 0; i < len; i++) {
            my += x[from + i];
        }
        my /= len;
        double sxy = 0;
        double sxx = 0;
        for (int i = 0; i < len; i++) {
            sxy += (i - mt) * (x[from + i] - my);
            sxx += (i - mt) * (i - mt);
        }
        double b = sxy / sxx;
        double[] d = new double[len];
        for (int i = 0; i < len; i++) {
            d[i] = x[from + i] - my - b * (i - mt);
        }
        return d;
    }
}
