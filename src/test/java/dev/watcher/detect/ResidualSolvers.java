package dev.watcher.detect;

import dev.watcher.model.IterationRecord;
import dev.watcher.model.Samples;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * Small real iterative solvers whose residual histories the detector tests judge. Each is a finite-volume
 * discretisation on a uniform N x N grid of the unit square (5-point stencils, Dirichlet walls), solved by
 * Gauss–Seidel sweeps with under-relaxation; the residual printed per sweep is the L2 norm of b + sum a_nb
 * phi_nb - a_P phi, normalised by its value after the first sweep (as solvers commonly print them).
 * Nothing here is fitted to the detectors: the scenarios are physics and numerics of our own choosing,
 * and the tests assert on where the histories themselves say the onset and the deadline are.
 */
final class ResidualSolvers {

    private ResidualSolvers() {
    }

    /** A 5-point operator a_P phi_P = sum a_nb phi_nb + b on the interior cells of an (n+2)^2 array. */
    static final class Stencil {
        final int n;
        final double[][] ae;
        final double[][] aw;
        final double[][] an;
        final double[][] as;
        final double[][] ap;
        final double[][] b;

        Stencil(int n) {
            this.n = n;
            ae = new double[n + 2][n + 2];
            aw = new double[n + 2][n + 2];
            an = new double[n + 2][n + 2];
            as = new double[n + 2][n + 2];
            ap = new double[n + 2][n + 2];
            b = new double[n + 2][n + 2];
        }

        /**
         * Steady convection–diffusion with unit diffusion per face and cell Peclet numbers (fx, fy) given
         * per cell: central differencing (second order, loses diagonal dominance above cell Peclet 2) or
         * first-order upwind (always diagonally dominant). Patankar 1980, Numerical Heat Transfer and
         * Fluid Flow, ch. 5 (coefficients of the central and upwind schemes).
         */
        void convectionDiffusion(double[][] fx, double[][] fy, boolean central) {
            for (int j = 1; j <= n; j++) {
                for (int i = 1; i <= n; i++) {
                    double u = fx[j][i];
                    double v = fy[j][i];
                    if (central) {
                        ae[j][i] = 1 - u / 2;
                        aw[j][i] = 1 + u / 2;
                        an[j][i] = 1 - v / 2;
                        as[j][i] = 1 + v / 2;
                    } else {
                        ae[j][i] = 1 + Math.max(-u, 0);
                        aw[j][i] = 1 + Math.max(u, 0);
                        an[j][i] = 1 + Math.max(-v, 0);
                        as[j][i] = 1 + Math.max(v, 0);
                    }
                    ap[j][i] = ae[j][i] + aw[j][i] + an[j][i] + as[j][i];
                }
            }
        }

        /** One lexicographic Gauss–Seidel sweep with relaxation factor alpha. */
        void sweep(double[][] phi, double alpha) {
            for (int j = 1; j <= n; j++) {
                for (int i = 1; i <= n; i++) {
                    double nb = ae[j][i] * phi[j][i + 1] + aw[j][i] * phi[j][i - 1] + an[j][i] * phi[j + 1][i]
                            + as[j][i] * phi[j - 1][i] + b[j][i];
                    phi[j][i] += alpha * (nb / ap[j][i] - phi[j][i]);
                }
            }
        }

        double residual(double[][] phi) {
            double s = 0;
            for (int j = 1; j <= n; j++) {
                for (int i = 1; i <= n; i++) {
                    double r = ae[j][i] * phi[j][i + 1] + aw[j][i] * phi[j][i - 1] + an[j][i] * phi[j + 1][i]
                            + as[j][i] * phi[j - 1][i] + b[j][i] - ap[j][i] * phi[j][i];
                    s += r * r;
                }
            }
            return Math.sqrt(s);
        }
    }

    /** Collects one record per sweep with residuals normalised by the first sweep's. */
    static final class Log {
        final List<IterationRecord> records = new ArrayList<>();
        final Map<String, Double> first = new LinkedHashMap<>();
        List<String> names;
        long iter;
        int segment;
        int nonFinite;

        /** Adds a record; returns false when the run should stop (a few records after a non-finite value). */
        boolean add(Map<String, Double> raw, Map<String, Double> monitors) {
            iter++;
            if (names == null) {
                names = List.copyOf(raw.keySet());
            }
            double[] v = new double[names.size()];
            boolean bad = false;
            for (int k = 0; k < v.length; k++) {
                String e = names.get(k);
                double r = raw.get(e);
                first.putIfAbsent(e, r == 0 ? 1 : r);
                double x = r / first.get(e);
                // a solver prints a field too wide for its format as an overflow marker: +Infinity here
                v[k] = Double.isNaN(x) ? Double.NaN : x > 1e300 ? Double.POSITIVE_INFINITY : x;
                bad |= !Double.isFinite(v[k]);
            }
            Samples mon = monitors == null ? Samples.EMPTY : Samples.of(monitors);
            records.add(new IterationRecord(iter, IterationRecord.NONE, Double.NaN, IterationRecord.NONE,
                    new Samples(names, v), mon, segment, iter));
            if (bad) {
                nonFinite++;
            }
            return nonFinite < 3;
        }

