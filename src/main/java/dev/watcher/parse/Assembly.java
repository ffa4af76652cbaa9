package dev.watcher.parse;

import dev.watcher.model.Samples;
import java.util.List;

/**
 * Collects the named values of one record being assembled (residuals or monitors), applying the format's
 * rule for a name seen twice, and turns them into {@link Samples} with a shared names list.
 * One per parser and kind; reused record after record; not thread-safe.
 */
final class Assembly {

    private final NameLists names = new NameLists();
    private final Repeated repeated;
    private double[] values = new double[16];

    Assembly(Repeated repeated) {
        this.repeated = repeated;
    }

    void begin() {
        names.begin();
    }

    boolean isEmpty() {
        return names.size() == 0;
    }

    void put(String name, double value) {
        int i = names.indexOf(name);
        if (i >= 0) {
            values[i] = repeated.combine(values[i], value);
            return;
        }
        int n = names.size();
        if (n == values.length) {
            values = java.util.Arrays.copyOf(values, n * 2);
        }
        values[n] = value;
        names.add(name);
    }

    Samples finish() {
        int n = names.size();
        if (n == 0) {
            names.finish();
            return Samples.EMPTY;
        }
        List<String> shared = names.finish();
        return new Samples(shared, java.util.Arrays.copyOf(values, n));
    }
}
