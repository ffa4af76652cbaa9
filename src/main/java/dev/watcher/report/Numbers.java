package dev.watcher.report;

import com.fasterxml.jackson.databind.JsonNode;
import java.math.BigDecimal;
import java.math.MathContext;
import java.util.Locale;

/** Reading and showing the numbers of the timeline and history. Pure; thread-safe. */
final class Numbers {

    private static final MathContext FOUR = new MathContext(4);

    private Numbers() {
    }

    /** A JSON number, or the strings "NaN", "Infinity", "-Infinity"; NaN for anything else or absent. */
    static double of(JsonNode n) {
        if (n == null || n.isNull() || n.isMissingNode()) {
            return Double.NaN;
        }
        if (n.isNumber()) {
            return n.asDouble();
        }
        return switch (n.asText()) {
            case "Infinity", "+Infinity", "inf" -> Double.POSITIVE_INFINITY;
            case "-Infinity", "-inf" -> Double.NEGATIVE_INFINITY;
            default -> {
                try {
                    yield Double.parseDouble(n.asText());
                } catch (NumberFormatException e) {
                    yield Double.NaN;
                }
            }
        };
    }

    /** Four significant digits, for the plot data (enough at a page's resolution, a third of the bytes). */
    static double round4(double v) {
        if (!Double.isFinite(v) || v == 0) {
            return v;
        }
        return new BigDecimal(v).round(FOUR).doubleValue();
    }

    /** A value for people: 4 significant digits, scientific when very small or large. */
    static String show(double v) {
        if (Double.isNaN(v)) {
            return "NaN";
        }
        if (Double.isInfinite(v)) {
            return v > 0 ? "+∞" : "−∞";
        }
        if (v == 0) {
            return "0";
        }
        double a = Math.abs(v);
        if (a >= 1e-3 && a < 1e6) {
            String s = new BigDecimal(v).round(FOUR).stripTrailingZeros().toPlainString();
            return s;
        }
        return String.format(Locale.ROOT, "%.3e", v).replaceFirst("\\.?0+e", "e").replace("e+0", "e+")
                .replace("e-0", "e-");
    }

    /** Core-hours: one decimal, as the action events give them. */
    static String hours(double v) {
        return String.format(Locale.ROOT, "%.1f", v);
    }

    /**
     * A span of time for people, in two units at most (the smaller one truncated): 45 s, 3 min 20 s, 2 h 05 min,
     * 3 d 04 h.
     */
    static String duration(long seconds) {
        long s = Math.max(0, seconds);
        if (s < 60) {
            return s + " s";
        }
        if (s < 3600) {
            return String.format(Locale.ROOT, "%d min %02d s", s / 60, s % 60);
        }
        if (s < 86_400) {
            return String.format(Locale.ROOT, "%d h %02d min", s / 3600, s % 3600 / 60);
        }
        return String.format(Locale.ROOT, "%s d %02d h", count(s / 86_400), s % 86_400 / 3600);
    }

    /** A whole number with thin grouping: 1 000 000. */
    static String count(long n) {
        return String.format(Locale.ROOT, "%,d", n).replace(',', '\u202f');
    }
}
