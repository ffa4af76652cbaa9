package dev.watcher.demo;

import java.util.Arrays;
import java.util.List;
import java.util.Locale;

/**
 * The demo's named runs: each is an invented engineering story around a real numerical set-up of
 * {@link CavitySolver}. The settings were found by running the solver, not tuned to a wished-for curve; the
 * behaviour each one shows is asserted in {@code ScenarioBehaviourTest}.
 */
public enum Scenario {

    /**
     * Re 100, central differences, relaxation 0.7 / 0.3: the flow residuals fall about 4 decades per 350
     * iterations, the slower energy residual is below 1e-5 from about iteration 720, the centre probe settles
     * (checked against Ghia et al. 1982) and the lid heat flux, the last monitor to settle, is flat well before
     * the end at 1200.
     */
    CONVERGING("converging", "Header plenum of the east heat exchanger, design point",
            new SolverSettings(32, 100, 0.7, 0.3, 0.9, ConvectionScheme.CENTRAL, true, 0.71, 0, 0, 0),
            1200, "converged"),

    /**
     * The same case with momentum relaxation 0.73 and pressure relaxation 0.8 (far above the usual
     * {@code alpha_u + alpha_p ~ 1}): residuals fall for about 60 iterations, then continuity and both momentum
     * equations rise together by two decades and end in a large stalled oscillation.
     */
    HOT_RELAXATION("hot-relaxation", "Header plenum, someone raised the relaxation to go faster",
            new SolverSettings(32, 100, 0.73, 0.8, 0.9, ConvectionScheme.CENTRAL, true, 0.71, 0, 0, 0),
            900, "family-divergence"),

    /**
     * Backward Euler with inner iterations, relaxation 0.9 / 0.9, time step 0.07 (lid CFL about 2.2) and 4
     * inner iterations: the first-inner-iteration (peak) residual of each step falls for the first 7 steps,
     * then climbs step after step until the run blows up. With a step of 0.05 the same set-up is stable.
     */
    BIG_STEP("big-step", "Tunnel fan start-up transient with a time step chosen for speed",
            new SolverSettings(32, 100, 0.9, 0.9, 0.9, ConvectionScheme.CENTRAL, false, 0.71, 0.07, 4, 0),
            280, "rising-peaks"),

    /** {@link #BIG_STEP} with a stable step (0.02) and 4 inner iterations: peaks fall step after step. */
    SMALL_STEP("small-step", "Tunnel fan start-up transient, time step halved twice",
            new SolverSettings(32, 100, 0.9, 0.9, 0.9, ConvectionScheme.CENTRAL, false, 0.71, 0.02, 4, 0),
            280, null),

    /**
     * Re 400 on 32 x 32 cells (cell Peclet number up to 12.5), second-order central convection, relaxation
     * 0.5 / 0.2: residuals fall two decades, then mom-x and mom-y rise (mom-y by more than two decades, then
     * flat near 7.7), cont and mom-x climb again and the run ends in NaN near iteration 1948; its upwind twin
     * {@link #HIGH_PECLET_UPWIND} converges.
     */
    HIGH_PECLET_CENTRAL("high-peclet-central", "Rooftop array wind load, second-order convection on the coarse grid",
            new SolverSettings(32, 400, 0.5, 0.2, 0.9, ConvectionScheme.CENTRAL, false, 0.71, 0, 0, 0),
            2000, "non-finite"),

    /** {@link #HIGH_PECLET_CENTRAL} with first-order upwind convection: converges below 1e-5. */
    HIGH_PECLET_UPWIND("high-peclet-upwind", "Rooftop array wind load, first-order convection",
            new SolverSettings(32, 400, 0.5, 0.2, 0.9, ConvectionScheme.UPWIND, false, 0.71, 0, 0, 0),
            1100, "converged"),

    /**
     * {@link #CONVERGING} with energy, where one cell of the energy equation carries a heat source linearised
     * with the wrong sign ({@code Sp = 30}): temp rises exponentially from about iteration 60 while cont,
     * mom-x and mom-y keep converging (the energy equation is passive, so only temp blows up).
     */
    BAD_CELL("bad-cell", "Heated lid of the drying cabinet with one degenerate cell in the mesh",
            new SolverSettings(32, 100, 0.7, 0.3, 0.9, ConvectionScheme.CENTRAL, true, 0.71, 0, 0, 30),
            1600, "single-equation-blowup"),

