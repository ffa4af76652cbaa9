package dev.watcher.detect;

import static dev.watcher.detect.DetectorTestSupport.deadline;
import static dev.watcher.detect.DetectorTestSupport.firstNonFinite;
import static dev.watcher.detect.DetectorTestSupport.of;
import static dev.watcher.detect.DetectorTestSupport.onset;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.model.Detection;
import dev.watcher.model.DetectionState;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.Patterns;
import dev.watcher.model.Severity;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;
import org.junit.jupiter.api.Test;

class SingleEquationBlowupDetectorTest {

    private static final String P = Patterns.SINGLE_EQUATION_BLOWUP;

    @ParameterizedTest(name = "bad cell at {0} of its neighbours' sum")
    @ValueSource(doubles = {0.40, 0.44})
    void namesTheEquationWithTheBadCellBeforeItGrowsThreeDecadesAndBeforeAnyNaN(double factor) {
        List<IterationRecord> rs = ResidualSolvers.badCell(factor, 1e-7, 1500, 0);
        List<Detection> opened = of(Replay.standard(rs), P, DetectionState.OPEN);
        assertEquals(1, opened.size(), opened.toString());
        Detection d = opened.get(0);
        assertEquals(List.of("temp"), d.equations());
        assertEquals(Severity.CRITICAL, d.severity());
        long onset = rs.get(onset(rs, "temp", 0.3)).iter();
        long deadline = deadline(rs, "temp", 3.0);
        assertTrue(d.iter() > onset && d.iter() < deadline, "fired at " + d.iter() + ", onset " + onset
                + ", 3 decades up at " + deadline);
        assertTrue(d.iter() < firstNonFinite(rs));
        // and while the momentum equations are still falling: before they have risen half a decade
        assertTrue(d.iter() < deadline(rs, "mom-x", 0.5), "fired after momentum started rising");
        assertTrue(d.summary().startsWith("temp residual rising"), d.summary());
        assertTrue(d.remedy().contains("mesh trouble spot"), d.remedy());
        Map<String, Object> ev = d.evidence();
        assertTrue((double) ev.get("slope_decades_per_iter") > 0.005);
        assertTrue((double) ev.get("rise_decades") >= 0.5 && (double) ev.get("rise_decades") < 3);
    }

    @Test
    void resolvesWhenTheRepairedRunFallsAgainAfterItsRestart() {
        List<IterationRecord> rs = ResidualSolvers.badCell(0.40, 1e-7, 700, 200);
        List<Detection> ds = Replay.run(new SingleEquationBlowupDetector(DetectSettings.defaults()), rs);
        assertEquals(1, of(ds, P, DetectionState.OPEN).size(), ds.toString());
        List<Detection> resolved = of(ds, P, DetectionState.RESOLVED);
        assertEquals(1, resolved.size(), ds.toString());
        assertEquals(List.of("temp"), resolved.get(0).equations());
        assertTrue(resolved.get(0).iter() > 200);
        assertEquals(of(ds, P, DetectionState.OPEN).get(0).conditionKey(), resolved.get(0).conditionKey());
    }

    @Test
    void leavesTwoMomentumComponentsRisingTogetherToTheFamilyDetector() {
        List<IterationRecord> rs = ResidualSolvers.developingVortex(true, 4.5, 1500);
        List<Detection> ds = Replay.run(new SingleEquationBlowupDetector(DetectSettings.defaults()), rs);
        assertEquals(List.of(), ds);
    }

    @Test
    void aLargerMinimumRiseDelaysTheAlarm() {
        List<IterationRecord> rs = ResidualSolvers.badCell(0.44, 1e-7, 1500, 0);
        long dflt = of(Replay.run(new SingleEquationBlowupDetector(DetectSettings.defaults()), rs), P,
                DetectionState.OPEN).get(0).iter();
        DetectSettings later = DetectSettings.defaults().with(Map.of(P + ".min_rise", "1.5"));
        Detection d = of(Replay.run(new SingleEquationBlowupDetector(later), rs), P, DetectionState.OPEN).get(0);
        assertTrue(d.iter() > dflt);
        assertTrue((double) d.evidence().get("rise_decades") >= 1.5);
        assertEquals("1.5", later.used().get(P + ".min_rise"));
    }
}
