package dev.watcher.daemon;

import dev.watcher.model.IterationRecord;
import dev.watcher.model.Malformed;
import dev.watcher.model.Notice;
import dev.watcher.model.PendingEvent;
import dev.watcher.model.StopRequest;

/**
 * Where one run's pipeline sends what it makes. The daemon wires the journal, the dispatcher, the stop
 * coordinator and the history; {@code replay} and tests wire what they need. Called on the run's thread.
 */
interface RunOutputs {
    void event(PendingEvent e);

    default void notice(Notice n) {
    }

    default void stop(StopRequest r) {
    }

    default void record(IterationRecord r) {
    }

    /** Bad input at {@code line} was counted and skipped (after the records before it, before those after). */
    default void malformed(Malformed kind, long line, String detail) {
    }

    /** A new segment started at {@code iter} (a restart): the stop gate waits past a grace period. */
    default void segment(int segment, long iter) {
    }
}
