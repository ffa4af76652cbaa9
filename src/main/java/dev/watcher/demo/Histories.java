package dev.watcher.demo;

import dev.watcher.model.IterationRecord;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;

/**
 * Residual and monitor histories computed by the project's own cavity solver, for tests and demos that need
 * the output of real iterative numerics rather than made-up curves.
 *
 * <p>Residual names: {@code cont}, {@code mom-x}, {@code mom-y}, and {@code temp} where the scenario solves
 * energy. Monitors: {@code vmid} (u at the cavity centre, m/s), {@code lid_shear} (viscous force on the lid,
 * N per unit depth), and {@code wall_q} (heat through the lid, W per unit depth) with energy. Unsteady
 * scenarios fill {@code step}, {@code time} and {@code inner}. Records carry {@code line = 0} (no source file)
 * and segment 0, or 1 after the declared restart of {@code restart}.
 *
 * <p>Thread-safe (no shared state) and deterministic: the same arguments give equal lists.
 */
public final class Histories {

    private Histories() {
    }

    /**
     * Runs a scenario and returns its records.
     *
     * @param scenario      a name from {@link #scenarios()}, e.g. {@code converging}
     * @param maxIterations the most records to produce; a diverging run may end earlier (two records after
     *                      its first non-finite residual)
     * @return an unmodifiable list, in iteration order
     * @throws IllegalArgumentException for an unknown scenario name or a negative budget
     */
    public static List<IterationRecord> run(String scenario, int maxIterations) {
        if (maxIterations < 0) {
            throw new IllegalArgumentException("maxIterations must not be negative: " + maxIterations);
        }
        ScenarioRun run = new ScenarioRun(Scenario.byId(scenario), maxIterations);
        List<IterationRecord> out = new ArrayList<>(Math.min(maxIterations, 10_000));
        while (run.hasNext()) {
            out.add(run.next().record());
        }
        return Collections.unmodifiableList(out);
    }

    /** Runs a scenario for its natural length ({@link Scenario#iterations()}). */
    public static List<IterationRecord> run(String scenario) {
        return run(scenario, Scenario.byId(scenario).iterations());
    }

    /** The scenario names {@link #run} accepts. */
    public static List<String> scenarios() {
        return Scenario.ids();
    }
}
