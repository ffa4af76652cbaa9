package dev.watcher.live;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;

import dev.watcher.model.EventType;
import dev.watcher.model.Severity;
import dev.watcher.model.TimelineEvent;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.time.Instant;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import org.junit.jupiter.api.Test;

class WatcherMetricsTest {

    private static RunStatus manyRegions(int equations, int monitors) {
        Map<String, Double> res = new LinkedHashMap<>();
        for (int i = 0; i < equations; i++) {
            res.put("zone-" + i + "/temp", 1e-3 * (i + 1));
        }
        Map<String, Double> mon = new LinkedHashMap<>();
        for (int i = 0; i < monitors; i++) {
            mon.put("probe-" + i, 10.0 + i);
        }
        return new RunStatus("rooftop", RunStatus.FOLLOWING, 900, res, mon, List.of(), 900, 900, Map.of(),
                RunForecast.NONE);
    }

    private static LiveSource fixed(RunStatus... s) {
        return new LiveSource() {
            @Override
            public List<RunStatus> runs() {
                return List.of(s);
            }

            @Override
            public List<TimelineEvent> recentEvents(String run, int max) {
                return List.of();
            }

            @Override
            public Optional<RunPlots> plots(String run) {
                return Optional.empty();
            }
        };
    }

    @Test
    void seriesBeyondTheCapAreLeftOutAndCounted() {
        SimpleMeterRegistry registry = new SimpleMeterRegistry();
        WatcherMetrics m = new WatcherMetrics(fixed(manyRegions(60, 10)), registry, 64);
        m.refresh();
        m.refresh(); // a second read registers nothing new and drops nothing twice
        assertEquals(60, registry.find("watcher.residual").gauges().size());
        assertEquals(4, registry.find("watcher.monitor").gauges().size(), "64 - 60 equations");
        assertEquals(6, m.dropped("rooftop"));
        assertEquals(6.0, registry.get("watcher.series.dropped").tag("run", "rooftop").gauge().value());
        assertNotNull(registry.find("watcher.monitor").tag("monitor", "probe-3").gauge());
        assertNull(registry.find("watcher.monitor").tag("monitor", "probe-4").gauge());
        assertEquals(1e-3 * 60, registry.get("watcher.residual").tag("equation", "zone-59/temp").gauge().value());
    }

    @Test
    void outcomesOutsideTheTimelinesClosedSetsShareOneTagValue() {
        SimpleMeterRegistry registry = new SimpleMeterRegistry();
        WatcherMetrics m = new WatcherMetrics(fixed(), registry, 64);
        Instant at = Instant.parse("2026-12-02T01:00:00Z");
        m.onEvent(new TimelineEvent(1, "fan", EventType.ACTION, at, 10, "done", Severity.CRITICAL, Map.of()));
        m.onEvent(new TimelineEvent(2, "fan", EventType.ACTION, at, 11, "exploded", Severity.CRITICAL, Map.of()));
        m.onEvent(new TimelineEvent(3, "fan", EventType.NOTICE, at, 11, "sent", Severity.WARNING, Map.of()));
        m.onEvent(new TimelineEvent(4, "fan", EventType.DETECTION, at, 12, "resolved", Severity.INFO,
                Map.of("pattern", "converged")));
        assertEquals(1.0, registry.get("watcher.actions").tag("outcome", "done").counter().count());
        assertEquals(1.0, registry.get("watcher.actions").tag("outcome", "other").counter().count());
        assertEquals(1.0, registry.get("watcher.notices").tag("channel", "unknown").counter().count());
        assertNull(registry.find("watcher.detections").counter(), "only opened conditions count as detections");
    }
}
