package dev.watcher.model;

import java.util.Arrays;
import java.util.Collections;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * Named values of one record (the residuals, or the monitors), in the order the log gave them.
 *
 * <p>{@code names} is usually one list shared by many records (a parser keeps one list per header or per
 * key set), so a consumer may cache per-name state keyed by the list's identity. {@code values[i]} belongs
 * to {@code names.get(i)}; a value may be NaN or infinite (that is what the log said). An absent name is
 * simply not in the list. The array is owned by the record: nobody may change it after construction.
 */
public record Samples(List<String> names, double[] values) {

    public static final Samples EMPTY = new Samples(List.of(), new double[0]);

    public Samples {
        if (names.size() != values.length) {
            throw new IllegalArgumentException("names " + names.size() + " != values " + values.length);
        }
        names = List.copyOf(names); // no-op for lists already immutable
    }

    public static Samples of(Map<String, Double> map) {
        if (map.isEmpty()) {
            return EMPTY;
        }
        double[] v = new double[map.size()];
        int i = 0;
        for (double d : map.values()) {
            v[i++] = d;
        }
        return new Samples(List.copyOf(map.keySet()), v);
    }

    public int size() {
        return values.length;
    }

    public boolean isEmpty() {
        return values.length == 0;
    }

    public String name(int i) {
        return names.get(i);
    }

    public double value(int i) {
        return values[i];
    }

    /** Index of a name, or -1. */
    public int indexOf(String name) {
        return names.indexOf(name);
    }

    /** The value of a name, or {@code fallback} when the name is absent. */
    public double get(String name, double fallback) {
        int i = names.indexOf(name);
        return i < 0 ? fallback : values[i];
    }

    public Map<String, Double> toMap() {
        Map<String, Double> m = new LinkedHashMap<>();
        for (int i = 0; i < values.length; i++) {
            m.put(names.get(i), values[i]);
        }
        return Collections.unmodifiableMap(m);
    }

    @Override
    public boolean equals(Object o) {
        return o instanceof Samples s && names.equals(s.names) && Arrays.equals(values, s.values);
    }

    @Override
    public int hashCode() {
        return 31 * names.hashCode() + Arrays.hashCode(values);
    }

    @Override
    public String toString() {
        return toMap().toString();
    }
}
