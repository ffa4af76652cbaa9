package dev.watcher.act;

import dev.watcher.model.EventSink;
import dev.watcher.model.PendingEvent;
import dev.watcher.model.TimelineEvent;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
import java.util.stream.Collectors;

/** An event sink that keeps what it is given, numbering it like the journal. */
final class ListSink implements EventSink {
    private final List<TimelineEvent> events = new ArrayList<>();

    @Override
    public synchronized TimelineEvent append(PendingEvent e) {
        TimelineEvent t = TimelineEvent.of(events.size() + 1, Instant.now(), e);
        events.add(t);
        return t;
    }

    synchronized List<TimelineEvent> events() {
        return List.copyOf(events);
    }

    synchronized List<String> states() {
        return events.stream().map(TimelineEvent::state).collect(Collectors.toList());
    }

    synchronized TimelineEvent last(String state) {
        for (int i = events.size() - 1; i >= 0; i--) {
            if (events.get(i).state().equals(state)) {
                return events.get(i);
            }
        }
        return null;
    }
}
