package dev.watcher.detect;

import dev.watcher.model.Detection;
import dev.watcher.model.IterationRecord;
import java.util.Map;
import java.util.function.Consumer;

/**
 * A rolling-window judge of one aspect of a run. One instance per run; called on the run's thread in
 * record order; not thread-safe. Pure: no I/O, no clock (it reasons in iterations), deterministic: the
 * same records give the same detections. Memory is bounded by its windows, not by the run's length.
 */
public interface Detector {

    /** Looks at one record; emits zero or more detections (open, resolved, info). */
    void observe(IterationRecord record, Consumer<Detection> out);

    /**
     * A new segment starts with the next record (a restart, or a declared scheme/relaxation change):
     * trend baselines are reset so the jump after a restart is not taken for a blow-up.
     */
    default void segment(int segment, long iter, Consumer<Detection> out) {
    }

    /** Current forecasts and state, for the report and the live view; keys lower_snake_case. */
    default Map<String, Object> snapshot() {
        return Map.of();
    }
}
