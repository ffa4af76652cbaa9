package dev.watcher.demo;

import java.io.DataInputStream;
import java.io.DataOutputStream;
import java.io.IOException;

/**
 * A small real incompressible flow solver: the lid-driven square cavity on a uniform staggered grid, solved
 * with the SIMPLE pressure-correction algorithm (Patankar 1980, "Numerical Heat Transfer and Fluid Flow",
 * ch. 6), steady or with implicit backward-Euler time stepping and inner iterations per step.
 *
 * <p>Unit square, lid ({@code y = 1}) moving at speed 1 in +x, density 1, viscosity {@code 1/Re}. Pressure
 * and temperature live at cell centres, {@code u} on vertical faces, {@code v} on horizontal faces. Each outer
 * iteration: assemble and relax the momentum equations (a few Gauss-Seidel sweeps), solve the pressure
 * correction exactly (banded Cholesky, one cell pinned), correct velocities and pressure, then the passive
 * energy equation.
 *
 * <p><b>Residuals</b> (the normalisation is documented because detectors reason on it): for each transport
 * equation the L1 sum over the unknowns of {@code |sum(a_nb phi_nb) + b - a_P phi|}, evaluated with the
 * fields at the start of the iteration and without under-relaxation; for continuity the L1 sum of the mass
 * imbalance of the cells after the momentum predictor. Each is divided by its largest value over the first
 * five iterations of the run (common practice, no published source), so a run starts near 1 and a converged
 * run reaches 1e-5 and below. The normalisers travel with a snapshot, so a restart continues the same scale.
 *
 * <p>Not thread-safe; one solver per run. Deterministic: the same settings give bit-identical histories.
 */
final class CavitySolver {

    /** Equation names as the logs print them, in solve order. */
    static final String CONT = "cont";
    static final String MOM_X = "mom-x";
    static final String MOM_Y = "mom-y";
    static final String TEMP = "temp";

    private static final int NORMALISING_ITERATIONS = 5;
    private static final int MOMENTUM_SWEEPS = 2;
    private static final int ENERGY_SWEEPS = 2;

    private SolverSettings settings;
    private final int n;
    private final double h;
    private final double[][] u;
    private final double[][] v;
    private final double[][] p;
    private final double[][] t;
    private final double[][] uStep;
    private final double[][] vStep;
    private final double[][] tStep;
    // coefficients of the current iteration, reused between iterations
    private final double[][] du;
    private final double[][] dv;
    private final double[][] ae;
    private final double[][] aw;
    private final double[][] an;
    private final double[][] as;
    private final double[][] ap;
    private final double[][] bb;
    private final double[] band;
    private final double[] rhs;
    private final double[] normaliser = new double[4];
    private long iteration;
    private long step;
    private int inner;

    CavitySolver(SolverSettings settings) {
        this.settings = settings;
        this.n = settings.cells();
        this.h = 1.0 / n;
        u = new double[n + 1][n];
        v = new double[n][n + 1];
        p = new double[n][n];
        t = new double[n][n];
        uStep = new double[n + 1][n];
        vStep = new double[n][n + 1];
        tStep = new double[n][n];
        du = new double[n + 1][n];
        dv = new double[n][n + 1];
        ae = new double[n + 1][n + 1];
        aw = new double[n + 1][n + 1];
        an = new double[n + 1][n + 1];
        as = new double[n + 1][n + 1];
        ap = new double[n + 1][n + 1];
        bb = new double[n + 1][n + 1];
        band = new double[n * n * (n + 1)];
        rhs = new double[n * n];
    }

    SolverSettings settings() {
        return settings;
    }

    /** Changes relaxation, scheme or time step from the next iteration on (grid and physics stay). */
    void reconfigure(SolverSettings next) {
        if (next.cells() != n) {
            throw new IllegalArgumentException("cannot change the grid of a running solver");
        }
        this.settings = next;
    }

    /** Outer iterations done so far (the global counter the logs print). */
    long iteration() {
        return iteration;
    }

    /** Time step index of the last iteration (unsteady), starting at 1. */
    long step() {
        return step;
    }

    /** Inner iteration of the last iteration within its step (unsteady), starting at 1. */
    int inner() {
        return inner;
    }

    /** Physical time reached at the end of the current step (unsteady). */
    double time() {
        return step * settings.timeStep();
    }

