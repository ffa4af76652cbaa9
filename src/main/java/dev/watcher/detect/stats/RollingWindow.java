package dev.watcher.detect.stats;

/**
 * A fixed-capacity ring of the last values of one series, oldest first. O(1) per {@link #add}; memory is the
 * capacity. Mutable; not thread-safe.
 */
public final class RollingWindow {
    private final double[] ring;
    private int start;
    private int size;

    public RollingWindow(int capacity) {
        if (capacity < 1) {
            throw new IllegalArgumentException("capacity must be positive: " + capacity);
        }
        ring = new double[capacity];
    }

    /** Appends a value, dropping the oldest when full. */
    public void add(double v) {
        if (size < ring.length) {
            int at = start + size;
            ring[at >= ring.length ? at - ring.length : at] = v;
            size++;
        } else {
            ring[start] = v;
            start = start + 1 == ring.length ? 0 : start + 1;
        }
    }

    public int size() {
        return size;
    }

    public int capacity() {
        return ring.length;
    }

    public boolean full() {
        return size == ring.length;
    }

    /** The i-th value, 0 = oldest. */
    public double get(int i) {
        int at = start + i;
        return ring[at >= ring.length ? at - ring.length : at];
    }

    /** The newest value; NaN when empty. */
    public double last() {
        return size == 0 ? Double.NaN : get(size - 1);
    }

    /** Copies the values oldest first into {@code dst} (at least {@link #size()} long); returns the count. */
    public int copyTo(double[] dst) {
        int first = Math.min(size, ring.length - start);
        System.arraycopy(ring, start, dst, 0, first);
        System.arraycopy(ring, 0, dst, first, size - first);
        return size;
    }

    /** The values oldest first in a new array. */
    public double[] toArray() {
        double[] a = new double[size];
        copyTo(a);
        return a;
    }

    public void clear() {
        start = 0;
        size = 0;
    }
}
