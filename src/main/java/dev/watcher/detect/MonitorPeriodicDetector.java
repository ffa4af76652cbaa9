package dev.watcher.detect;

import dev.watcher.model.Patterns;
import java.util.LinkedHashMap;
import java.util.Locale;
import java.util.Map;

/**
 * {@code monitor-periodic}: a monitor oscillates with a stable period, amplitude and cycle mean (see
 * {@link MonitorJudge#periodic}); the evidence carries all three. Opens (severity info) per monitor when
 * stable on {@code open_checks} consecutive checks; resolves after {@code clear_checks} consecutive checks
 * fail with the tolerance widened by {@code resolve_factor} (see {@link MonitorConditionDetector}).
 *
 * <p>Parameters ({@code monitor-periodic.}): {@code window} samples (1024; the periodogram takes the latest
 * power of two of them), {@code every} samples between checks of a full window (an eighth of the window:
 * 128; each check costs O(window), plus an FFT when the cycles look stable but their period does not
 * dominate the spectrum), {@code alpha} for Fisher's g (0.01), {@code relative_tolerance} for the
 * cycle-to-cycle spread (0.02, chosen from tests: sampling a cycle of about twenty samples moves a measured
 * amplitude by about 1 %), {@code absolute_tolerance} (1e-6), {@code min_cycles} (4), {@code min_samples}
 * (64), {@code open_checks} (2), {@code clear_checks} (3), {@code resolve_factor} (2).
 */
final class MonitorPeriodicDetector extends MonitorConditionDetector<MonitorJudge.Cycles> {

    MonitorPeriodicDetector(DetectSettings settings) {
        super(Patterns.MONITOR_PERIODIC, "periodic", settings, 1024, 64);
    }

    @Override
    MonitorJudge.Cycles judge(MonitorJudge judge, double[] x, int n, double scale, int heldFrom) {
        return judge.periodic(x, n, scale);
    }

    @Override
    String openSummary(String name, MonitorJudge.Cycles c, Map<String, Object> e) {
        return String.format(Locale.ROOT,
                "%s oscillates steadily: period %.4g iterations, amplitude %.4g, cycle mean %.6g", name,
                e.get("period_iterations"), c.amplitude(), c.cycleMean());
    }

    @Override
    Map<String, Object> evidence(MonitorJudge.Cycles c, double perSample, double timePerSample) {
        Map<String, Object> e = new LinkedHashMap<>();
        e.put("period_iterations", EvidenceNames.round(c.period() * perSample));
        if (series().unsteady()) {
            e.put("period_steps", EvidenceNames.round(c.period()));
            if (Double.isFinite(timePerSample)) {
                e.put("period_time", EvidenceNames.round(c.period() * timePerSample));
            }
        }
        e.put("amplitude", EvidenceNames.round(c.amplitude()));
        e.put("cycle_mean", EvidenceNames.round(c.cycleMean()));
        if (c.cycles() >= 0) {
            e.put("cycles", c.cycles());
        }
        e.put("period_spread", EvidenceNames.round(c.periodSpread()));
        e.put("amplitude_spread", EvidenceNames.round(c.amplitudeSpread()));
        e.put("cycle_mean_spread", EvidenceNames.round(c.meanSpread()));
        e.put("fisher_g", EvidenceNames.round(c.g()));
        e.put("fisher_g_p_value", EvidenceNames.round(c.pValue()));
        e.put("reason", c.reason());
        return EvidenceNames.finite(e);
    }

    /** Per monitor: the evidence of the latest check plus {@code open}. */
    @Override
    Map<String, Object> snapshotOf(MonitorJudge.Cycles c, boolean open, Map<String, Object> evidence) {
        Map<String, Object> v = new LinkedHashMap<>(evidence);
        v.put("open", open);
        return v;
    }
}
