package dev.watcher.notify;

import dev.watcher.model.Detection;
import dev.watcher.model.DetectionState;
import dev.watcher.model.Notice;
import dev.watcher.model.NoticeKind;
import dev.watcher.model.Patterns;
import dev.watcher.model.Severity;
import java.time.Instant;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/** Notices for tests, about an invented heat-exchanger header run (a demo scenario, not reference data). */
final class Notices {

    static final Instant CREATED = Instant.parse("2026-03-14T09:26:53Z");

    private Notices() {
    }

    static Notice blowup(String id, String channel) {
        Map<String, Object> evidence = new LinkedHashMap<>();
        evidence.put("growth_per_100_iter", 38.5);
        evidence.put("window", 200);
        Detection d = new Detection(Patterns.SINGLE_EQUATION_BLOWUP, DetectionState.OPEN, Severity.CRITICAL, 4120,
                List.of("k"), null, "k residual rose 38x in 100 iterations while the others kept falling",
                "lower the relaxation factor of k", evidence);
        Map<String, Double> last = new LinkedHashMap<>();
        last.put("continuity", 3.1e-3);
        last.put("k", 0.42);
        last.put("outlet-temperature", 341.7);
        return new Notice(id, "hx-header-07", channel, NoticeKind.OPENED, Severity.CRITICAL,
                "k blows up", d.summary(), "Lower the under-relaxation of k to 0.5 and restart from the last save",
                List.of(d), last, CREATED, 4120);
    }
}
