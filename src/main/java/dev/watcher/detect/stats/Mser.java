package dev.watcher.detect.stats;

/**
 * MSER-5 truncation of a start-up transient (White 1997, <i>Simulation</i> 69:323-334; the batch size of five
 * follows White, Cobb &amp; Spratt 2000 [memory]). The series is cut into batches of five, Y_0..Y_{b-1} (a
 * remainder of fewer than five values at the end is left out), and the cut d (in batches) minimises
 * MSER(d) = sum_{j&ge;d} (Y_j - mean_d)^2 / (b - d)^2: the squared standard error of the mean of what is kept.
 * The search stops {@link #MIN_KEPT_BATCHES} batches before the end so that the statistic is not taken on a
 * handful of values. When the minimum falls in the second half of the batches the transient has not ended
 * within the data, and {@link #reliable()} is false (White's own rule).
 *
 * <p>O(n) time, O(n / 5) scratch memory.
 *
 * @param n          values examined
 * @param batches    number of whole batches b
 * @param truncation number of leading values to discard (a multiple of the batch size)
 * @param statistic  the minimal MSER value
 * @param reliable   true when the cut lies in the first half of the batches
 */
public record Mser(int n, int batches, int truncation, double statistic, boolean reliable) {

    /** The batch size of MSER-5. */
    public static final int BATCH = 5;

    /** The search keeps at least this many batches. */
    public static final int MIN_KEPT_BATCHES = 5;

    /** MSER-5 on {@code x[0..n)}. With fewer than {@link #MIN_KEPT_BATCHES} batches nothing is cut. */
    public static Mser of(double[] x, int n) {
        int b = n / BATCH;
        if (b < MIN_KEPT_BATCHES) {
            return new Mser(n, b, 0, Double.NaN, false);
        }
        double[] y = new double[b];
        for (int j = 0; j < b; j++) {
            double s = 0;
            for (int i = 0; i < BATCH; i++) {
                s += x[j * BATCH + i];
            }
            y[j] = s / BATCH;
        }
        // suffix sums from the end; shift by the last batch mean to keep the sums well conditioned
        double shift = y[b - 1];
        double s1 = 0;
        double s2 = 0;
        double best = Double.POSITIVE_INFINITY;
        int bestD = 0;
        double[] mser = new double[b];
        for (int d = b - 1; d >= 0; d--) {
            double v = y[d] - shift;
            s1 += v;
            s2 += v * v;
            int k = b - d;
            double sse = Math.max(0, s2 - s1 * s1 / k);
            mser[d] = sse / ((double) k * k);
        }
        for (int d = 0; d <= b - MIN_KEPT_BATCHES; d++) {
            if (mser[d] < best) {
                best = mser[d];
                bestD = d;
            }
        }
        return new Mser(n, b, bestD * BATCH, best, bestD <= b / 2);
    }
}