    /** Names of the residuals {@link #iterate()} returns. */
    String[] equationNames() {
        return settings.energy() ? new String[] {CONT, MOM_X, MOM_Y, TEMP} : new String[] {CONT, MOM_X, MOM_Y};
    }

    /** Names of the monitors {@link #monitors()} returns. */
    String[] monitorNames() {
        return settings.energy() ? new String[] {"vmid", "lid_shear", "wall_q"}
                : new String[] {"vmid", "lid_shear"};
    }

    /** Units of the monitors, in the order of {@link #monitorNames()}. */
    String[] monitorUnits() {
        return settings.energy() ? new String[] {"m/s", "N", "W"} : new String[] {"m/s", "N"};
    }

    /**
     * One outer iteration. In an unsteady run the first inner iteration of each step first stores the old
     * time level. Returns the normalised residuals in the order of {@link #equationNames()}.
     */
    double[] iterate() {
        if (settings.unsteady()) {
            if (inner == 0 || inner >= settings.innerIterations()) {
                copy(u, uStep);
                copy(v, vStep);
                copy(t, tStep);
                step++;
                inner = 0;
            }
            inner++;
        }
        iteration++;
        double rx = momentumX();
        double ry = momentumY();
        double rc = pressureCorrection();
        double rt = settings.energy() ? energy() : 0;
        double[] raw = settings.energy() ? new double[] {rc, rx, ry, rt} : new double[] {rc, rx, ry};
        double[] out = new double[raw.length];
        for (int k = 0; k < raw.length; k++) {
            if (iteration <= NORMALISING_ITERATIONS && Double.isFinite(raw[k])) {
                normaliser[k] = Math.max(normaliser[k], raw[k]);
            }
            out[k] = normaliser[k] > 0 ? raw[k] / normaliser[k] : raw[k];
        }
        return out;
    }

    /** Current monitor values, in the order of {@link #monitorNames()}. */
    double[] monitors() {
        double vmid = 0.5 * (u[n / 2][n / 2 - 1] + u[n / 2][n / 2]);
        double nu = 1.0 / settings.reynolds();
        // wall shear force on the lid: integral of nu du/dy along y = 1 (trapezoid over the u faces)
        double shear = 0;
        for (int i = 0; i <= n; i++) {
            double w = (i == 0 || i == n) ? 0.5 * h : h;
            double uTop = (i == 0 || i == n) ? 0 : u[i][n - 1];
            shear += nu * (1.0 - uTop) / (0.5 * h) * w;
        }
        if (!settings.energy()) {
            return new double[] {vmid, shear};
        }
        double gamma = nu / settings.prandtl();
        double q = 0;
        for (int i = 0; i < n; i++) {
            q += gamma * (1.0 - t[i][n - 1]) / (0.5 * h) * h;
        }
        return new double[] {vmid, shear, q};
    }

    /**
     * The u velocity along the vertical centreline {@code x = 0.5}, at the cell-centre heights
     * {@code y_j = (j + 1/2) h}; index 0 is the wall ({@code y = 0}, u = 0) and the last is the lid (u = 1).
     */
    double[][] centrelineU() {
        double[][] out = new double[2][n + 2];
        out[0][0] = 0;
        out[1][0] = 0;
        for (int j = 0; j < n; j++) {
            out[0][j + 1] = (j + 0.5) * h;
            out[1][j + 1] = u[n / 2][j];
        }
        out[0][n + 1] = 1;
        out[1][n + 1] = 1;
        return out;
    }

    // ---------------------------------------------------------------- momentum

