package dev.watcher.history;

import java.util.Arrays;

/**
 * A bounded, downsampled copy of one series (a residual, a monitor, a per-step peak): at most
 * {@code capacity} buckets, each holding the first and last x (iteration or step), the minimum, maximum and
 * last value of the points it covers. When the buckets are full, neighbours are merged pairwise and the
 * bucket width doubles, so a run of any length keeps its shape and every spike (the maximum survives every
 * merge). Non-finite values are kept as such.
 *
 * <p>Not thread-safe: one writer (the run's thread); readers take a {@link #copy()}.
 */
public final class Series {

    private final int capacity;
    private long width = 1;
    private int n;
    private long[] x0;
    private long[] x1;
    private double[] min;
    private double[] max;
    private double[] last;
    private long count;
    private long lastCount;

    public Series(int capacity) {
        if (capacity < 4 || capacity % 2 != 0) {
            throw new IllegalArgumentException("capacity must be an even number >= 4");
        }
        this.capacity = capacity;
        x0 = new long[capacity];
        x1 = new long[capacity];
        min = new double[capacity];
        max = new double[capacity];
        last = new double[capacity];
    }

    /** Adds a point; x is the iteration (or step) it belongs to, in order of arrival. */
    public void add(long x, double v) {
        count++;
        if (n > 0 && lastCount < width) {
            int i = n - 1;
            x1[i] = x;
            min[i] = minOf(min[i], v);
            max[i] = maxOf(max[i], v);
            last[i] = v;
            lastCount++;
            return;
        }
        if (n == capacity) {
            merge();
        }
        x0[n] = x;
        x1[n] = x;
        min[n] = v;
        max[n] = v;
        last[n] = v;
        n++;
        lastCount = 1;
    }

    private void merge() {
        int m = 0;
        for (int i = 0; i + 1 < n; i += 2) {
            x0[m] = x0[i];
            x1[m] = x1[i + 1];
            min[m] = minOf(min[i], min[i + 1]);
            max[m] = maxOf(max[i], max[i + 1]);
            last[m] = last[i + 1];
            m++;
        }
        n = m;
        width *= 2;
        lastCount = width; // the merged last bucket is full: the next point opens a new one
    }

    private static double minOf(double a, double b) {
        if (Double.isNaN(a)) {
            return b;
        }
        if (Double.isNaN(b)) {
            return a;
        }
        return Math.min(a, b);
    }

    private static double maxOf(double a, double b) {
        if (Double.isNaN(a) || Double.isNaN(b)) {
            return Double.NaN; // a NaN is the most important thing a bucket can hold
        }
        return Math.max(a, b);
    }

    public int size() {
        return n;
    }

    /** Points added in all. */
    public long count() {
        return count;
    }

    public long x0(int i) {
        return x0[i];
    }

    public long x1(int i) {
        return x1[i];
    }

    public double min(int i) {
        return min[i];
    }

    public double max(int i) {
        return max[i];
    }

    public double last(int i) {
        return last[i];
    }

    /** A snapshot copy, safe to read on another thread. */
    public Series copy() {
        Series s = new Series(capacity);
        s.width = width;
        s.n = n;
        s.count = count;
        s.lastCount = lastCount;
        s.x0 = Arrays.copyOf(x0, capacity);
        s.x1 = Arrays.copyOf(x1, capacity);
        s.min = Arrays.copyOf(min, capacity);
        s.max = Arrays.copyOf(max, capacity);
        s.last = Arrays.copyOf(last, capacity);
        return s;
    }

    /** Restores a series from its saved columns (see {@link SeriesStore}). */
    static Series restore(int capacity, long width, long count, long[] x0, long[] x1, double[] min, double[] max,
            double[] last) {
        Series s = new Series(capacity);
        s.width = width;
        s.count = count;
        s.n = Math.min(x0.length, capacity);
        System.arraycopy(x0, 0, s.x0, 0, s.n);
        System.arraycopy(x1, 0, s.x1, 0, s.n);
        System.arraycopy(min, 0, s.min, 0, s.n);
        System.arraycopy(max, 0, s.max, 0, s.n);
        System.arraycopy(last, 0, s.last, 0, s.n);
        s.lastCount = width;
        return s;
    }

    long width() {
        return width;
    }

    int capacity() {
        return capacity;
    }
}
