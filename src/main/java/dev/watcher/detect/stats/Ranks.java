package dev.watcher.detect.stats;

/** Mid-ranks (1-based, ties get the average of their ranks), as in rank-based statistics. */
final class Ranks {
    private Ranks() {
    }

    /** O(n^2) without allocation beyond the result: the windows here are small (tens of points). */
    static double[] of(double[] x, int n) {
        double[] r = new double[n];
        for (int i = 0; i < n; i++) {
            int below = 0;
            int equal = 0;
            double xi = x[i];
            for (int j = 0; j < n; j++) {
                double xj = x[j];
                if (xj < xi) {
                    below++;
                } else if (xj == xi) {
                    equal++;
                }
            }
            r[i] = below + (equal + 1) / 2.0; // ranks below+1 .. below+equal averaged
        }
        return r;
    }
}