    private double momentumX() {
        double nu = 1.0 / settings.reynolds();
        double a0 = settings.unsteady() ? h * h / settings.timeStep() : 0;
        ConvectionScheme s = settings.scheme();
        double res = 0;
        for (int i = 1; i < n; i++) {
            for (int j = 0; j < n; j++) {
                double fe = 0.5 * (u[i][j] + u[i + 1][j]) * h;
                double fw = 0.5 * (u[i - 1][j] + u[i][j]) * h;
                double fn = 0.5 * (v[i - 1][j + 1] + v[i][j + 1]) * h;
                double fs = 0.5 * (v[i - 1][j] + v[i][j]) * h;
                double cE = s.neighbour(nu, -fe);
                double cW = s.neighbour(nu, fw);
                double cN;
                double cS;
                double b = (p[i - 1][j] - p[i][j]) * h + a0 * uStep[i][j];
                if (j == n - 1) {
                    cN = 0;
                    b += 2 * nu * 1.0; // moving lid, half a cell away
                } else {
                    cN = s.neighbour(nu, -fn);
                }
                cS = j == 0 ? 0 : s.neighbour(nu, fs);
                double wall = (j == n - 1 ? 2 * nu : 0) + (j == 0 ? 2 * nu : 0);
                double cP = cE + cW + cN + cS + wall + (fe - fw + fn - fs) + a0;
                ae[i][j] = cE;
                aw[i][j] = cW;
                an[i][j] = cN;
                as[i][j] = cS;
                ap[i][j] = cP;
                bb[i][j] = b;
                double nb = cE * u[i + 1][j] + cW * u[i - 1][j] + (j < n - 1 ? cN * u[i][j + 1] : 0)
                        + (j > 0 ? cS * u[i][j - 1] : 0);
                res += Math.abs(nb + b - cP * u[i][j]);
            }
        }
        double alpha = settings.relaxMomentum();
        for (int i = 1; i < n; i++) {
            for (int j = 0; j < n; j++) {
                double cPr = ap[i][j] / alpha;
                bb[i][j] += (1 - alpha) * cPr * u[i][j];
                ap[i][j] = cPr;
                du[i][j] = h / cPr;
            }
        }
        for (int sweep = 0; sweep < MOMENTUM_SWEEPS; sweep++) {
            for (int i = 1; i < n; i++) {
                for (int j = 0; j < n; j++) {
                    double nb = ae[i][j] * u[i + 1][j] + aw[i][j] * u[i - 1][j]
                            + (j < n - 1 ? an[i][j] * u[i][j + 1] : 0) + (j > 0 ? as[i][j] * u[i][j - 1] : 0);
                    u[i][j] = (nb + bb[i][j]) / ap[i][j];
                }
            }
        }
        return res;
    }

    private double momentumY() {
        double nu = 1.0 / settings.reynolds();
        double a0 = settings.unsteady() ? h * h / settings.timeStep() : 0;
        ConvectionScheme s = settings.scheme();
        double res = 0;
        for (int i = 0; i < n; i++) {
            for (int j = 1; j < n; j++) {
                double fe = 0.5 * (u[i + 1][j - 1] + u[i + 1][j]) * h;
                double fw = 0.5 * (u[i][j - 1] + u[i][j]) * h;
                double fn = 0.5 * (v[i][j] + v[i][j + 1]) * h;
                double fs = 0.5 * (v[i][j - 1] + v[i][j]) * h;
                double cE = i == n - 1 ? 0 : s.neighbour(nu, -fe);
                double cW = i == 0 ? 0 : s.neighbour(nu, fw);
                double cN = s.neighbour(nu, -fn);
                double cS = s.neighbour(nu, fs);
                double wall = (i == n - 1 ? 2 * nu : 0) + (i == 0 ? 2 * nu : 0);
                double b = (p[i][j - 1] - p[i][j]) * h + a0 * vStep[i][j];
                double cP = cE + cW + cN + cS + wall + (fe - fw + fn - fs) + a0;
                ae[i][j] = cE;
                aw[i][j] = cW;
                an[i][j] = cN;
                as[i][j] = cS;
                ap[i][j] = cP;
                bb[i][j] = b;
                double nb = (i < n - 1 ? cE * v[i + 1][j] : 0) + (i > 0 ? cW * v[i - 1][j] : 0)
                        + cN * v[i][j + 1] + cS * v[i][j - 1];
                res += Math.abs(nb + b - cP * v[i][j]);
            }
        }
        double alpha = settings.relaxMomentum();
        for (int i = 0; i < n; i++) {
            for (int j = 1; j < n; j++) {
                double cPr = ap[i][j] / alpha;
                bb[i][j] += (1 - alpha) * cPr * v[i][j];
                ap[i][j] = cPr;
                dv[i][j] = h / cPr;
            }
        }
        for (int sweep = 0; sweep < MOMENTUM_SWEEPS; sweep++) {
            for (int i = 0; i < n; i++) {
                for (int j = 1; j < n; j++) {
                    double nb = (i < n - 1 ? ae[i][j] * v[i + 1][j] : 0) + (i > 0 ? aw[i][j] * v[i - 1][j] : 0)
                            + an[i][j] * v[i][j + 1] + as[i][j] * v[i][j - 1];
                    v[i][j] = (nb + bb[i][j]) / ap[i][j];
                }
            }
        }
        return res;
    }

