package dev.watcher.detect;

import dev.watcher.model.IterationRecord;
import dev.watcher.model.Samples;
import java.util.ArrayList;
import java.util.List;
import java.util.Random;

/**
 * Small real iterative numerics whose histories the detector tests judge. Each method runs the iteration and
 * records what a solver log would show: residuals per equation (RMS of the discrete equations' residual,
 * normalised by its largest value over the first five iterations, as solvers commonly print them) and
 * monitors. These are our own test problems; their outcomes are facts of the numerics, not invented numbers.
 */
final class SmallSolvers {

    private SmallSolvers() {
    }

    /**
     * Steady 1D Poisson problem -u'' = 1 on (0, 1), u(0) = u(1) = 0, {@code n} interior points, solved by
     * Gauss–Seidel sweeps from a rough start (uniform noise of amplitude {@code roughness}). The rough part
     * of the error dies in a few sweeps and takes most of the normalised residual with it, while the smooth
     * part decays by about 1 - pi^2 h^2 per sweep: the residual falls below 1e-5 long before the centre value
     * (monitor {@code centre-value}) stops moving. A second, independent equation (-v'' = 2, also from a rough
     * start) gives a second residual and the monitor {@code species-mean}. The monitor {@code asymmetry} =
     * u(x) - u(1 - x) at mirrored points goes to zero (the problem is symmetric): a monitor near zero.
     */
    static List<IterationRecord> poissonGaussSeidel(int n, int sweeps, double roughness, long seed) {
        return poissonGaussSeidel(n, sweeps, roughness, seed, Integer.MAX_VALUE, 0);
    }

    /**
     * As {@link #poissonGaussSeidel(int, int, double, long)}, but from sweep {@code rampFrom} on the source of
     * the first equation grows by {@code rampPerSweep} (relative) each sweep, as when a boundary condition is
     * ramped during a steady run: the iterations keep up, so its residual stays small while the centre value
     * follows the source and drifts.
     */
    static List<IterationRecord> poissonGaussSeidel(int n, int sweeps, double roughness, long seed, int rampFrom,
            double rampPerSweep) {
        double h = 1.0 / (n + 1);
        Random rng = new Random(seed);
        double[] u = new double[n];
        double[] v = new double[n];
        for (int i = 0; i < n; i++) {
            u[i] = roughness * (2 * rng.nextDouble() - 1);
            v[i] = roughness * (2 * rng.nextDouble() - 1);
        }
        List<String> eqs = List.of("heat", "species");
        List<String> mons = List.of("centre-value", "species-mean", "asymmetry");
        List<IterationRecord> out = new ArrayList<>();
        double nu = 0;
        double nv = 0;
        double fu = 1.0;
        for (int it = 1; it <= sweeps; it++) {
            if (it >= rampFrom) {
                fu *= 1 + rampPerSweep;
            }
            gaussSeidel(u, fu, h);
            gaussSeidel(v, 2.0, h);
            double ru = rms(u, fu, h);
            double rv = rms(v, 2.0, h);
            if (it <= 5) {
                nu = Math.max(nu, ru);
                nv = Math.max(nv, rv);
            }
            double mean = 0;
            for (double x : v) {
                mean += x;
            }
            out.add(IterationRecord.steady(it, new Samples(eqs, new double[] {ru / nu, rv / nv}),
                    new Samples(mons, new double[] {u[n / 2], mean / n, u[n / 4] - u[n - 1 - n / 4]})));
        }
        return out;
    }

    /** The records with the step and inner fields removed, as a log that prints neither would give them. */
    static List<IterationRecord> withoutStepFields(List<IterationRecord> history, boolean keepInner) {
        List<IterationRecord> out = new ArrayList<>();
        for (IterationRecord r : history) {
            out.add(new IterationRecord(r.iter(), IterationRecord.NONE, Double.NaN,
                    keepInner ? r.inner() : IterationRecord.NONE, r.residuals(), r.monitors(), r.segment(), r.line()));
        }
        return out;
    }

    /** The records with every residual multiplied by {@code factor}, as a solver printing raw residuals would. */
    static List<IterationRecord> scaledResiduals(List<IterationRecord> history, double factor) {
        List<IterationRecord> out = new ArrayList<>();
        for (IterationRecord r : history) {
            double[] v = r.residuals().values().clone();
            for (int i = 0; i < v.length; i++) {
                v[i] *= factor;
            }
            out.add(new IterationRecord(r.iter(), r.step(), r.time(), r.inner(),
                    new Samples(r.residuals().names(), v), r.monitors(), r.segment(), r.line()));
        }
        return out;
    }

    /** The same problem with only residuals in the log (no monitors). */
    static List<IterationRecord> withoutMonitors(List<IterationRecord> history) {
        List<IterationRecord> out = new ArrayList<>();
        for (IterationRecord r : history) {
            out.add(new IterationRecord(r.iter(), r.step(), r.time(), r.inner(), r.residuals(), Samples.EMPTY,
                    r.segment(), r.line()));
        }
        return out;
    }

