package dev.watcher.rules;

import dev.watcher.model.Detection;
import java.util.Locale;
import java.util.Map;

/**
 * Fills a remedy template from a detection. {@code {equations}} becomes the equations involved,
 * {@code {monitor}} the monitor, and any other {@code {name}} the detection's evidence value of that key or,
 * failing that, the run's last value of that name (the daemon puts facts such as {@code core_hours_left}
 * there). A part in square brackets is kept only when every placeholder in it is known, so
 * {@code "Done[; up to {core_hours_left} core-hours left]."} reads well with and without the allocation.
 * A placeholder outside brackets that is unknown stays as written.
 */
final class RemedyText {

    private RemedyText() {
    }

    static String fill(String template, Detection d, Map<String, Double> lastValues) {
        if (template == null || template.isEmpty()) {
            return template;
        }
        StringBuilder out = new StringBuilder();
        int i = 0;
        while (i < template.length()) {
            char c = template.charAt(i);
            if (c == '[') {
                int end = template.indexOf(']', i);
                if (end > 0) {
                    StringBuilder part = new StringBuilder();
                    if (substitute(template.substring(i + 1, end), d, lastValues, part)) {
                        out.append(part);
                    }
                    i = end + 1;
                    continue;
                }
            }
            int next = template.indexOf('[', i + 1);
            int stop = next < 0 ? template.length() : next;
            substitute(template.substring(i, stop), d, lastValues, out);
            i = stop;
        }
        return out.toString();
    }

    /** Appends {@code text} with placeholders filled; false when some placeholder was unknown. */
    private static boolean substitute(String text, Detection d, Map<String, Double> lastValues, StringBuilder out) {
        boolean allKnown = true;
        int i = 0;
        while (i < text.length()) {
            int open = text.indexOf('{', i);
            int close = open < 0 ? -1 : text.indexOf('}', open);
            if (open < 0 || close < 0) {
                out.append(text, i, text.length());
                break;
            }
            out.append(text, i, open);
            String name = text.substring(open + 1, close);
            String value = lookup(name, d, lastValues);
            if (value == null) {
                allKnown = false;
                out.append(text, open, close + 1);
            } else {
                out.append(value);
            }
            i = close + 1;
        }
        return allKnown;
    }

    private static String lookup(String name, Detection d, Map<String, Double> lastValues) {
        if (name.equals("equations")) {
            return d.equations().isEmpty() ? null : String.join(", ", d.equations());
        }
        if (name.equals("monitor")) {
            return d.monitor();
        }
        Object v = d.evidence().get(name);
        if (v == null && lastValues != null) {
            v = lastValues.get(name);
        }
        if (v instanceof Number n) {
            double x = n.doubleValue();
            if (!Double.isFinite(x)) {
                return null;
            }
            return format(x);
        }
        return v == null ? null : v.toString();
    }

    static String format(double x) {
        double a = Math.abs(x);
        if (a >= 10 || x == Math.rint(x)) {
            return String.format(Locale.ROOT, "%d", Math.round(x));
        }
        if (a >= 0.01) {
            return String.format(Locale.ROOT, "%.2f", x).replaceAll("0+$", "").replaceAll("\\.$", "");
        }
        return String.format(Locale.ROOT, "%.2e", x);
    }
}
