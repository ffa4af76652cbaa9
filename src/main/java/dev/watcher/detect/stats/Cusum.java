package dev.watcher.detect.stats;

/**
 * The one-sided upper tabular CUSUM (Page 1954, <i>Biometrika</i> 41:100-115): C_i = max(0, C_{i-1} + z_i -
 * k), signal when C_i &gt; h, on standardized observations z. A fast initial response starts C at a head
 * start (Lucas &amp; Crosier 1982, <i>Technometrics</i> 24:199-205), so a shift present from the start signals
 * sooner. k = 0.5 and h = 4..5 are the textbook choices. For a downward CUSUM feed -z.
 *
 * <p>O(1) per observation. Mutable; one instance per series; not thread-safe.
 */
public final class Cusum {
    private final double k;
    private final double h;
    private final double headStart;
    private double c;
    private long count;
    private long runLength;

    /**
     * @param k         reference value (allowance), in units of the observations' standard deviation
     * @param h         decision interval
     * @param headStart the fast-initial-response start value (0 for none), applied now and at each reset
     */
    public Cusum(double k, double h, double headStart) {
        this.k = k;
        this.h = h;
        this.headStart = headStart;
        this.c = headStart;
    }

    /** Adds one standardized observation; returns true when the statistic now exceeds h. */
    public boolean add(double z) {
        c = Math.max(0, c + z - k);
        count++;
        runLength = c > 0 ? runLength + 1 : 0;
        return c > h;
    }

    /** The current statistic C_i. */
    public double value() {
        return c;
    }

    /** True when the current statistic exceeds h. */
    public boolean signalled() {
        return c > h;
    }

    /** Observations since the statistic was last 0 (an estimate of how long ago the shift began). */
    public long runLength() {
        return runLength;
    }

    /** Observations since construction or the last reset. */
    public long count() {
        return count;
    }

    /** Starts again from the head start. */
    public void reset() {
        c = headStart;
        count = 0;
        runLength = 0;
    }
}