    private static void gaussSeidel(double[] u, double f, double h) {
        int n = u.length;
        for (int i = 0; i < n; i++) {
            double e = i + 1 < n ? u[i + 1] : 0;
            double w = i > 0 ? u[i - 1] : 0;
            u[i] = (f * h * h + e + w) / 2;
        }
    }

    private static double rms(double[] u, double f, double h) {
        int n = u.length;
        double s = 0;
        for (int i = 0; i < n; i++) {
            double e = i + 1 < n ? u[i + 1] : 0;
            double w = i > 0 ? u[i - 1] : 0;
            double r = f - (2 * u[i] - e - w) / (h * h);
            s += r * r;
        }
        return Math.sqrt(s / n);
    }

    /**
     * Unsteady 1D reaction–diffusion u_t = nu u_xx - k u + f(x) on (0, 1) with u = 0 at both ends: backward
     * Euler for the diffusion, the reaction term lagged to the old time level (explicit), {@code inner}
     * Gauss–Seidel sweeps per step. The explicit reaction is stable only for dt k &lt; 2 (roughly: the
     * implicit diffusion damps a little): above it the departure from the steady state grows by about
     * |1 - dt k| per step, so each step starts from a larger residual (rising peaks) while the inner sweeps
     * still reduce the residual within the step. Residuals: {@code concentration}; monitor: {@code
     * centre-concentration} at each inner iteration. Stops early when the solution overflows. With a large
     * diffusivity {@code nu} the sweeps meet a diffusion-dominated system, on which Gauss–Seidel converges
     * only by about 1 - O(h^2) per sweep: a few sweeps then hardly reduce the residual within a step.
     */
    static List<IterationRecord> reactionDiffusion(double dt, int steps, int inner, double nu) {
        return reactionDiffusion(dt, steps, inner, nu, 1, 0, 0);
    }

    /**
     * {@link #reactionDiffusion(double, int, int, double)} driven by a periodic source, as a flow shedding
     * vortices is driven by its own periodic wake: f(x, t) = f(x) + a1 sin(pi x) sin(w t) + a2 sin(2 pi x)
     * cos(w t) with w = 2 pi / {@code periodTime}. The two modes are orthogonal on (0, 1), so the size of
     * du/dt, and with it each step's first residual, swings between the two modes' shares twice per forcing
     * period without ever passing through zero; after the start-up transient (decay rate k = 1) the peaks are
     * periodic. With dt k &lt; 2 the stepping is stable and the peaks stay bounded; above it they climb on top
     * of the oscillation.
     */
    static List<IterationRecord> reactionDiffusion(double dt, int steps, int inner, double nu, double periodTime,
            double a1, double a2) {
        int n = 32;
        double k = 1.0;
        double h = 1.0 / (n + 1);
        double[] f = new double[n];
        for (int i = 0; i < n; i++) {
            f[i] = 1.0 + 0.5 * Math.sin(Math.PI * (i + 1) * h);
        }
        double[] u = new double[n];
        List<String> eqs = List.of("concentration");
        List<String> mons = List.of("centre-concentration");
        List<IterationRecord> out = new ArrayList<>();
        long iter = 0;
        double norm = 0;
        double ap = 1 / dt + 2 * nu / (h * h);
        for (int s = 1; s <= steps; s++) {
            double[] un = u.clone();
            double[] src = new double[n];
            double omega = 2 * Math.PI / periodTime;
            double t = s * dt;
            for (int i = 0; i < n; i++) {
                double x = (i + 1) * h;
                double forcing = a1 == 0 && a2 == 0 ? 0
                        : a1 * Math.sin(Math.PI * x) * Math.sin(omega * t) + a2 * Math.sin(2 * Math.PI * x) * Math.cos(omega * t);
                src[i] = f[i] + forcing - k * un[i];
            }
            for (int it = 1; it <= inner; it++) {
                double r = 0;
                for (int i = 0; i < n; i++) {
                    double e = i + 1 < n ? u[i + 1] : 0;
                    double w = i > 0 ? u[i - 1] : 0;
                    double ri = (u[i] - un[i]) / dt - nu * (e - 2 * u[i] + w) / (h * h) - src[i];
                    r += ri * ri;
                }
                r = Math.sqrt(r / n);
                iter++;
                if (iter <= 5) {
                    norm = Math.max(norm, r);
                }
                if (!Double.isFinite(r) || r / norm > 1e12) {
                    return out;
                }
                out.add(new IterationRecord(iter, s, s * dt, it, new Samples(eqs, new double[] {r / norm}),
                        new Samples(mons, new double[] {u[n / 2]}), 0, iter));
                for (int i = 0; i < n; i++) {
                    double e = i + 1 < n ? u[i + 1] : 0;
                    double w = i > 0 ? u[i - 1] : 0;
                    u[i] = (un[i] / dt + src[i] + nu / (h * h) * (e + w)) / ap;
                }
            }
        }
        return out;
    }

