package dev.watcher.detect;

import java.util.Collections;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;

/**
 * The named parameters of a run's detectors: defaults live beside each detector, a user overrides them per
 * run (rules file, command line) with keys {@code pattern-id.parameter_name}, e.g.
 * {@code stalled-oscillation.window = 400} or {@code converged.residual_target = 1e-6}.
 *
 * <p>Also carries the equation families (family name to equation names) that a format or the rules declare;
 * an empty map means "derive families from trade names".
 *
 * <p>Immutable and thread-safe. Every parameter a detector reads is remembered in {@link #used()} so the
 * daemon can document what was in force.
 */
public final class DetectSettings {

    private final Map<String, String> overrides;
    private final Map<String, List<String>> families;
    private final Map<String, String> used = Collections.synchronizedMap(new TreeMap<>());

    private DetectSettings(Map<String, String> overrides, Map<String, List<String>> families) {
        this.overrides = Map.copyOf(overrides);
        Map<String, List<String>> f = new LinkedHashMap<>();
        families.forEach((k, v) -> f.put(k, List.copyOf(v)));
        this.families = Collections.unmodifiableMap(f);
    }

    public static DetectSettings defaults() {
        return new DetectSettings(Map.of(), Map.of());
    }

    public static DetectSettings of(Map<String, String> overrides, Map<String, List<String>> families) {
        return new DetectSettings(overrides, families);
    }

    /** A copy with more overrides; later ones win. */
    public DetectSettings with(Map<String, String> more) {
        Map<String, String> m = new LinkedHashMap<>(overrides);
        m.putAll(more);
        return new DetectSettings(m, families);
    }

    public DetectSettings withFamilies(Map<String, List<String>> more) {
        Map<String, List<String>> f = new LinkedHashMap<>(families);
        f.putAll(more);
        return new DetectSettings(overrides, f);
    }

    public Map<String, List<String>> families() {
        return families;
    }

    public Map<String, String> overrides() {
        return overrides;
    }

    /**
     * A numeric parameter. An override that does not parse as a number is a user error caught at start-up
     * by {@link #validate}, so here it falls back to the default.
     */
    public double number(String key, double fallback) {
        String v = overrides.get(key);
        double r = fallback;
        if (v != null) {
            try {
                r = Double.parseDouble(v.trim());
            } catch (NumberFormatException e) {
                r = fallback;
            }
        }
        used.put(key, Double.toString(r));
        return r;
    }

    public int integer(String key, int fallback) {
        return (int) Math.round(number(key, fallback));
    }

    public boolean flag(String key, boolean fallback) {
        String v = overrides.get(key);
        boolean r = v == null ? fallback : Boolean.parseBoolean(v.trim());
        used.put(key, Boolean.toString(r));
        return r;
    }

    public String text(String key, String fallback) {
        String v = overrides.get(key);
        String r = v == null ? fallback : v.trim();
        used.put(key, r);
        return r;
    }

    /** The parameters read so far with the values in force. */
    public Map<String, String> used() {
        synchronized (used) {
            return Map.copyOf(used);
        }
    }

    /** The first override key whose value is not a number, or null when all numeric overrides parse. */
    public String validate(java.util.Set<String> numericKeys) {
        for (String k : numericKeys) {
            String v = overrides.get(k);
            if (v != null) {
                try {
                    Double.parseDouble(v.trim());
                } catch (NumberFormatException e) {
                    return k;
                }
            }
        }
        return null;
    }
}
