package dev.watcher.model;

import java.util.Collections;
import java.util.LinkedHashMap;
import java.util.Map;

/**
 * A timeline event before the journal gives it its {@code seq} and {@code at}.
 *
 * @param fields the type's further fields (CONTRACT.md), lower_snake_case keys, in output order; values are
 *               strings, numbers, booleans, null, lists and maps of those
 */
public record PendingEvent(String run, EventType type, long iter, String state, Severity severity,
        Map<String, Object> fields) {

    public PendingEvent {
        fields = fields == null ? Map.of() : Collections.unmodifiableMap(new LinkedHashMap<>(fields));
    }

    public static PendingEvent detection(String run, Detection d) {
        Map<String, Object> f = new LinkedHashMap<>();
        f.put("pattern", d.pattern());
        f.put("equations", d.equations());
        f.put("monitor", d.monitor());
        f.put("summary", d.summary());
        f.put("remedy", d.remedy());
        f.put("evidence", d.evidence());
        return new PendingEvent(run, EventType.DETECTION, d.iter(), d.state().id(), d.severity(), f);
    }

    /** A {@code run} event: started, resumed, caught-up, segment, ended. */
    public static PendingEvent run(String run, long iter, String state, String reason) {
        Map<String, Object> f = new LinkedHashMap<>();
        f.put("reason", reason);
        return new PendingEvent(run, EventType.RUN, iter, state, Severity.INFO, f);
    }

    public String pattern() {
        Object p = fields.get("pattern");
        return p == null ? null : p.toString();
    }
}
