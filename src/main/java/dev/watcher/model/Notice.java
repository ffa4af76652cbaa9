package dev.watcher.model;

import java.time.Instant;
import java.util.List;
import java.util.Map;

/**
 * A message for one channel, made by the rules from one or more grouped detections of one run. The
 * {@code id} is stable: it is the idempotency key across retries and restarts.
 *
 * @param channel    the channel's name as the rules (or a quick option) declared it
 * @param detections the grouped detections, the first one the most severe
 * @param lastValues the latest residual and monitor values of the run, by name (may be empty)
 */
public record Notice(String id, String run, String channel, NoticeKind kind, Severity severity, String subject,
        String summary, String remedy, List<Detection> detections, Map<String, Double> lastValues,
        Instant created, long iter) {

    public Notice {
        detections = detections == null ? List.of() : List.copyOf(detections);
        lastValues = lastValues == null ? Map.of() : Map.copyOf(lastValues);
        remedy = remedy == null ? "" : remedy;
    }

    /** The pattern of the leading detection, or null. */
    public String pattern() {
        return detections.isEmpty() ? null : detections.get(0).pattern();
    }
}
