package dev.watcher.detect;

import dev.watcher.model.Patterns;
import java.util.LinkedHashMap;
import java.util.Locale;
import java.util.Map;

/**
 * {@code monitor-settled}: a monitor is flat within its tolerance after its start-up transient (see
 * {@link MonitorJudge#settled}). Opens (severity info) per monitor when settled on {@code open_checks}
 * consecutive checks; resolves when the monitor fails the judgement with the tolerance widened by {@code
 * resolve_factor} on {@code clear_checks} consecutive checks (hysteresis: noise at the tolerance's edge does
 * not flap the condition; see {@link MonitorConditionDetector}). Once a stretch has been judged settled, the
 * later judgements keep it (from where the first one's MSER cut lay, within the window) instead of placing the
 * cut afresh each time (see {@link MonitorJudge#settled(double[], int, double, int)}).
 *
 * <p>Parameters ({@code monitor-settled.}): {@code window} samples judged (1000), {@code every} samples
 * between judgements of a full window (an eighth of the window: 125; each judgement costs O(window)), {@code
 * relative_tolerance} (0.001, common practice, no published source), {@code absolute_tolerance} in the
 * monitor's units for monitors near zero (1e-6), {@code min_samples} (100), {@code batches} for the batch
 * means (20, kept within 10..30), {@code confidence} of the interval (0.95), {@code open_checks} (2), {@code
 * clear_checks} (3), {@code resolve_factor} (2). In unsteady runs a sample is a step's last inner iteration.
 */
final class MonitorSettledDetector extends MonitorConditionDetector<MonitorJudge.Settling> {

    MonitorSettledDetector(DetectSettings settings) {
        super(Patterns.MONITOR_SETTLED, "settled", settings, 1000, 50);
    }

    @Override
    MonitorJudge.Settling judge(MonitorJudge judge, double[] x, int n, double scale, int heldFrom) {
        return judge.settled(x, n, scale, heldFrom);
    }

    @Override
    int heldStart(MonitorJudge.Settling s) {
        return s.truncation();
    }

    @Override
    String openSummary(String name, MonitorJudge.Settling s, Map<String, Object> evidence) {
        return String.format(Locale.ROOT, "%s settled at %.6g (within %.3g, interval +/- %.3g)", name,
                s.predicted(), s.tolerance(), s.halfWidth());
    }

    @Override
    Map<String, Object> evidence(MonitorJudge.Settling s, double iterationsPerSample, double timePerSample) {
        Map<String, Object> e = new LinkedHashMap<>();
        e.put("mean", EvidenceNames.round(s.mean()));
        e.put("half_width", EvidenceNames.round(s.halfWidth()));
        e.put("tolerance", EvidenceNames.round(s.tolerance()));
        e.put("drift", EvidenceNames.round(s.drift()));
        e.put("batch_correlation", EvidenceNames.round(s.batchCorrelation()));
        e.put("truncated_samples", s.truncation());
        e.put("samples", s.samples());
        e.put("predicted_final", EvidenceNames.round(s.predicted()));
        e.put("remaining_error", EvidenceNames.round(s.remainingError()));
        e.put("sampling", series().unsteady() ? "step-end" : "iteration");
        e.put("reason", s.reason());
        return EvidenceNames.finite(e);
    }

    /**
     * Per monitor: {@code state} (settled, or the reason it is not), open, mean, half_width, tolerance,
     * predicted_final, remaining_error.
     */
    @Override
    Map<String, Object> snapshotOf(MonitorJudge.Settling s, boolean open, Map<String, Object> evidence) {
        Map<String, Object> v = new LinkedHashMap<>();
        v.put("state", s.settled() ? "settled" : s.reason());
        v.put("open", open);
        v.put("mean", s.mean());
        v.put("half_width", s.halfWidth());
        v.put("tolerance", s.tolerance());
        v.put("predicted_final", s.predicted());
        v.put("remaining_error", s.remainingError());
        return v;
    }
}
