package dev.watcher.detect.stats;

/** Selection of the k-th smallest value in place (Hoare's quickselect, median-of-three pivots). */
final class Select {
    private Select() {
    }

    /**
     * Rearranges a[from..to) so that a[k] holds the value of rank k (0-based over the whole array, when
     * a[0..from) holds only values not above and a[to..) only values not below the range), with smaller or
     * equal values before it and larger or equal after it; returns a[k].
     */
    static double kth(double[] a, int from, int to, int k) {
        int lo = from;
        int hi = to - 1;
        while (hi > lo) {
            int mid = (lo + hi) >>> 1;
            // median of three as pivot
            if (a[mid] < a[lo]) {
                swap(a, mid, lo);
            }
            if (a[hi] < a[lo]) {
                swap(a, hi, lo);
            }
            if (a[hi] < a[mid]) {
                swap(a, hi, mid);
            }
            double pivot = a[mid];
            int i = lo;
            int j = hi;
            while (i <= j) {
                while (a[i] < pivot) {
                    i++;
                }
                while (a[j] > pivot) {
                    j--;
                }
                if (i <= j) {
                    swap(a, i, j);
                    i++;
                    j--;
                }
            }
            if (k <= j) {
                hi = j;
            } else if (k >= i) {
                lo = i;
            } else {
                break;
            }
        }
        return a[k];
    }

    private static void swap(double[] a, int i, int j) {
        double t = a[i];
        a[i] = a[j];
        a[j] = t;
    }
}
