package dev.watcher.live;

import dev.watcher.model.TimelineEvent;
import java.util.List;
import java.util.Optional;

/**
 * What the live view and the metrics read about the runs being watched. The daemon implements it; the
 * {@link LiveServer} and {@link WatcherMetrics} only read.
 *
 * <p>Threading: every method may be called from any thread, concurrently with the runs' own threads, and
 * must return a consistent snapshot that the caller may keep (no live views of mutable state). {@link #runs()}
 * is called from a Vert.x event loop a few times per second (and on every scrape): it must be cheap and must
 * not block (no I/O, no waiting on a run's lock for long). {@link #plots} and {@link #recentEvents} are
 * called on a worker thread when a page loads.
 *
 * <p>Live updates need no subscription: the server polls {@link #runs()} four times per second and pushes
 * what changed (at most one summary per run per poll); timeline events reach it through
 * {@link LiveServer#onEvent}, which the daemon calls from its journal listener.
 */
public interface LiveSource {

    /** Every run known to the daemon, in a stable order (the order the page lists them). */
    List<RunStatus> runs();

    /**
     * The last {@code max} timeline events of {@code run}, oldest first; empty when the run is unknown.
     * {@code max} is positive.
     */
    List<TimelineEvent> recentEvents(String run, int max);

    /** A snapshot of the run's bounded history for the plots; empty when the run is unknown. */
    Optional<RunPlots> plots(String run);
}
