package dev.watcher.demo;

import dev.watcher.model.IterationRecord;
import dev.watcher.model.Samples;
import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.DataInputStream;
import java.io.DataOutputStream;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.util.List;

/**
 * Drives a {@link CavitySolver} through one {@link Scenario}, one record at a time, so the same sequence
 * feeds {@link Histories} (in memory) and {@link DemoSolverMain} (a paced log file).
 *
 * <p>A run ends at its record budget, or two records after the first non-finite residual (the solver gives up
 * on a floating-point blow-up the way a real one aborts). The {@link Scenario#RESTART} run keeps an in-memory
 * snapshot every 100 iterations, is cut off at {@link Scenario#RESTART_KILLED_AT} and resumes from the
 * snapshot of {@link Scenario#RESTART_SNAPSHOT} in segment 1. Not thread-safe.
 */
final class ScenarioRun {

    /** One produced record; {@code restartedFrom} is the snapshot iteration when a restart precedes it, else -1. */
    record Step(IterationRecord record, long restartedFrom, String note) {
    }

    private static final int SNAPSHOT_EVERY = 100;
    private static final int RECORDS_AFTER_BLOWUP = 2;

    private final Scenario scenario;
    private final int budget;
    private CavitySolver solver;
    private final List<String> equations;
    private final List<String> monitorNames;
    private final List<String> units;
    private int produced;
    private int segment;
    private int afterBlowup = -1;
    private byte[] snapshot;

    ScenarioRun(Scenario scenario, int maxRecords) {
        this.scenario = scenario;
        this.budget = maxRecords;
        this.solver = new CavitySolver(scenario.settings());
        this.equations = List.of(solver.equationNames());
        this.monitorNames = List.of(solver.monitorNames());
        this.units = List.of(solver.monitorUnits());
    }

    /**
     * Continues a run from a state written by {@link #saveState}: the iteration counter (and time step)
     * go on from the saved ones, and the run produces at most {@code maxRecords} further records.
     */
    ScenarioRun(Scenario scenario, int maxRecords, DataInputStream state) throws IOException {
        this(scenario, maxRecords);
        solver.load(state);
    }

    /** Iterations the solver has done (including those before a resumed state). */
    long iteration() {
        return solver.iteration();
    }

    /** Writes the solver's whole state, to be continued by the resuming constructor. */
    void saveState(DataOutputStream out) throws IOException {
        solver.save(out);
    }

    Scenario scenario() {
        return scenario;
    }

    List<String> equations() {
        return equations;
    }

    List<String> monitorNames() {
        return monitorNames;
    }

    /** Units of the monitors, in the order of {@link #monitorNames()}. */
    List<String> monitorUnits() {
        return units;
    }

    boolean unsteady() {
        return scenario.settings().unsteady();
    }

    boolean hasNext() {
        return produced < budget && afterBlowup < RECORDS_AFTER_BLOWUP;
    }

    Step next() {
        if (!hasNext()) {
            throw new IllegalStateException("run is over");
        }
        long restartedFrom = -1;
        if (scenario == Scenario.RESTART && segment == 0 && solver.iteration() == Scenario.RESTART_KILLED_AT) {
            solver = restore(snapshot);
            segment = 1;
            restartedFrom = solver.iteration();
        }
        String note = null;
        Scenario.RelaxationChange change = scenario.relaxationChange();
        if (change != null && solver.iteration() == change.after()) {
            SolverSettings before = solver.settings();
            solver.reconfigure(before.withRelaxation(change.momentum(), change.pressure()));
            note = String.format(java.util.Locale.ROOT, "relaxation changed: mom %.2f -> %.2f, p %.2f -> %.2f",
                    before.relaxMomentum(), change.momentum(), before.relaxPressure(), change.pressure());
        }
        double[] res = solver.iterate();
        double[] mon = solver.monitors();
        if (scenario == Scenario.RESTART && segment == 0 && solver.iteration() % SNAPSHOT_EVERY == 0
                && solver.iteration() <= Scenario.RESTART_SNAPSHOT) {
            snapshot = save(solver);
        }
        produced++;
        boolean finite = true;
        for (double r : res) {
            finite &= Double.isFinite(r);
        }
        if (afterBlowup >= 0 || !finite) {
            afterBlowup++;
        }
        Samples residuals = new Samples(equations, res);
        Samples monitors = new Samples(monitorNames, mon);
        IterationRecord r;
        if (solver.settings().unsteady()) {
            r = new IterationRecord(solver.iteration(), solver.step(), solver.time(), solver.inner(), residuals,
                    monitors, segment, 0);
        } else {
            r = new IterationRecord(solver.iteration(), IterationRecord.NONE, Double.NaN, IterationRecord.NONE,
                    residuals, monitors, segment, 0);
        }
        return new Step(r, restartedFrom, note);
    }

    private static byte[] save(CavitySolver s) {
        try {
            ByteArrayOutputStream bytes = new ByteArrayOutputStream();
            try (DataOutputStream out = new DataOutputStream(bytes)) {
                s.save(out);
            }
            return bytes.toByteArray();
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    private CavitySolver restore(byte[] state) {
        CavitySolver s = new CavitySolver(scenario.settings());
        try (DataInputStream in = new DataInputStream(new ByteArrayInputStream(state))) {
            s.load(in);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        return s;
    }
}
