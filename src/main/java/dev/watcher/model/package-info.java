/**
 * Plain records that every stage shares: lines become {@link dev.watcher.model.IterationRecord}s, records
 * become {@link dev.watcher.model.Detection}s, detections become {@link dev.watcher.model.TimelineEvent}s,
 * {@link dev.watcher.model.Notice}s and {@link dev.watcher.model.StopRequest}s. No I/O, no clock, no Vert.x.
 */
package dev.watcher.model;
