package dev.watcher.detect.stats;

import org.apache.commons.math3.distribution.TDistribution;

/**
 * Least-squares fit y = a + b t + c t^2 over t = 0..n-1 with a t-test on the curvature c (ordinary least
 * squares; e.g. Draper &amp; Smith, <i>Applied Regression Analysis</i>, polynomial models). A series that falls
 * and then rises has c &gt; 0 with a small one-sided p; the fitted slopes at the first and last point say
 * whether it turned from falling to rising. Residual histories are autocorrelated, so the p-value is
 * optimistic: callers apply it to block means (which decorrelate) and ask for a small level.
 *
 * @param n           number of points
 * @param a           intercept at t = 0
 * @param b           linear coefficient
 * @param c           curvature coefficient
 * @param seC         standard error of c (NaN when n &lt; 4)
 * @param tC          c / seC
 * @param pConvex     one-sided p-value of c &gt; 0 (t-distribution, n - 3 degrees of freedom)
 * @param slopeStart  fitted slope dy/dt at t = 0
 * @param slopeEnd    fitted slope dy/dt at t = n - 1
 */
public record QuadraticFit(int n, double a, double b, double c, double seC, double tC, double pConvex,
        double slopeStart, double slopeEnd) {

    /** The fit of {@code y[0..n)}; for n &lt; 4 the test fields are NaN and pConvex is 1. */
    public static QuadraticFit of(double[] y, int n) {
        // centred and scaled abscissa u = (t - m)/h keeps the normal equations well conditioned
        double m = (n - 1) / 2.0;
        double h = Math.max(m, 1);
        double s0 = n;
        double s1 = 0;
        double s2 = 0;
        double s3 = 0;
        double s4 = 0;
        double sy = 0;
        double suy = 0;
        double su2y = 0;
        for (int i = 0; i < n; i++) {
            double u = (i - m) / h;
            double u2 = u * u;
            s1 += u;
            s2 += u2;
            s3 += u2 * u;
            s4 += u2 * u2;
            sy += y[i];
            suy += u * y[i];
            su2y += u2 * y[i];
        }
        double[][] g = {{s0, s1, s2}, {s1, s2, s3}, {s2, s3, s4}};
        double[][] inv = invert3(g);
        if (inv == null || n < 3) {
            return new QuadraticFit(n, Double.NaN, Double.NaN, Double.NaN, Double.NaN, Double.NaN, 1.0,
                    Double.NaN, Double.NaN);
        }
        double[] rhs = {sy, suy, su2y};
        double[] beta = new double[3];
        for (int r = 0; r < 3; r++) {
            beta[r] = inv[r][0] * rhs[0] + inv[r][1] * rhs[1] + inv[r][2] * rhs[2];
        }
        double sse = 0;
        for (int i = 0; i < n; i++) {
            double u = (i - m) / h;
            double e = y[i] - (beta[0] + beta[1] * u + beta[2] * u * u);
            sse += e * e;
        }
        // back to t: y = b0 + b1 (t-m)/h + b2 (t-m)^2/h^2
        double c = beta[2] / (h * h);
        double b = beta[1] / h - 2 * c * m;
        double a = beta[0] - beta[1] * m / h + c * m * m;
        double seC = Double.NaN;
        double tC = Double.NaN;
        double p = 1.0;
        if (n > 3) {
            double sigma2 = sse / (n - 3);
            seC = Math.sqrt(sigma2 * inv[2][2]) / (h * h);
            if (seC > 0) {
                tC = c / seC;
                p = 1 - new TDistribution(null, n - 3).cumulativeProbability(tC);
            } else {
                tC = c == 0 ? 0 : Math.copySign(Double.POSITIVE_INFINITY, c);
                p = c > 0 ? 0 : 1;
            }
        }
        return new QuadraticFit(n, a, b, c, seC, tC, p, b, b + 2 * c * (n - 1));
    }

    private static double[][] invert3(double[][] g) {
        double a = g[0][0];
        double b = g[0][1];
        double c = g[0][2];
        double d = g[1][0];
        double e = g[1][1];
        double f = g[1][2];
        double gg = g[2][0];
        double h = g[2][1];
        double i = g[2][2];
        double det = a * (e * i - f * h) - b * (d * i - f * gg) + c * (d * h - e * gg);
        if (!(Math.abs(det) > 1e-300)) {
            return null;
        }
        return new double[][] {
            {(e * i - f * h) / det, (c * h - b * i) / det, (b * f - c * e) / det},
            {(f * gg - d * i) / det, (a * i - c * gg) / det, (c * d - a * f) / det},
            {(d * h - e * gg) / det, (b * gg - a * h) / det, (a * e - b * d) / det}};
    }
}
