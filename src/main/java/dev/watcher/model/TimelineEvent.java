package dev.watcher.model;

import java.time.Instant;
import java.util.Map;

/**
 * One line of the event timeline, as written: a {@link PendingEvent} with its place in the run's sequence
 * ({@code seq}, from 1, never repeated across restarts) and the wall time it was made ({@code at}, UTC).
 */
public record TimelineEvent(long seq, String run, EventType type, Instant at, long iter, String state,
        Severity severity, Map<String, Object> fields) {

    public TimelineEvent {
        fields = fields == null ? Map.of() : fields;
    }

    public static TimelineEvent of(long seq, Instant at, PendingEvent e) {
        return new TimelineEvent(seq, e.run(), e.type(), at, e.iter(), e.state(), e.severity(), e.fields());
    }

    public String pattern() {
        Object p = fields.get("pattern");
        return p == null ? null : p.toString();
    }
}
