package dev.watcher.report;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.node.MissingNode;
import java.util.List;
import java.util.Map;

/**
 * Everything the report knows about one run.
 *
 * @param events  the run's timeline events in file order (may be empty)
 * @param history its bounded series history, or null when none was found (an events-only section)
 * @param state   its saved run state ({@code runs/RUN.json}), or a missing node
 * @param skipped routine events of the timeline counted but not kept, by kind (see {@link Timeline})
 */
record RunData(String name, List<Event> events, History history, JsonNode state, Map<String, Long> skipped) {

    RunData {
        events = List.copyOf(events);
        state = state == null ? MissingNode.getInstance() : state;
        skipped = skipped == null ? Map.of() : Map.copyOf(skipped);
    }

    Verdict verdict() {
        return Verdict.of(events, state.isMissingNode() ? null : state);
    }

    /** A detector's snapshot from the saved run state ({@code snapshot.NAME}), or a missing node. */
    JsonNode snapshot(String detector) {
        return state.path("snapshot").path(detector);
    }
}
