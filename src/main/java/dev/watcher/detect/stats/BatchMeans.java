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
     * The lag-one sample autocorrelation of the batch means, r1 = sum_{j&lt;B-1} (m_j - mean)(m_{j+1} - mean) /
     * sum_j (m_j - mean)^2 (the usual sample autocorrelation, e.g. Box &amp; Jenkins [memory]); 0 when the means
     * are all equal.
     */
    public double lagOneCorrelation() {
        double den = 0;
        double num = 0;
        for (int j = 0; j < means.length; j++) {
            double d = means[j] - mean;
            den += d * d;
            if (j + 1 < means.length) {
                num += d * (means[j + 1] - mean);
            }
        }
        return den > 0 ? num / den : 0;
    }

    /**
     * The half-width widened for correlated batch means: {@link #halfWidth()} times sqrt((1 + r) / (1 - r)),
     * r = max(0, {@link #lagOneCorrelation()}). The variance of the mean of n values of a series with lag-one
     * correlation r is about (sigma^2 / n) (1 + r) / (1 - r) (the effective sample size n (1 - r) / (1 + r) of
     * a first-order autoregressive series: Bayley &amp; Hammersley 1946; Wilks, <i>Statistical Methods in the
     * Atmospheric Sciences</i>, section on serial correlation [memory]). Independent batch means (batches longer
     * than the series' memory, as the method assumes) leave the half-width as it is; batches shorter than,
     * say, a slow oscillation's period do not, and their interval would otherwise claim a precision the
     * window does not have. A negative r is not used to narrow the interval. The sample r1 of B values stays
     * below cos(pi / (B + 1)), so the factor is finite.
     */
    public double effectiveHalfWidth() {
        double r = Math.max(0, lagOneCorrelation());
        return halfWidth * Math.sqrt((1 + r) / (1 - r));
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
        double t = tQuantile(batches - 1, twoSided(confidence));
        return new BatchMeans(batches, size, grand, t * sd / Math.sqrt(batches), confidence, m);
    }

    /** The upper quantile's probability for a two-sided interval of the given confidence. */
    static double twoSided(double confidence) {
        return 1 - (1 - confidence) / 2;
    }

    /**
     * Computes ahead the quantiles that batch means of {@code confidence} ask for (9 to 29 degrees of
     * freedom), so that the first judgements of a run do not wait for them: a start-up head start, the same
     * values as when computed on demand.
     */
    public static void prepare(double confidence) {
        for (int df = 9; df <= 29; df++) {
            tQuantile(df, twoSided(confidence));
        }
    }

    /** Quantiles are remembered for these degrees of freedom (batch means use 9 to 29); others are computed. */
    private static final int CACHED_DF = 128;
    private static final long NOT_YET = Double.doubleToRawLongBits(Double.NaN);
    /** Per probability, the quantiles by degrees of freedom (NaN until asked for): a run asks for one or two p. */
    private static final java.util.concurrent.ConcurrentHashMap<Double, java.util.concurrent.atomic.AtomicLongArray>
            T_QUANTILES = new java.util.concurrent.ConcurrentHashMap<>();

    /**
     * Student's t quantile (Commons Math, without creating a random generator). Remembered per (df, p): the
     * detectors ask for a handful of them over and over, and the inversion is iterative. The memory is an
     * array per p indexed by df (a record or string key cost more than the batch means themselves, and a
     * record's first hash took milliseconds of start-up).
     */
    public static double tQuantile(int degreesOfFreedom, double p) {
        if (degreesOfFreedom < 1 || degreesOfFreedom >= CACHED_DF) {
            return new TDistribution(null, degreesOfFreedom).inverseCumulativeProbability(p);
        }
        java.util.concurrent.atomic.AtomicLongArray byDf = T_QUANTILES.computeIfAbsent(p, k -> {
            java.util.concurrent.atomic.AtomicLongArray a = new java.util.concurrent.atomic.AtomicLongArray(CACHED_DF);
            for (int i = 0; i < CACHED_DF; i++) {
                a.set(i, NOT_YET);
            }
            return a;
        });
        long bits = byDf.get(degreesOfFreedom);
        if (bits != NOT_YET) {
            return Double.longBitsToDouble(bits);
        }
        double q = new TDistribution(null, degreesOfFreedom).inverseCumulativeProbability(p);
        byDf.set(degreesOfFreedom, Double.doubleToRawLongBits(q));
        return q;
    }
}
