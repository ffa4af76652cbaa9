package dev.watcher.detect;

import dev.watcher.model.Detection;
import dev.watcher.model.DetectionState;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.Patterns;
import dev.watcher.model.Severity;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.function.Consumer;

/**
 * {@code monitor-settled}: a monitor is flat within its tolerance after its start-up transient (see
 * {@link MonitorJudge#settled}). Opens (severity info) per monitor when settled; resolves when the monitor
 * fails the judgement with the tolerance widened by {@code resolve_factor} on {@code clear_checks}
 * consecutive checks (hysteresis: noise at the tolerance's edge does not flap the condition).
 *
 * <p>Parameters ({@code monitor-settled.}): {@code window} samples judged (1000), {@code every} samples
 * between judgements (25), {@code relative_tolerance} (0.001, common practice, no published source),
 * {@code absolute_tolerance} in the monitor's units for monitors near zero (1e-6), {@code min_samples} (100),
 * {@code batches} for the batch means (20, kept within 10..30), {@code confidence} of the interval (0.95),
 * {@code clear_checks} (3), {@code resolve_factor} (2). In unsteady runs a sample is a step's last inner
 * iteration.
 */
final class MonitorSettledDetector implements Detector {

    private final MonitorJudge judge;
    private final MonitorSeries series;
    private final int every;
    private final int clearChecks;
    private final double resolveFactor;
    private final Map<String, Integer> sinceCheck = new HashMap<>();
    private final Map<String, Integer> failing = new HashMap<>();
    private final Map<String, MonitorJudge.Settling> last = new LinkedHashMap<>();
    private final Map<String, Boolean> open = new HashMap<>();
    private int segmentSeen;

    MonitorSettledDetector(DetectSettings settings) {
        String p = Patterns.MONITOR_SETTLED + ".";
        this.judge = new MonitorJudge(settings);
        this.series = new MonitorSeries(Math.max(50, settings.integer(p + "window", 1000)));
        this.every = Math.max(1, settings.integer(p + "every", 25));
        this.clearChecks = Math.max(1, settings.integer(p + "clear_checks", 3));
        this.resolveFactor = Math.max(1, settings.number(p + "resolve_factor", 2));
    }

    @Override
    public void observe(IterationRecord record, Consumer<Detection> out) {
        if (record.segment() != segmentSeen) {
            segment(record.segment(), record.iter(), out);
        }
        if (!series.accept(record)) {
            return;
        }
        for (String name : series.names()) {
            int k = sinceCheck.merge(name, 1, Integer::sum);
            if (k < every) {
                continue;
            }
            sinceCheck.put(name, 0);
            check(name, out);
        }
    }

    private void check(String name, Consumer<Detection> out) {
        double[] x = series.values(name);
        boolean isOpen = open.getOrDefault(name, false);
        MonitorJudge.Settling s = judge.settled(x, x.length, isOpen ? resolveFactor : 1);
        last.put(name, s);
        long iter = series.lastIteration(name);
        if (!isOpen && s.settled()) {
            open.put(name, true);
            failing.put(name, 0);
            out.accept(new Detection(Patterns.MONITOR_SETTLED, DetectionState.OPEN, Severity.INFO, iter, List.of(),
                    name, String.format(java.util.Locale.ROOT, "%s settled at %.6g (within %.3g, interval +/- %.3g)",
                            name, s.predicted(), s.tolerance(), s.halfWidth()),
                    "", evidence(name, s)));
        } else if (isOpen && !s.settled() && !"too few samples".equals(s.reason())) {
            int f = failing.merge(name, 1, Integer::sum);
            if (f >= clearChecks) {
                open.put(name, false);
                failing.put(name, 0);
                out.accept(new Detection(Patterns.MONITOR_SETTLED, DetectionState.RESOLVED, Severity.INFO, iter,
                        List.of(), name, name + " no longer settled: " + s.reason(), "", evidence(name, s)));
            }
        } else if (isOpen) {
            failing.put(name, 0);
        }
    }

    private Map<String, Object> evidence(String name, MonitorJudge.Settling s) {
        Map<String, Object> e = new LinkedHashMap<>();
        e.put("mean", EvidenceNames.round(s.mean()));
        e.put("half_width", EvidenceNames.round(s.halfWidth()));
        e.put("tolerance", EvidenceNames.round(s.tolerance()));
        e.put("drift", EvidenceNames.round(s.drift()));
        e.put("truncated_samples", s.truncation());
        e.put("samples", s.samples());
        e.put("predicted_final", EvidenceNames.round(s.predicted()));
        e.put("remaining_error", EvidenceNames.round(s.remainingError()));
        e.put("sampling", series.unsteady() ? "step-end" : "iteration");
        e.put("reason", s.reason());
        return EvidenceNames.finite(e);
    }

    @Override
    public void segment(int segment, long iter, Consumer<Detection> out) {
        segmentSeen = segment;
        series.reset();
        sinceCheck.clear();
    }

    /** Per monitor: {@code state} (settled, or the reason it is not), mean, half_width, tolerance, predicted_final, remaining_error. */
    @Override
    public Map<String, Object> snapshot() {
        Map<String, Object> m = new LinkedHashMap<>();
        last.forEach((name, s) -> {
            Map<String, Object> v = new LinkedHashMap<>();
            v.put("state", s.settled() ? "settled" : s.reason());
            v.put("open", open.getOrDefault(name, false));
            v.put("mean", s.mean());
            v.put("half_width", s.halfWidth());
            v.put("tolerance", s.tolerance());
            v.put("predicted_final", s.predicted());
            v.put("remaining_error", s.remainingError());
            m.put(name, v);
        });
        return EvidenceNames.finite(Map.of("monitors", m));
    }
}
