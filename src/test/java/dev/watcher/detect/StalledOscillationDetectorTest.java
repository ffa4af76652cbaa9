package dev.watcher.detect;

import static dev.watcher.detect.DetectorTestSupport.alarms;
import static dev.watcher.detect.DetectorTestSupport.of;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.model.Detection;
import dev.watcher.model.DetectionState;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.Patterns;
import dev.watcher.model.Severity;
import java.util.List;
import org.junit.jupiter.api.Test;

class StalledOscillationDetectorTest {

    private static final String P = Patterns.STALLED_OSCILLATION;

    @Test
    void overRelaxedPicardIterationIsReportedAsAnOscillatingStallOfBothMomentumEquations() {
        List<IterationRecord> rs = ResidualSolvers.burgersCavity(0.8, 1500, 0, 0);
        List<Detection> ds = Replay.standard(rs);
        List<Detection> opened = of(ds, P, DetectionState.OPEN);
        assertEquals(1, opened.size(), ds.toString());
        Detection d = opened.get(0);
        assertEquals(List.of("mom-x", "mom-y"), d.equations());
        assertEquals(Severity.WARNING, d.severity());
        assertEquals("oscillation", d.evidence().get("kind"));
        // the limit cycle is reached within the first 100 sweeps; a 400-record window and two confirming
        // evaluations 200 records apart make 800 the latest acceptable alarm
        assertTrue(d.iter() >= 400 && d.iter() <= 800, "fired at " + d.iter());
        assertTrue(d.remedy().contains("relaxation factor"), d.remedy());
        assertTrue((double) d.evidence().get("decades_above_target") > 4);
        assertEquals(List.of(d.iter() + " " + P + " open [mom-x, mom-y] " + d.summary()), alarms(ds));
    }

    @Test
    void theSameProblemWithLowerRelaxationConvergesWithoutAlarm() {
        assertEquals(List.of(), alarms(Replay.standard(ResidualSolvers.burgersCavity(0.5, 1500, 0, 0))));
    }

    @Test
    void resolvesOnceTheLoweredRelaxationLetsTheResidualsFall() {
        List<IterationRecord> rs = ResidualSolvers.burgersCavity(0.8, 1400, 800, 0.5);
        List<Detection> ds = Replay.run(new StalledOscillationDetector(DetectSettings.defaults()), rs);
        List<Detection> resolved = of(ds, P, DetectionState.RESOLVED);
        assertEquals(1, of(ds, P, DetectionState.OPEN).size(), ds.toString());
        assertEquals(1, resolved.size(), ds.toString());
        assertTrue(resolved.get(0).iter() > 800 && resolved.get(0).iter() < 1000, ds.toString());
        assertEquals(List.of("mom-x", "mom-y"), resolved.get(0).equations());
    }

    @Test
    void anIncompatibleNeumannProblemIsAFlatPlateauOfContinuityOnly() {
        List<Detection> ds = Replay.standard(ResidualSolvers.incompatibleNeumann(1500));
        List<Detection> opened = of(ds, P, DetectionState.OPEN);
        assertEquals(1, opened.size(), ds.toString());
        assertEquals(List.of("cont"), opened.get(0).equations());
        assertEquals("plateau", opened.get(0).evidence().get("kind"));
        assertTrue((double) opened.get(0).evidence().get("amplitude_decades") < 0.05);
    }
}
