package dev.watcher.detect;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.function.Function;

/**
 * Per-name state of one detector (one entry per equation or monitor), looked up cheaply: records usually
 * share one names list per header, so the slot array for a list is cached by the list's identity and a
 * record costs no hashing. Memory: one entry per distinct name the run has shown. Not thread-safe.
 */
final class PerName<S> {
    private final Function<String, S> factory;
    private final Map<String, S> byName = new LinkedHashMap<>();
    private List<String> lastNames;
    private List<S> lastSlots;

    PerName(Function<String, S> factory) {
        this.factory = factory;
    }

    /** The states for {@code names}, index for index, created on first sight. */
    List<S> slots(List<String> names) {
        if (names != lastNames) {
            List<S> slots = new ArrayList<>(names.size());
            for (String n : names) {
                slots.add(byName.computeIfAbsent(n, factory));
            }
            lastNames = names;
            lastSlots = slots;
        }
        return lastSlots;
    }

    S get(String name) {
        return byName.get(name);
    }

    /** Forgets every state (a new segment). */
    void clear() {
        byName.clear();
        lastNames = null;
        lastSlots = null;
    }

    Map<String, S> all() {
        return byName;
    }

    int size() {
        return byName.size();
    }
}
