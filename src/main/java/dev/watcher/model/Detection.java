package dev.watcher.model;

import java.util.Collections;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * What a detector found, as a value: it always carries its evidence.
 *
 * @param pattern   a pattern id from {@link Patterns}
 * @param state     open, resolved or info
 * @param severity  the detector's default; the rules may change it
 * @param iter      the iteration the detection refers to
 * @param equations equations involved (may be empty, never null)
 * @param monitor   the monitor involved, or null
 * @param summary   one readable sentence
 * @param remedy    the detector's suggestion in trade language (the rules may replace it); may be empty
 * @param evidence  lower_snake_case keys to numbers or short strings, in a stable order
 */
public record Detection(String pattern, DetectionState state, Severity severity, long iter,
        List<String> equations, String monitor, String summary, String remedy, Map<String, Object> evidence) {

    public Detection {
        equations = equations == null ? List.of() : List.copyOf(equations);
        summary = summary == null ? "" : summary;
        remedy = remedy == null ? "" : remedy;
        evidence = evidence == null ? Map.of() : Collections.unmodifiableMap(new LinkedHashMap<>(evidence));
    }

    public Detection withSeverity(Severity s) {
        return new Detection(pattern, state, s, iter, equations, monitor, summary, remedy, evidence);
    }

    public Detection withRemedy(String r) {
        return new Detection(pattern, state, severity, iter, equations, monitor, summary, r, evidence);
    }

    /**
     * The identity of the condition this detection opens or resolves: pattern plus the equations or the
     * monitor it is about. An open and its later resolve share it.
     */
    public String conditionKey() {
        StringBuilder b = new StringBuilder(pattern);
        if (monitor != null) {
            b.append('|').append(monitor);
        }
        for (String e : equations) {
            b.append('|').append(e);
        }
        return b.toString();
    }
}
