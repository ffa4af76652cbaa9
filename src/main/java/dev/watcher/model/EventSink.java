package dev.watcher.model;

/**
 * Takes events into the timeline (the journal implements it; tests pass a list). Safe to call from any
 * thread; returns the event as written, with its seq and time.
 */
@FunctionalInterface
public interface EventSink {
    TimelineEvent append(PendingEvent event);
}