    /**
     * The Van der Pol oscillator x'' - mu (1 - x^2) x' + x = 0, mu = 1, written as x' = y, y' = mu (1 - x^2) y
     * - x, integrated with the trapezoidal rule; each step's implicit equations are solved by {@code inner}
     * fixed-point (Picard) iterations. Residuals: the two equations' residuals at each inner iteration
     * (normalised as above); monitor {@code position} = x. The motion settles onto the limit cycle, whose
     * period for mu = 1 is about 6.663 (e.g. Strogatz, Nonlinear Dynamics and Chaos [memory]), so the
     * residual peaks at step starts are periodic, not rising.
     */
    static List<IterationRecord> vanDerPol(double dt, int steps, int inner, double x0) {
        double mu = 1.0;
        double x = x0;
        double y = 0;
        List<String> eqs = List.of("position-eq", "velocity-eq");
        List<String> mons = List.of("position");
        List<IterationRecord> out = new ArrayList<>();
        long iter = 0;
        double n1 = 0;
        double n2 = 0;
        for (int s = 1; s <= steps; s++) {
            double fx0 = y;
            double fy0 = mu * (1 - x * x) * y - x;
            double xk = x;
            double yk = y;
            for (int it = 1; it <= inner; it++) {
                double fx = yk;
                double fy = mu * (1 - xk * xk) * yk - xk;
                double r1 = Math.abs(xk - x - 0.5 * dt * (fx0 + fx));
                double r2 = Math.abs(yk - y - 0.5 * dt * (fy0 + fy));
                iter++;
                if (iter <= 5) {
                    n1 = Math.max(n1, r1);
                    n2 = Math.max(n2, r2);
                }
                out.add(new IterationRecord(iter, s, s * dt, it,
                        new Samples(eqs, new double[] {n1 > 0 ? r1 / n1 : 1.0, n2 > 0 ? r2 / n2 : 1.0}),
                        new Samples(mons, new double[] {xk}), 0, iter));
                xk = x + 0.5 * dt * (fx0 + fx);
                yk = y + 0.5 * dt * (fy0 + fy);
            }
            x = xk;
            y = yk;
        }
        return out;
    }

    /**
     * Randomized Kaczmarz on an overdetermined least-squares problem A x ~ b: {@code rows} x {@code cols}
     * standard normal entries, b = A x_true + {@code noise} e (e standard normal), x_0 = 0; each iteration
     * projects x onto the hyperplane of one row drawn with probability |a_i|^2 / |A|_F^2 (Strohmer &amp;
     * Vershynin 2009, J. Fourier Anal. Appl. 15:262 [memory]). On consistent data it converges linearly; on
     * inconsistent data (noise &gt; 0) it converges only to within a radius of the least-squares solution set
     * by the noise and then wanders inside it (Needell 2010, BIT Numer. Math. 50:395 [memory]): the residual
     * falls, then bounces randomly around a plateau, a noisy stall from real numerics. From iteration
     * {@code consistentFrom} (when &gt; 0) the data are made consistent (b = A x_true): the stall clears and
     * the residual falls again. Residual {@code fit}: |b - A x| normalised by |b| at the start.
     */
    static List<IterationRecord> randomizedKaczmarz(int rows, int cols, double noise, int iterations,
            int consistentFrom, long seed) {
        Random rng = new Random(seed);
        double[][] a = new double[rows][cols];
        double[] xTrue = new double[cols];
        double[] exact = new double[rows];
        double[] b = new double[rows];
        double[] norm2 = new double[rows];
        for (int j = 0; j < cols; j++) {
            xTrue[j] = rng.nextGaussian();
        }
        double frobenius = 0;
        for (int i = 0; i < rows; i++) {
            for (int j = 0; j < cols; j++) {
                a[i][j] = rng.nextGaussian();
                exact[i] += a[i][j] * xTrue[j];
                norm2[i] += a[i][j] * a[i][j];
            }
            b[i] = exact[i] + noise * rng.nextGaussian();
            frobenius += norm2[i];
        }
        double[] cumulative = new double[rows];
        double c = 0;
        for (int i = 0; i < rows; i++) {
            c += norm2[i];
            cumulative[i] = c / frobenius;
        }
        double b0 = 0;
        for (double v : b) {
            b0 += v * v;
        }
        b0 = Math.sqrt(b0);
        double[] x = new double[cols];
        List<String> eqs = List.of("fit");
        List<IterationRecord> out = new ArrayList<>();
        for (int it = 1; it <= iterations; it++) {
            if (it == consistentFrom) {
                b = exact;
            }
            int i = java.util.Arrays.binarySearch(cumulative, rng.nextDouble());
            i = Math.min(i < 0 ? -i - 1 : i, rows - 1);
            double d = b[i];
            for (int j = 0; j < cols; j++) {
                d -= a[i][j] * x[j];
            }
            d /= norm2[i];
            for (int j = 0; j < cols; j++) {
                x[j] += d * a[i][j];
            }
            double r2 = 0;
            for (int q = 0; q < rows; q++) {
                double e = b[q];
                for (int j = 0; j < cols; j++) {
                    e -= a[q][j] * x[j];
                }
                r2 += e * e;
            }
            out.add(IterationRecord.steady(it, new Samples(eqs, new double[] {Math.sqrt(r2) / b0}), Samples.EMPTY));
        }
        return out;
    }
}
