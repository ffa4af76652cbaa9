/**
 * The live view and the metrics: {@link dev.watcher.live.LiveServer} serves a page of the runs in flight
 * (latest residuals and monitors, open conditions, forecasts to target, plots with level lines updated by
 * server-sent events, each run's timeline), a JSON API, {@code /metrics} in Prometheus text format and {@code /health};
 * {@link dev.watcher.live.WatcherMetrics} holds the watcher's meters.
 *
 * <p>The daemon implements {@link dev.watcher.live.LiveSource} (snapshots of its runs) and hands every
 * timeline event to {@link dev.watcher.live.LiveServer#onEvent}. This package reads the model only; it
 * knows neither the journal nor the history nor the detectors (the daemon converts its history into
 * {@link dev.watcher.live.RunPlots} and its detectors' snapshots into {@link dev.watcher.live.RunForecast}).
 *
 * <pre>
 *   daemon ──runs() 4×/s──► LiveServer ──progress──► page (EventSource)
 *   journal listener ──onEvent──► LiveServer ──timeline──► page
 *                                   └──► WatcherMetrics ──► registry ──► /metrics
 * </pre>
 */
package dev.watcher.live;