    /**
     * Re 2000, first-order upwind, cautious relaxation 0.3 / 0.1 raised to 0.6 / 0.25 after iteration 900 (a
     * note in the log), energy at Prandtl 1: a long run with a start-up plateau of mom-x (iterations 40-120), a
     * bump of mom-y and of temp, slow convergence, a faster slope after the change, the 1e-5 target near
     * iteration 1450 and a flat round-off floor after that. A false-alarm case: nothing but settling, levels
     * and finally {@code converged} should be raised.
     */
    SLOW_PLATEAUS("slow-plateaus", "Cooling-water intake basin, long overnight run",
            new SolverSettings(32, 2000, 0.3, 0.1, 0.9, ConvectionScheme.UPWIND, true, 1.0, 0, 0, 0),
            1800, "converged", new RelaxationChange(900, 0.6, 0.25)),

    /**
     * Relaxation 0.9 / 0.9 on the steady case: the pressure-velocity coupling runs away at once and the
     * residuals are non-finite within about ten iterations (a quick case for the blow-up path).
     */
    RUNAWAY("runaway", "Header plenum with relaxation left at the values of a transient set-up",
            new SolverSettings(32, 100, 0.9, 0.9, 0.9, ConvectionScheme.CENTRAL, false, 0.71, 0, 0, 0),
            100, "non-finite"),

    /**
     * {@link #CONVERGING} killed at iteration 300 and restarted from its snapshot of iteration 200: the
     * iteration counter goes back to 201 and continues (a new segment); the state is restored exactly.
     */
    RESTART("restart", "Header plenum, job requeued after a node failure, resumed from its snapshot",
            new SolverSettings(32, 100, 0.7, 0.3, 0.9, ConvectionScheme.CENTRAL, true, 0.71, 0, 0, 0),
            1300, "converged");

    /** Iteration of the snapshot the {@link #RESTART} scenario resumes from. */
    public static final int RESTART_SNAPSHOT = 200;
    /** Iteration at which the first segment of the {@link #RESTART} scenario is cut off. */
    public static final int RESTART_KILLED_AT = 300;

    private final String id;
    private final String title;
    private final SolverSettings settings;
    private final int iterations;
    private final String expectedPattern;
    private final RelaxationChange change;

    Scenario(String id, String title, SolverSettings settings, int iterations, String expectedPattern) {
        this(id, title, settings, iterations, expectedPattern, null);
    }

    Scenario(String id, String title, SolverSettings settings, int iterations, String expectedPattern,
            RelaxationChange change) {
        this.id = id;
        this.title = title;
        this.settings = settings;
        this.iterations = iterations;
        this.expectedPattern = expectedPattern;
        this.change = change;
    }

    /**
     * A change of the momentum and pressure relaxation factors that the run makes (and its log declares with
     * a note) after iteration {@code after}, as an engineer does who starts cautiously and then speeds up.
     */
    public record RelaxationChange(long after, double momentum, double pressure) {
    }

    /** The run's scheduled relaxation change, or null. */
    public RelaxationChange relaxationChange() {
        return change;
    }

    /** The name scripts and the command line use, e.g. {@code hot-relaxation}. */
    public String id() {
        return id;
    }

    /** The invented engineering story of the run. */
    public String title() {
        return title;
    }

    public SolverSettings settings() {
        return settings;
    }

    /** The run's natural length in iterations (records, for {@link #RESTART}). */
    public int iterations() {
        return iterations;
    }

    /** The pattern id a watcher is expected to raise on this run, or null for a plain reference run. */
    public String expectedPattern() {
        return expectedPattern;
    }

    /** One line describing the numerics, for banners and the test-log README. */
    public String numerics() {
        SolverSettings s = settings;
        String base = String.format(Locale.ROOT,
                "%dx%d cells, Re %.0f, %s, relax mom %.2f p %.2f", s.cells(), s.cells(), s.reynolds(),
                s.scheme().label(), s.relaxMomentum(), s.relaxPressure());
        if (s.energy()) {
            base += String.format(Locale.ROOT, " temp %.2f (Pr %.2f)", s.relaxEnergy(), s.prandtl());
        }
        if (s.unsteady()) {
            base += String.format(Locale.ROOT, ", backward Euler dt %.3f, %d inner", s.timeStep(),
                    s.innerIterations());
        } else {
            base += ", steady";
        }
        if (s.badCellSource() != 0) {
            base += String.format(Locale.ROOT, ", bad energy cell Sp %.0f", s.badCellSource());
        }
        return base;
    }

    /** The scenario of a name, e.g. {@code big-step}. */
    public static Scenario byId(String id) {
        for (Scenario s : values()) {
            if (s.id.equals(id)) {
                return s;
            }
        }
        throw new IllegalArgumentException("unknown scenario '" + id + "'; known: " + ids());
    }

    /** All scenario names, in declaration order. */
    public static List<String> ids() {
        return Arrays.stream(values()).map(Scenario::id).toList();
    }
}
