package dev.watcher.report;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.node.NullNode;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;

/**
 * One timeline line as the report reads it: the common keys, and the type's further fields as they were
 * written (CONTRACT.md "Output: the event timeline"). Unknown or missing fields read as empty, never fail.
 *
 * @param at     wall time of the event (UTC), or null when the line had none readable
 * @param fields the whole line as read (type's fields included); never null
 */
record Event(long seq, String run, String type, Instant at, long iter, String state, String severity,
        JsonNode fields) {

    Event {
        run = run == null ? "" : run;
        type = type == null ? "" : type;
        state = state == null ? "" : state;
        severity = severity == null || severity.isEmpty() ? "info" : severity;
        fields = fields == null ? NullNode.getInstance() : fields;
    }

    boolean is(String t) {
        return type.equals(t);
    }

    /** A text field, or null when absent or JSON null. */
    String text(String key) {
        JsonNode n = fields.get(key);
        return n == null || n.isNull() ? null : n.isValueNode() ? n.asText() : n.toString();
    }

    String pattern() {
        return text("pattern");
    }

    String monitor() {
        return text("monitor");
    }

    List<String> equations() {
        JsonNode n = fields.get("equations");
        List<String> out = new ArrayList<>();
        if (n != null && n.isArray()) {
            n.forEach(x -> out.add(x.asText()));
        }
        return out;
    }

    JsonNode evidence() {
        JsonNode n = fields.get("evidence");
        return n == null ? NullNode.getInstance() : n;
    }

    /** A number field (numbers or the strings NaN/Infinity), NaN when absent. */
    double number(String key) {
        return Numbers.of(fields.get(key));
    }

    /** The condition an open/resolved pair is about: pattern, equations and monitor. */
    String conditionKey() {
        return pattern() + "|" + String.join(",", equations()) + "|" + monitor();
    }
}
