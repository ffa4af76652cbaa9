package dev.watcher.notify;

import dev.watcher.model.EventSink;
import dev.watcher.model.PendingEvent;
import dev.watcher.model.TimelineEvent;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;

/** An {@link EventSink} test double that keeps every event in order; thread-safe like the real journal. */
final class RecordingSink implements EventSink {

    private final List<TimelineEvent> events = new ArrayList<>();

    @Override
    public synchronized TimelineEvent append(PendingEvent e) {
        TimelineEvent t = TimelineEvent.of(events.size() + 1, Instant.now(), e);
        events.add(t);
        return t;
    }

    synchronized List<TimelineEvent> all() {
        return List.copyOf(events);
    }

    /** The events about one notice, in order. */
    synchronized List<TimelineEvent> of(String noticeId) {
        return events.stream().filter(e -> noticeId.equals(e.fields().get("notice_id"))).toList();
    }

    /** The states of one notice's events, in order ("queued", "failed", ...). */
    synchronized List<String> states(String noticeId) {
        return of(noticeId).stream().map(TimelineEvent::state).toList();
    }

    synchronized boolean finished(String noticeId) {
        List<String> s = states(noticeId);
        return !s.isEmpty() && (s.get(s.size() - 1).equals("sent") || s.get(s.size() - 1).equals("gave-up"));
    }
}