        /** A restart: new segment, residuals normalised afresh. */
        void restart() {
            segment++;
            first.clear();
        }
    }

    private static double[][] grid(int n) {
        return new double[n + 2][n + 2];
    }

    private static double centre(int i, int n) {
        return (i - 0.5) / n;
    }

    /**
     * Transport of two velocity components (mom-x, mom-y: linearised momentum, each convected by a
     * prescribed rotating flow whose strength develops over the first iterations, peak cell Peclet number
     * rising as peFinal (1 - exp(-k/100))), plus a passive temperature (temp, always first-order upwind) and a
     * pressure-like Poisson equation (cont). With {@code central} the momentum components use central
     * differencing: they fall while the cell Peclet number is low and diverge once it passes about 4 (a
     * Gauss–Seidel sweep cannot follow a recirculating flow of a non-diagonally-dominant operator); with
     * first-order upwind everything converges.
     */
    static List<IterationRecord> developingVortex(boolean central, double peFinal, int iterations) {
        int n = 16;
        Stencil mom = new Stencil(n);
        Stencil heat = new Stencil(n);
        Stencil p = new Stencil(n);
        for (int j = 1; j <= n; j++) {
            for (int i = 1; i <= n; i++) {
                p.ae[j][i] = p.aw[j][i] = p.an[j][i] = p.as[j][i] = 1;
                p.ap[j][i] = 4;
                p.b[j][i] = Math.sin(Math.PI * centre(i, n)) * Math.sin(2 * Math.PI * centre(j, n)) / (n * n);
            }
        }
        double[][] u = grid(n);
        double[][] v = grid(n);
        double[][] t = grid(n);
        double[][] pr = grid(n);
        for (int k = 0; k < n + 2; k++) {
            u[k][0] = 1; // west wall
            u[0][k] = 1; // south wall
            v[n + 1][k] = 1; // north wall
            t[k][0] = 1;
        }
        double[][] fx = grid(n);
        double[][] fy = grid(n);
        Log log = new Log();
        for (int it = 1; it <= iterations; it++) {
            double pe = peFinal * (1 - Math.exp(-it / 100.0));
            for (int j = 1; j <= n; j++) {
                for (int i = 1; i <= n; i++) {
                    fx[j][i] = -pe * 2 * (centre(j, n) - 0.5);
                    fy[j][i] = pe * 2 * (centre(i, n) - 0.5);
                }
            }
            mom.convectionDiffusion(fx, fy, central);
            heat.convectionDiffusion(fx, fy, false);
            mom.sweep(u, 1.0);
            mom.sweep(v, 1.0);
            heat.sweep(t, 1.0);
            p.sweep(pr, 1.0);
            Map<String, Double> r = new LinkedHashMap<>();
            r.put("cont", p.residual(pr));
            r.put("mom-x", mom.residual(u));
            r.put("mom-y", mom.residual(v));
            r.put("temp", heat.residual(t));
            if (!log.add(r, null)) {
                break;
            }
        }
        return log.records;
    }

    /**
     * A coupled case with one bad cell coefficient: the developed rotating flow (cell Peclet 1.5, upwind,
     * stable) carries momentum components and a temperature; the temperature equation has one cell whose
     * central coefficient is only {@code badFactor} of the sum of its neighbours' (a badly shaped cell);
     * the momentum equations feel the temperature through a weak buoyancy source. Everything falls at
     * first; then the mode local to the bad cell takes over and temp grows, and later drags momentum.
     * When {@code fixAt} &gt; 0 the cell is repaired at that iteration and the run restarted (new segment).
     */
    static List<IterationRecord> badCell(double badFactor, double beta, int iterations, int fixAt) {
        int n = 16;
        Stencil mom = new Stencil(n);
        Stencil heat = new Stencil(n);
        double[][] fx = grid(n);
        double[][] fy = grid(n);
        for (int j = 1; j <= n; j++) {
            for (int i = 1; i <= n; i++) {
                fx[j][i] = -1.5 * 2 * (centre(j, n) - 0.5);
                fy[j][i] = 1.5 * 2 * (centre(i, n) - 0.5);
            }
        }
        mom.convectionDiffusion(fx, fy, false);
        heat.convectionDiffusion(fx, fy, false);
        int bj = 5;
        int bi = 11;
        heat.ap[bj][bi] = badFactor * (heat.ae[bj][bi] + heat.aw[bj][bi] + heat.an[bj][bi] + heat.as[bj][bi]);
        double[][] u = grid(n);
        double[][] v = grid(n);
        double[][] t = grid(n);
        for (int k = 0; k < n + 2; k++) {
            u[k][0] = 1;
            v[n + 1][k] = 1;
            t[k][0] = 1;
        }
        Log log = new Log();
        for (int it = 1; it <= iterations; it++) {
            if (it == fixAt) {
                // the cell is repaired and the run restarted from the current fields (a declared restart)
                heat.ap[bj][bi] = heat.ae[bj][bi] + heat.aw[bj][bi] + heat.an[bj][bi] + heat.as[bj][bi];
                log.restart();
            }
            for (int j = 1; j <= n; j++) {
                for (int i = 1; i <= n; i++) {
                    mom.b[j][i] = beta * t[j][i];
                }
            }
            mom.sweep(u, 0.9);
            mom.sweep(v, 0.9);
            heat.sweep(t, 0.9);
            Map<String, Double> r = new LinkedHashMap<>();
            r.put("mom-x", mom.residual(u));
            r.put("mom-y", mom.residual(v));
            r.put("temp", heat.residual(t));
            if (!log.add(r, null)) {
                break;
            }
        }
        return log.records;
    }

