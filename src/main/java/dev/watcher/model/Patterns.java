package dev.watcher.model;

import java.util.List;
import java.util.Set;

/**
 * The pattern ids of the outside contract. One id string per concept: the same string stands in the
 * detector, the rules file, the metric tag and the timeline.
 */
public final class Patterns {
    public static final String SINGLE_EQUATION_BLOWUP = "single-equation-blowup";
    public static final String FAMILY_DIVERGENCE = "family-divergence";
    public static final String STALLED_OSCILLATION = "stalled-oscillation";
    public static final String RISING_PEAKS = "rising-peaks";
    public static final String INNER_STALL = "inner-stall";
    public static final String MONITOR_SETTLED = "monitor-settled";
    public static final String MONITOR_PERIODIC = "monitor-periodic";
    public static final String CONVERGED = "converged";
    public static final String NON_FINITE = "non-finite";
    public static final String LOG_SILENT = "log-silent";
    public static final String RESIDUAL_LEVEL = "residual-level";

    /** Every id, in the order of the contract's table. */
    public static final List<String> ALL = List.of(SINGLE_EQUATION_BLOWUP, FAMILY_DIVERGENCE,
            STALLED_OSCILLATION, RISING_PEAKS, INNER_STALL, MONITOR_SETTLED, MONITOR_PERIODIC, CONVERGED,
            NON_FINITE, LOG_SILENT, RESIDUAL_LEVEL);

    private static final Set<String> KNOWN = Set.copyOf(ALL);

    private Patterns() {
    }

    public static boolean isKnown(String id) {
        return KNOWN.contains(id);
    }

    /**
     * True for patterns that come from the record stream alone, so replaying the same log yields them again
     * in the same order. {@code log-silent} depends on wall time and is not replayable.
     */
    public static boolean isReplayable(String id) {
        return !LOG_SILENT.equals(id);
    }
}
