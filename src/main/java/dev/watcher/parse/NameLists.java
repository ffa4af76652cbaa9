package dev.watcher.parse;

import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

/**
 * Hands out one shared immutable list per distinct sequence of names, so records with the same equations
 * share their {@code Samples.names} (consumers cache per-name state by the list's identity). Bounded: past
 * {@link #MAX} distinct lists it stops remembering new ones (a log whose names change every line still
 * works, only without sharing). One per parser; not thread-safe.
 */
final class NameLists {

    static final int MAX = 256;

    private final Map<List<String>, List<String>> known = new HashMap<>();
    private final ArrayList<String> building = new ArrayList<>();
    private List<String> last = List.of();

    /** Starts a new sequence. */
    void begin() {
        building.clear();
    }

    void add(String name) {
        building.add(name);
    }

    int size() {
        return building.size();
    }

    int indexOf(String name) {
        return building.indexOf(name);
    }

    /** The shared list equal to the names added since {@link #begin()}. */
    List<String> finish() {
        if (building.equals(last)) {
            return last;
        }
        List<String> shared = known.get(building);
        if (shared == null) {
            shared = List.copyOf(building);
            if (known.size() < MAX) {
                known.put(shared, shared);
            }
        }
        last = shared;
        return shared;
    }

    /** The shared list equal to {@code names}. */
    List<String> share(List<String> names) {
        begin();
        building.addAll(names);
        return finish();
    }
}
