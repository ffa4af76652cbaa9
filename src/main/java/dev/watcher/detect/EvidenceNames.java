package dev.watcher.detect;

import java.util.Locale;

/** Turns equation and monitor names into lower_snake_case evidence keys: {@code fluid/x-momentum -> fluid_x_momentum}. */
final class EvidenceNames {

    private EvidenceNames() {
    }

    static String key(String name) {
        String k = name.toLowerCase(Locale.ROOT).replaceAll("[^a-z0-9]+", "_").replaceAll("^_+|_+$", "");
        return k.isEmpty() ? "unnamed" : k;
    }

    /** Rounds to a few significant digits for evidence and summaries (the raw value stays in the snapshot). */
    static double round(double v) {
        if (!Double.isFinite(v) || v == 0) {
            return v;
        }
        return new java.math.BigDecimal(v).round(new java.math.MathContext(5)).doubleValue();
    }
}
