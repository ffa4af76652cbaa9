/**
 * The parse stage: complete lines of a log become {@link dev.watcher.model.IterationRecord}s.
 *
 * <p>Entry points for the composition root: {@link dev.watcher.parse.Formats} (built-in formats and format
 * files), {@link dev.watcher.parse.FormatSpec#newParser()} (one {@link dev.watcher.model.LineParser} per
 * source), {@link dev.watcher.parse.RecordJoiner} (several sources feeding one run),
 * {@link dev.watcher.parse.FormatSample} (what {@code watcher check --sample} prints) and
 * {@link dev.watcher.parse.Numbers} (tolerant number reading). Pure: no I/O, no clock, no event loop; the
 * caller reads files and hands over their text. Bad lines are reported to
 * {@link dev.watcher.model.ParseSink#malformed} and skipped; nothing here throws on bad input.
 */
package dev.watcher.parse;
