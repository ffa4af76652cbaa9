package dev.watcher.detect;

import dev.watcher.model.Detection;
import dev.watcher.model.DetectionState;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.Patterns;
import dev.watcher.model.Severity;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.function.Consumer;

/**
 * {@code monitor-periodic}: a monitor oscillates with a stable period, amplitude and cycle mean (see
 * {@link MonitorJudge#periodic}); the evidence carries all three. Opens (severity info) per monitor;
 * resolves after {@code clear_checks} consecutive checks fail with the tolerance widened by
 * {@code resolve_factor}.
 *
 * <p>Parameters ({@code monitor-periodic.}): {@code window} samples (1024; the periodogram takes the latest
 * power of two of them), {@code every} samples between checks (32), {@code alpha} for Fisher's g (0.01),
 * {@code relative_tolerance} for the cycle-to-cycle spread (0.02, chosen from tests: sampling a cycle of
 * about twenty samples moves a measured amplitude by about 1 %), {@code absolute_tolerance} (1e-6),
 * {@code min_cycles} (4), {@code min_samples} (64), {@code clear_checks} (3), {@code resolve_factor} (2).
 */
final class MonitorPeriodicDetector implements Detector {

    private final MonitorJudge judge;
    private final MonitorSeries series;
    private final int every;
    private final int clearChecks;
    private final double resolveFactor;
    private final Map<String, Integer> sinceCheck = new HashMap<>();
    private final Map<String, Integer> failing = new HashMap<>();
    private final Map<String, Boolean> open = new HashMap<>();
    private final Map<String, Map<String, Object>> last = new LinkedHashMap<>();
    private int segmentSeen;

    MonitorPeriodicDetector(DetectSettings settings) {
        String p = Patterns.MONITOR_PERIODIC + ".";
        this.judge = new MonitorJudge(settings);
        this.series = new MonitorSeries(Math.max(64, settings.integer(p + "window", 1024)));
        this.every = Math.max(1, settings.integer(p + "every", 32));
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
        MonitorJudge.Cycles c = judge.periodic(x, x.length, isOpen ? resolveFactor : 1);
        Map<String, Object> e = evidence(name, c);
        last.put(name, e);
        long iter = series.lastIteration(name);
        if (!isOpen && c.stable()) {
            open.put(name, true);
            failing.put(name, 0);
            out.accept(new Detection(Patterns.MONITOR_PERIODIC, DetectionState.OPEN, Severity.INFO, iter, List.of(),
                    name, String.format(Locale.ROOT,
                            "%s oscillates steadily: period %.4g iterations, amplitude %.4g, cycle mean %.6g", name,
                            e.get("period_iterations"), c.amplitude(), c.cycleMean()),
                    "", e));
        } else if (isOpen && !c.stable() && !"too few samples".equals(c.reason())) {
            int f = failing.merge(name, 1, Integer::sum);
            if (f >= clearChecks) {
                open.put(name, false);
                failing.put(name, 0);
                out.accept(new Detection(Patterns.MONITOR_PERIODIC, DetectionState.RESOLVED, Severity.INFO, iter,
                        List.of(), name, name + " no longer periodic: " + c.reason(), "", e));
            }
        } else if (isOpen) {
            failing.put(name, 0);
        }
    }

    private Map<String, Object> evidence(String name, MonitorJudge.Cycles c) {
        Map<String, Object> e = new LinkedHashMap<>();
        double perSample = series.iterationsPerSample(name);
        e.put("period_iterations", EvidenceNames.round(c.period() * perSample));
        if (series.unsteady()) {
            e.put("period_steps", EvidenceNames.round(c.period()));
            double dt = series.timePerSample(name);
            if (Double.isFinite(dt)) {
                e.put("period_time", EvidenceNames.round(c.period() * dt));
            }
        }
        e.put("amplitude", EvidenceNames.round(c.amplitude()));
        e.put("cycle_mean", EvidenceNames.round(c.cycleMean()));
        e.put("cycles", c.cycles());
        e.put("period_spread", EvidenceNames.round(c.periodSpread()));
        e.put("amplitude_spread", EvidenceNames.round(c.amplitudeSpread()));
        e.put("cycle_mean_spread", EvidenceNames.round(c.meanSpread()));
        e.put("fisher_g", EvidenceNames.round(c.g()));
        e.put("fisher_g_p_value", EvidenceNames.round(c.pValue()));
        e.put("reason", c.reason());
        return EvidenceNames.finite(e);
    }

    @Override
    public void segment(int segment, long iter, Consumer<Detection> out) {
        segmentSeen = segment;
        series.reset();
        sinceCheck.clear();
    }

    /** Per monitor: the evidence of the latest check plus {@code open}. */
    @Override
    public Map<String, Object> snapshot() {
        Map<String, Object> m = new LinkedHashMap<>();
        last.forEach((name, e) -> {
            Map<String, Object> v = new LinkedHashMap<>(e);
            v.put("open", open.getOrDefault(name, false));
            m.put(name, v);
        });
        return EvidenceNames.finite(Map.of("monitors", m));
    }
}