    /**
     * Steady two-dimensional viscous Burgers equations (mom-x, mom-y) in a cavity with two moving walls
     * (north wall u = 1, west wall v = -1), viscosity 0.01, central differencing, Picard linearisation
     * (coefficients from the current iterate) and Gauss–Seidel sweeps with relaxation factor {@code alpha}.
     * With alpha = 0.8 the iteration settles into a period-2 limit cycle with residuals near 1 (a stall);
     * with alpha = 0.5 it converges to round-off. At {@code changeAt} (when &gt; 0) the relaxation factor
     * becomes {@code alphaAfter}, declared as a new segment.
     */
    static List<IterationRecord> burgersCavity(double alphaStart, int iterations, int changeAt, double alphaAfter) {
        int n = 16;
        double h = 1.0 / (n + 1);
        double nu = 0.01;
        double[][] u = grid(n);
        double[][] v = grid(n);
        for (int k = 0; k < n + 2; k++) {
            u[n + 1][k] = 1;
            v[k][0] = -1;
        }
        Stencil s = new Stencil(n);
        double[][] fx = grid(n);
        double[][] fy = grid(n);
        Log log = new Log();
        double alpha = alphaStart;
        for (int it = 1; it <= iterations; it++) {
            if (it == changeAt) {
                alpha = alphaAfter; // a declared relaxation change: a new segment
                log.restart();
            }
            // sweep cell by cell with coefficients of the current iterate (Picard)
            for (int j = 1; j <= n; j++) {
                for (int i = 1; i <= n; i++) {
                    coefficients(s, j, i, u[j][i] * h / nu, v[j][i] * h / nu);
                    double nbu = s.ae[j][i] * u[j][i + 1] + s.aw[j][i] * u[j][i - 1] + s.an[j][i] * u[j + 1][i]
                            + s.as[j][i] * u[j - 1][i];
                    double nbv = s.ae[j][i] * v[j][i + 1] + s.aw[j][i] * v[j][i - 1] + s.an[j][i] * v[j + 1][i]
                            + s.as[j][i] * v[j - 1][i];
                    u[j][i] += alpha * (nbu / s.ap[j][i] - u[j][i]);
                    v[j][i] += alpha * (nbv / s.ap[j][i] - v[j][i]);
                }
            }
            for (int j = 1; j <= n; j++) {
                for (int i = 1; i <= n; i++) {
                    fx[j][i] = u[j][i] * h / nu;
                    fy[j][i] = v[j][i] * h / nu;
                }
            }
            s.convectionDiffusion(fx, fy, true);
            Map<String, Double> r = new LinkedHashMap<>();
            r.put("mom-x", s.residual(u));
            r.put("mom-y", s.residual(v));
            if (!log.add(r, null)) {
                break;
            }
        }
        return log.records;
    }

    private static void coefficients(Stencil s, int j, int i, double fu, double fv) {
        s.ae[j][i] = 1 - fu / 2;
        s.aw[j][i] = 1 + fu / 2;
        s.an[j][i] = 1 - fv / 2;
        s.as[j][i] = 1 + fv / 2;
        s.ap[j][i] = 4;
    }

