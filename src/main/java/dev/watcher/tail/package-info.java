/**
 * The tail stage: turns log files into complete lines.
 *
 * <ul>
 *   <li>{@link dev.watcher.tail.FileFollower} follows one file another process is still writing (live), by
 *       polling; it survives truncation, replacement, deletion and late creation, and resumes from a
 *       {@link dev.watcher.model.TailPosition}.</li>
 *   <li>{@link dev.watcher.tail.LogReader} reads a finished file fast (replay).</li>
 *   <li>{@link dev.watcher.tail.SilenceWatch} is the {@code log-silent} watchdog that stands beside a
 *       follower.</li>
 * </ul>
 *
 * Both readers split lines at the byte level and share one set of line rules; they deliver each line to a
 * {@link dev.watcher.tail.LineHandler} (ASCII lines as a {@link dev.watcher.model.AsciiText} view, without a
 * String) and report bad input and file events as {@link dev.watcher.tail.TailNotice}s. Nothing here throws for
 * bad input.
 */
package dev.watcher.tail;
