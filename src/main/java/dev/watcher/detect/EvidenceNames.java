package dev.watcher.detect;

import java.util.LinkedHashMap;
import java.util.Locale;
import java.util.Map;

/** Turns equation and monitor names into lower_snake_case evidence keys: {@code fluid/x-momentum -> fluid_x_momentum}. */
final class EvidenceNames {

    private EvidenceNames() {
    }

    static String key(String name) {
        String k = name.toLowerCase(Locale.ROOT).replaceAll("[^a-z0-9]+", "_").replaceAll("^_+|_+$", "");
        return k.isEmpty() ? "unnamed" : k;
    }

    /**
     * A copy without NaN or infinite numbers (JSON has no such values), nested maps cleaned too; order kept.
     * A value that is not known is simply absent.
     */
    @SuppressWarnings("unchecked")
    static Map<String, Object> finite(Map<String, Object> m) {
        Map<String, Object> out = new LinkedHashMap<>();
        m.forEach((k, v) -> {
            if (v instanceof Double d && !Double.isFinite(d)) {
                return;
            }
            out.put(k, v instanceof Map<?, ?> inner ? finite((Map<String, Object>) inner) : v);
        });
        return out;
    }

    /** Rounds to a few significant digits for evidence and summaries (the raw value stays in the snapshot). */
    static double round(double v) {
        if (!Double.isFinite(v) || v == 0) {
            return v;
        }
        return new java.math.BigDecimal(v).round(new java.math.MathContext(5)).doubleValue();
    }
}
