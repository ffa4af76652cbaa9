package dev.watcher.detect.stats;

import java.util.Arrays;

/**
 * Holm's step-down multiple-test correction (Holm 1979, <i>Scand. J. Statist.</i> 6:65-70): sort the m
 * p-values, reject while p_(i) &le; alpha / (m - i + 1), stop at the first that is not. Controls the
 * family-wise error rate under any dependence between the tests (unlike Fisher's combination, which
 * assumes independence), which is why the detectors use it for correlated equations.
 */
public final class Holm {
    private Holm() {
    }

    /** Which of {@code p[0..m)} are rejected at family-wise level alpha, in input order. */
    public static boolean[] reject(double[] p, int m, double alpha) {
        Integer[] idx = new Integer[m];
        for (int i = 0; i < m; i++) {
            idx[i] = i;
        }
        Arrays.sort(idx, (a, b) -> Double.compare(p[a], p[b]));
        boolean[] out = new boolean[m];
        for (int i = 0; i < m; i++) {
            if (p[idx[i]] <= alpha / (m - i)) {
                out[idx[i]] = true;
            } else {
                break;
            }
        }
        return out;
    }

    /** How many of {@code p[0..m)} are rejected at family-wise level alpha. */
    public static int rejections(double[] p, int m, double alpha) {
        int r = 0;
        for (boolean b : reject(p, m, alpha)) {
            if (b) {
                r++;
            }
        }
        return r;
    }
}