    // ---------------------------------------------------------------- pressure correction

    /** Solves the pressure-correction equation exactly and corrects u, v, p; returns the raw mass imbalance. */
    private double pressureCorrection() {
        int m = n * n;
        int bw = n; // half bandwidth with k = i * n + j
        java.util.Arrays.fill(band, 0);
        double imbalance = 0;
        for (int i = 0; i < n; i++) {
            for (int j = 0; j < n; j++) {
                int k = i * n + j;
                double cE = i < n - 1 ? h * du[i + 1][j] : 0;
                double cW = i > 0 ? h * du[i][j] : 0;
                double cN = j < n - 1 ? h * dv[i][j + 1] : 0;
                double cS = j > 0 ? h * dv[i][j] : 0;
                double b = (u[i][j] - u[i + 1][j] + v[i][j] - v[i][j + 1]) * h;
                imbalance += Math.abs(b);
                if (k == 0) {
                    // p' pinned to 0 in the first cell: the Neumann problem is otherwise singular
                    band[0] = 1;
                    rhs[0] = 0;
                    continue;
                }
                band[k * (bw + 1)] = cE + cW + cN + cS;
                rhs[k] = b;
                // lower band: column k-1 (south neighbour) and k-n (west neighbour); cell 0 drops out
                if (j > 0 && k - 1 != 0) {
                    band[k * (bw + 1) + 1] = -cS;
                }
                if (i > 0 && k - n != 0) {
                    band[k * (bw + 1) + n] = -cW;
                }
            }
        }
        choleskySolve(band, rhs, m, bw);
        double alphaP = settings.relaxPressure();
        for (int i = 1; i < n; i++) {
            for (int j = 0; j < n; j++) {
                u[i][j] += du[i][j] * (rhs[(i - 1) * n + j] - rhs[i * n + j]);
            }
        }
        for (int i = 0; i < n; i++) {
            for (int j = 1; j < n; j++) {
                v[i][j] += dv[i][j] * (rhs[i * n + j - 1] - rhs[i * n + j]);
            }
        }
        for (int i = 0; i < n; i++) {
            for (int j = 0; j < n; j++) {
                p[i][j] += alphaP * rhs[i * n + j];
            }
        }
        return imbalance;
    }

    /**
     * In-place banded Cholesky factorisation and solve of a symmetric positive definite matrix whose lower band
     * is stored as {@code a[k * (bw + 1) + (k - col)]}; the solution replaces {@code x}.
     */
    static void choleskySolve(double[] a, double[] x, int m, int bw) {
        int w = bw + 1;
        for (int k = 0; k < m; k++) {
            int lo = Math.max(0, k - bw);
            for (int col = lo; col < k; col++) {
                double s = a[k * w + (k - col)];
                int lo2 = Math.max(lo, col - bw);
                for (int l = lo2; l < col; l++) {
                    s -= a[k * w + (k - l)] * a[col * w + (col - l)];
                }
                a[k * w + (k - col)] = s / a[col * w];
            }
            double s = a[k * w];
            for (int l = lo; l < k; l++) {
                double lv = a[k * w + (k - l)];
                s -= lv * lv;
            }
            a[k * w] = Math.sqrt(s);
        }
        for (int k = 0; k < m; k++) {
            double s = x[k];
            for (int l = Math.max(0, k - bw); l < k; l++) {
                s -= a[k * w + (k - l)] * x[l];
            }
            x[k] = s / a[k * w];
        }
        for (int k = m - 1; k >= 0; k--) {
            double s = x[k];
            for (int r = k + 1; r <= Math.min(m - 1, k + bw); r++) {
                s -= a[r * w + (r - k)] * x[r];
            }
            x[k] = s / a[k * w];
        }
    }

    // ---------------------------------------------------------------- energy

    /** Cell of the defect in the energy equation (lower right quarter, away from the lid). */
    int badCellI() {
        return (3 * n) / 4;
    }

