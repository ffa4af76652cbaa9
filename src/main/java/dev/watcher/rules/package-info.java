/**
 * The rules stage: what a detection means for people. {@link dev.watcher.rules.RulesLoader} reads a rules
 * file (YAML, {@code kind: rules}) into a {@link dev.watcher.rules.RuleSet}; one
 * {@link dev.watcher.rules.Decider} per run turns that run's detections into
 * {@link dev.watcher.model.Notice}s and {@link dev.watcher.model.StopRequest}s:
 * <pre>
 *   Detection --decide()--> Decision(detection as rewritten, notices due now, stop or null)
 *   clock     --tick()----> notices due with time alone (grouping wait over, reminders)
 * </pre>
 * Pure: no I/O (the caller passes the file's text), no event loop, time only from an injected
 * {@link java.time.Clock}.
 */
package dev.watcher.rules;
