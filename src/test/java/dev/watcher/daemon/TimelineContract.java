package dev.watcher.daemon;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import dev.watcher.model.Patterns;
import java.util.HashMap;
import java.util.Iterator;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.regex.Pattern;

/** Checks timeline lines against the outside contract (CONTRACT.md, "Output: the event timeline"). */
final class TimelineContract {

    private static final Pattern AT = Pattern.compile("\\d{4}-\\d{2}-\\d{2}T\\d{2}:\\d{2}:\\d{2}\\.\\d{3}Z");
    private static final Pattern SNAKE = Pattern.compile("[a-z][a-z0-9_]*");
    private static final Map<String, Set<String>> STATES = Map.of(
            "detection", Set.of("open", "resolved", "info"),
            "notice", Set.of("queued", "sent", "failed", "gave-up"),
            "action", Set.of("would-stop", "requested", "signalled", "done", "refused", "failed"),
            "run", Set.of("started", "resumed", "caught-up", "segment", "ended"));

    private TimelineContract() {
    }

    /** Every line valid, and seq 1, 2, 3, ... per run. */
    static void check(List<JsonNode> events) {
        Map<String, Long> seq = new HashMap<>();
        for (JsonNode e : events) {
            String where = e.toString();
            for (String k : List.of("seq", "run", "type", "at", "iter", "state", "severity")) {
                assertTrue(e.has(k), "missing " + k + ": " + where);
            }
            assertTrue(e.get("seq").isIntegralNumber() && e.get("iter").isIntegralNumber(), where);
            String run = e.get("run").asText();
            long expected = seq.merge(run, 1L, Long::sum);
            assertEquals(expected, e.get("seq").asLong(), "seq of run " + run + ": " + where);
            assertTrue(AT.matcher(e.get("at").asText()).matches(), "at: " + where);
            assertTrue(Set.of("info", "warning", "critical").contains(e.get("severity").asText()), where);
            String type = e.get("type").asText();
            Set<String> states = STATES.get(type);
            assertNotNull(states, "type: " + where);
            assertTrue(states.contains(e.get("state").asText()), "state: " + where);
            if (type.equals("detection")) {
                for (String k : List.of("pattern", "equations", "monitor", "summary", "remedy", "evidence")) {
                    assertTrue(e.has(k), "detection without " + k + ": " + where);
                }
                assertTrue(Patterns.isKnown(e.get("pattern").asText()), "pattern: " + where);
                assertTrue(e.get("equations").isArray(), where);
                assertTrue(e.get("monitor").isNull() || e.get("monitor").isTextual(), where);
                for (Iterator<String> it = e.get("evidence").fieldNames(); it.hasNext();) {
                    String k = it.next();
                    assertTrue(SNAKE.matcher(k).matches(), "evidence key " + k + ": " + where);
                }
            }
            if (type.equals("notice")) {
                for (String k : List.of("channel", "notice_id", "attempt", "pattern")) {
                    assertTrue(e.has(k), "notice without " + k + ": " + where);
                }
            }
            if (type.equals("action")) {
                assertTrue(e.has("reason") || e.has("method"), where);
            }
        }
    }
}
