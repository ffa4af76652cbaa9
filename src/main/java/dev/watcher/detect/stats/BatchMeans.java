package dev.watcher.detect.stats;

import org.apache.commons.math3.distribution.TDistribution;

/**
 * The method of non-overlapping batch means for the confidence interval of the mean of an autocorrelated,
 * stationary series (Law &amp; Kelton, <i>Simulation Modeling and Analysis</i>, batch means [memory]; Schmeiser
 * 1982 on using 10 to 30 batches [memory]). The last {@code batches * size} values are split into batches
 * of equal size; when the batches are long enough their means are nearly independent and nearly normal, so
 * the half-width is t_{B-1, 1-a/2} s_B / sqrt(B) with s_B the standard deviation of the B batch means
 * (Student's t from Commons Math).
 *
 * @param batches    number of batches B
 * @param batchSize  values per batch
 * @param mean       grand mean of the batched values
 * @param halfWidth  half-width of the confidence interval of the mean
 * @param confidence the confidence level, e.g. 0.95
 * @param means      the batch means, oldest first (a copy)
 */
public record BatchMeans(int batches, int batchSize, double mean, double halfWidth, double confidence,
        double[] means) {

    public BatchMeans {
        means = means.clone();
    }

    /** The batch means as a fresh copy. */
    @Override
    public double[] means() {
        return means.clone();
    }

    /**
     * Batch means of {@code x[from..from+n)} with {@code batches} batches (the earliest leftover values that
     * do not fill a batch are left out). Returns null when there are fewer than two values per batch or
     * fewer than two batches.
     */
    public static BatchMeans of(double[] x, int from, int n, int batches, double confidence) {
        if (batches < 2 || n / batches < 2) {
            return null;
        }
        int size = n / batches;
        int start = from + n - size * batches;
        double[] m = new double[batches];
        double grand = 0;
        for (int j = 0; j < batches; j++) {
            double s = 0;
            for (int i = 0; i < size; i++) {
                s += x[start + j * size + i];
            }
            m[j] = s / size;
            grand += m[j];
        }
        grand /= batches;
        double ss = 0;
        for (double v : m) {
            ss += (v - grand) * (v - grand);
        }
        double sd = Math.sqrt(ss / (batches - 1));
        double t = tQuantile(batches - 1, 1 - (1 - confidence) / 2);
        return new BatchMeans(batches, size, grand, t * sd / Math.sqrt(batches), confidence, m);
    }

    private static final java.util.concurrent.ConcurrentHashMap<String, Double> T_QUANTILES =
            new java.util.concurrent.ConcurrentHashMap<>();

    /**
     * Student's t quantile (Commons Math, without creating a random generator). Remembered per (df, p): the
     * detectors ask for a handful of them over and over, and the inversion is iterative.
     */
    public static double tQuantile(int degreesOfFreedom, double p) {
        return T_QUANTILES.computeIfAbsent(degreesOfFreedom + ":" + p,
                k -> new TDistribution(null, degreesOfFreedom).inverseCumulativeProbability(p));
    }
}
