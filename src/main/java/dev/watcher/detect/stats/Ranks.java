package dev.watcher.detect.stats;

import java.util.Arrays;

/** Mid-ranks (1-based, ties get the average of their ranks), as in rank-based statistics. */
final class Ranks {
    private Ranks() {
    }

    static double[] of(double[] x, int n) {
        Integer[] idx = new Integer[n];
        for (int i = 0; i < n; i++) {
            idx[i] = i;
        }
        Arrays.sort(idx, (a, b) -> Double.compare(x[a], x[b]));
        double[] r = new double[n];
        int i = 0;
        while (i < n) {
            int j = i + 1;
            while (j < n && x[idx[j]] == x[idx[i]]) {
                j++;
            }
            double rank = (i + 1 + j) / 2.0; // average of ranks i+1..j
            for (int k = i; k < j; k++) {
                r[idx[k]] = rank;
            }
            i = j;
        }
        return r;
    }
}
