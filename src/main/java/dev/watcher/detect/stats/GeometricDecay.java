package dev.watcher.detect.stats;

/**
 * The limit and remaining error of a sequence that approaches its limit geometrically, phi_n = phi_inf +
 * A lambda^n, from three equally spaced values x0, x1, x2. Aitken's delta-squared extrapolation gives
 * phi_inf = x2 - (x2 - x1)^2 / ((x2 - x1) - (x1 - x0)), exact for such a sequence (Aitken 1926 [memory]);
 * lambda (per spacing) = (x2 - x1) / (x1 - x0); and the remaining error of the latest value is the geometric
 * estimate phi_n - phi_inf ~ (phi_{n+1} - phi_n) / (lambda - 1) of Ferziger &amp; Peric (<i>Computational
 * Methods for Fluid Dynamics</i>, section on iteration errors [memory]), which is x2 - phi_inf, written
 * lambda (x2 - x1) / (lambda - 1).
 *
 * @param limit          the extrapolated limit phi_inf (NaN when not valid)
 * @param lambda         the ratio of successive differences per spacing
 * @param remainingError x2 - phi_inf, the signed error of the latest value (NaN when not valid)
 * @param valid          true when |lambda| &lt; 1, i.e. the differences shrink geometrically
 */
public record GeometricDecay(double limit, double lambda, double remainingError, boolean valid) {

    /** Aitken's extrapolated limit of x0, x1, x2 (NaN when the second difference is zero). */
    public static double aitken(double x0, double x1, double x2) {
        double d1 = x1 - x0;
        double d2 = x2 - x1;
        double den = d2 - d1;
        if (den == 0) {
            return Double.NaN;
        }
        return x2 - d2 * d2 / den;
    }

    /** The estimate from three equally spaced values. */
    public static GeometricDecay of(double x0, double x1, double x2) {
        double d1 = x1 - x0;
        double d2 = x2 - x1;
        if (d1 == 0) {
            boolean flat = d2 == 0;
            return new GeometricDecay(flat ? x2 : Double.NaN, 0, flat ? 0 : Double.NaN, flat);
        }
        double lambda = d2 / d1;
        if (!(Math.abs(lambda) < 1)) {
            return new GeometricDecay(Double.NaN, lambda, Double.NaN, false);
        }
        // x2 - phi_inf = d2^2 / (d2 - d1) = lambda d2 / (lambda - 1): the next difference over (lambda - 1)
        double error = lambda * d2 / (lambda - 1);
        double limit = x2 - error;
        return new GeometricDecay(limit, lambda, error, true);
    }

    /**
     * The estimate from the means of three consecutive blocks of {@code block} values ending at {@code
     * x[n-1]}: block means of a geometric sequence are geometric too (ratio lambda^block), and averaging
     * tames noise. {@link #lambda()} is then per block; the remaining error refers to the last block's mean.
     * Null when fewer than 3 blocks fit.
     */
    public static GeometricDecay ofBlocks(double[] x, int n, int block) {
        if (block < 1 || 3 * block > n) {
            return null;
        }
        double[] m = new double[3];
        for (int b = 0; b < 3; b++) {
            double s = 0;
            int start = n - (3 - b) * block;
            for (int i = 0; i < block; i++) {
                s += x[start + i];
            }
            m[b] = s / block;
        }
        return of(m[0], m[1], m[2]);
    }
}
