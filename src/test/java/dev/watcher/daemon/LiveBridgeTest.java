package dev.watcher.daemon;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.demo.Histories;
import dev.watcher.detect.DetectSettings;
import dev.watcher.detect.Detector;
import dev.watcher.detect.Detectors;
import dev.watcher.live.RunForecast;
import dev.watcher.model.IterationRecord;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

/**
 * What the daemon hands the live view besides records: the residual target of a run's level line, checked
 * against the target the {@code converged} judge itself reports for the same settings over records of the
 * project's cavity solver ({@link Histories}), and the forecasts of a run not saved yet.
 */
class LiveBridgeTest {

    private static final List<IterationRecord> FIRST = Histories.run("converging", 30);

    /** The target the judge used for each equation, from its snapshot after the first records. */
    @SuppressWarnings("unchecked")
    private static List<Double> judgeTargets(DetectSettings s) {
        Detector conv = Detectors.standard(s).stream()
                .filter(d -> d.getClass().getSimpleName().equals("ConvergedDetector")).findFirst().orElseThrow();
        FIRST.forEach(r -> conv.observe(r, d -> { }));
        Map<String, Object> eqs = (Map<String, Object>) conv.snapshot().get("equations");
        assertTrue(!eqs.isEmpty());
        return eqs.values().stream().map(v -> ((Number) ((Map<String, Object>) v).get("target")).doubleValue())
                .toList();
    }

    @Test
    void theLevelLineIsAtTheTargetTheJudgeUses() {
        DetectSettings defaults = DetectSettings.defaults();
        double t = LiveBridge.residualTarget(DetectSettings.defaults());
        for (double judged : judgeTargets(defaults)) {
            assertEquals(judged, t, "the default target");
        }
        Map<String, String> set = Map.of("converged.residual_target", "2.5e-6");
        double tuned = LiveBridge.residualTarget(DetectSettings.of(set, Map.of()));
        assertEquals(2.5e-6, tuned, "as the user set it");
        for (double judged : judgeTargets(DetectSettings.of(set, Map.of()))) {
            assertEquals(judged, tuned);
        }
    }

    @Test
    void relativeTargetsDrawNoTargetLine() {
        DetectSettings s = DetectSettings.of(Map.of("converged.drop_orders", "4"), Map.of());
        assertTrue(Double.isNaN(LiveBridge.residualTarget(s)));
        // the judge's targets are then each equation's maximum so far over 10^4 (the drop-orders rule of its
        // Javadoc), a value of the run rather than of the settings
        List<Double> judged = judgeTargets(DetectSettings.of(Map.of("converged.drop_orders", "4"), Map.of()));
        IterationRecord first = FIRST.get(0);
        for (int i = 0; i < first.residuals().size(); i++) {
            double max = 0;
            for (IterationRecord r : FIRST) {
                max = Math.max(max, r.residuals().value(i));
            }
            assertEquals(max * 1e-4, judged.get(i), max * 1e-12, first.residuals().name(i));
        }
    }

    @Test
    void beforeTheFirstSaveThereIsNothingToShow() {
        RunForecast f = LiveBridge.forecastOf(Map.of(), Map.of());
        assertTrue(f.isEmpty(), f.toString());
        assertTrue(Double.isNaN(f.iterationsPerSecond()));
    }
}