    /**
     * Nonlinear heat conduction -div(k(T) grad T) = q with k = 1 + 4 T^2 on an n x n grid (walls at T =
     * 0): the conductivities are updated from the current temperature every {@code outerEvery} sweeps,
     * so the printed residual of the current linear system bumps up at each update and falls between
     * them, while the nonlinear iteration converges slowly: a long run with plateaus and bumps. A
     * pressure-like Poisson equation (cont) converges alongside. When {@code restartAt} &gt; 0 the run is
     * restarted at that iteration from the snapshot taken at {@code restartAt / 3 * 2} (a new segment,
     * residuals normalised afresh, the iteration count continuing).
     */
    static List<IterationRecord> nonlinearConduction(int n, int iterations, int outerEvery, int restartAt) {
        Stencil s = new Stencil(n);
        Stencil p = new Stencil(n);
        for (int j = 1; j <= n; j++) {
            for (int i = 1; i <= n; i++) {
                p.ae[j][i] = p.aw[j][i] = p.an[j][i] = p.as[j][i] = 1;
                p.ap[j][i] = 4;
                p.b[j][i] = Math.cos(3 * centre(i, n)) * centre(j, n) / (n * n);
            }
        }
        double[][] t = grid(n);
        double[][] pr = grid(n);
        double[][] snapT = null;
        double[][] snapP = null;
        int snapAt = restartAt / 3 * 2;
        double q = 20.0 / (n * n);
        Log log = new Log();
        for (int it = 1; it <= iterations; it++) {
            if ((it - 1) % outerEvery == 0) {
                for (int j = 1; j <= n; j++) {
                    for (int i = 1; i <= n; i++) {
                        double kp = 1 + 4 * t[j][i] * t[j][i];
                        s.ae[j][i] = face(kp, t[j][i + 1]);
                        s.aw[j][i] = face(kp, t[j][i - 1]);
                        s.an[j][i] = face(kp, t[j + 1][i]);
                        s.as[j][i] = face(kp, t[j - 1][i]);
                        s.ap[j][i] = s.ae[j][i] + s.aw[j][i] + s.an[j][i] + s.as[j][i];
                        s.b[j][i] = q;
                    }
                }
            }
            if (restartAt > 0 && it == snapAt) {
                snapT = copy(t);
                snapP = copy(pr);
            }
            if (restartAt > 0 && it == restartAt) {
                t = copy(snapT);
                pr = copy(snapP);
                log.restart();
            }
            s.sweep(t, 1.0);
            p.sweep(pr, 1.0);
            Map<String, Double> r = new LinkedHashMap<>();
            r.put("cont", p.residual(pr));
            r.put("energy", s.residual(t));
            Map<String, Double> mon = new LinkedHashMap<>();
            mon.put("t_centre", t[n / 2][n / 2]);
            log.add(r, mon);
        }
        return log.records;
    }

    /** Harmonic mean of the two cells' conductivities (Patankar 1980, section 4.2-5). */
    private static double face(double kp, double tn) {
        double kn = 1 + 4 * tn * tn;
        return 2 * kp * kn / (kp + kn);
    }

    private static double[][] copy(double[][] a) {
        double[][] c = new double[a.length][];
        for (int k = 0; k < a.length; k++) {
            c[k] = a[k].clone();
        }
        return c;
    }

    /**
     * A pressure-correction-like Poisson equation with walls of zero gradient on every side (a singular
     * operator) and a mass source that does not sum to zero: no solution exists, so Gauss–Seidel removes
     * every compatible part of the residual and is left with the incompatible one: a flat, noise-free
     * residual plateau far above any target (cont). A second, well-posed Poisson equation (energy) converges.
     */
    static List<IterationRecord> incompatibleNeumann(int iterations) {
        int n = 16;
        Stencil p = new Stencil(n);
        Stencil e = new Stencil(n);
        for (int j = 1; j <= n; j++) {
            for (int i = 1; i <= n; i++) {
                p.ae[j][i] = i == n ? 0 : 1;
                p.aw[j][i] = i == 1 ? 0 : 1;
                p.an[j][i] = j == n ? 0 : 1;
                p.as[j][i] = j == 1 ? 0 : 1;
                p.ap[j][i] = p.ae[j][i] + p.aw[j][i] + p.an[j][i] + p.as[j][i];
                // net source 0.02 per cell on top of a zero-mean pattern: the imbalance cannot be removed
                p.b[j][i] = 0.02 + Math.sin(2 * Math.PI * centre(i, n)) * Math.cos(Math.PI * centre(j, n));
                e.ae[j][i] = e.aw[j][i] = e.an[j][i] = e.as[j][i] = 1;
                e.ap[j][i] = 4;
                e.b[j][i] = Math.sin(Math.PI * centre(i, n)) / (n * n);
            }
        }
        double[][] pr = grid(n);
        double[][] t = grid(n);
        Log log = new Log();
        for (int it = 1; it <= iterations; it++) {
            p.sweep(pr, 1.0);
            e.sweep(t, 1.0);
            Map<String, Double> r = new LinkedHashMap<>();
            r.put("cont", p.residual(pr));
            r.put("energy", e.residual(t));
            log.add(r, null);
        }
        return log.records;
    }
}