    int badCellJ() {
        return n / 4;
    }

    private double energy() {
        double gamma = 1.0 / (settings.reynolds() * settings.prandtl());
        double a0 = settings.unsteady() ? h * h / settings.timeStep() : 0;
        ConvectionScheme s = settings.scheme();
        double res = 0;
        int bi = badCellI();
        int bj = badCellJ();
        for (int i = 0; i < n; i++) {
            for (int j = 0; j < n; j++) {
                double fe = u[i + 1][j] * h;
                double fw = u[i][j] * h;
                double fn = v[i][j + 1] * h;
                double fs = v[i][j] * h;
                double cE = i == n - 1 ? 0 : s.neighbour(gamma, -fe);
                double cW = i == 0 ? 0 : s.neighbour(gamma, fw);
                double cN = j == n - 1 ? 0 : s.neighbour(gamma, -fn);
                double cS = j == 0 ? 0 : s.neighbour(gamma, fs);
                double b = a0 * tStep[i][j];
                double wall = 0;
                if (j == n - 1) {
                    wall += 2 * gamma;
                    b += 2 * gamma * 1.0; // hot lid
                }
                if (j == 0) {
                    wall += 2 * gamma; // cold floor at 0
                }
                double cP = cE + cW + cN + cS + wall + (fe - fw + fn - fs) + a0;
                if (settings.badCellSource() != 0 && i == bi && j == bj) {
                    cP -= settings.badCellSource() * h * h;
                }
                ae[i][j] = cE;
                aw[i][j] = cW;
                an[i][j] = cN;
                as[i][j] = cS;
                ap[i][j] = cP;
                bb[i][j] = b;
                double nb = tNeighbours(i, j);
                res += Math.abs(nb + b - cP * t[i][j]);
            }
        }
        double alpha = settings.relaxEnergy();
        for (int i = 0; i < n; i++) {
            for (int j = 0; j < n; j++) {
                double cPr = ap[i][j] / alpha;
                bb[i][j] += (1 - alpha) * cPr * t[i][j];
                ap[i][j] = cPr;
            }
        }
        for (int sweep = 0; sweep < ENERGY_SWEEPS; sweep++) {
            for (int i = 0; i < n; i++) {
                for (int j = 0; j < n; j++) {
                    t[i][j] = (tNeighbours(i, j) + bb[i][j]) / ap[i][j];
                }
            }
        }
        return res;
    }

    private double tNeighbours(int i, int j) {
        return (i < n - 1 ? ae[i][j] * t[i + 1][j] : 0) + (i > 0 ? aw[i][j] * t[i - 1][j] : 0)
                + (j < n - 1 ? an[i][j] * t[i][j + 1] : 0) + (j > 0 ? as[i][j] * t[i][j - 1] : 0);
    }

    // ---------------------------------------------------------------- snapshots

    /** Writes the whole state (fields, old time level, counters, residual normalisers). */
    void save(DataOutputStream out) throws IOException {
        out.writeInt(n);
        out.writeLong(iteration);
        out.writeLong(step);
        out.writeInt(inner);
        for (double d : normaliser) {
            out.writeDouble(d);
        }
        for (double[][] f : new double[][][] {u, v, p, t, uStep, vStep, tStep}) {
            for (double[] row : f) {
                for (double d : row) {
                    out.writeDouble(d);
                }
            }
        }
    }

    /** Reads a state written by {@link #save}; the grid must match. */
    void load(DataInputStream in) throws IOException {
        int cells = in.readInt();
        if (cells != n) {
            throw new IOException("snapshot has " + cells + " cells per side, solver has " + n);
        }
        iteration = in.readLong();
        step = in.readLong();
        inner = in.readInt();
        for (int k = 0; k < normaliser.length; k++) {
            normaliser[k] = in.readDouble();
        }
        for (double[][] f : new double[][][] {u, v, p, t, uStep, vStep, tStep}) {
            for (double[] row : f) {
                for (int k = 0; k < row.length; k++) {
                    row[k] = in.readDouble();
                }
            }
        }
    }

    private static void copy(double[][] from, double[][] to) {
        for (int i = 0; i < from.length; i++) {
            System.arraycopy(from[i], 0, to[i], 0, from[i].length);
        }
    }
}
