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
import java.util.Map;
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

    /**
     * A noisy stall from real numerics (randomized Kaczmarz on inconsistent data, {@link SmallSolvers}): the
     * residual falls, then bounces randomly around a plateau. With the target put at the plateau's own median
     * (read off the history), the level crosses the target again and again: where a rule without hysteresis
     * opens and resolves over and over. One condition must open and stay open.
     */
    @Test
    void noiseAroundAPlateauAtTheTargetOpensOnceAndDoesNotFlap() {
        List<IterationRecord> rs = SmallSolvers.randomizedKaczmarz(50, 10, 1e-4, 20000, 0, 7);
        double[] plateau = rs.subList(10000, 20000).stream().mapToDouble(r -> Math.log10(r.residuals().value(0)))
                .sorted().toArray();
        double median = plateau[plateau.length / 2];
        // the hard case is real: means over 100 iterations fall on either side of the median many times
        int crossings = 0;
        int side = 0;
        for (int from = 10000; from < 20000; from += 100) {
            double mean = rs.subList(from, from + 100).stream()
                    .mapToDouble(r -> Math.log10(r.residuals().value(0))).average().orElseThrow();
            int now = mean > median ? 1 : -1;
            crossings += side != 0 && now != side ? 1 : 0;
            side = now;
        }
        assertTrue(crossings >= 20, "crossings " + crossings);
        DetectSettings s = DetectSettings.defaults().with(Map.of(P + ".target", Double.toString(Math.pow(10, median))));
        List<Detection> ds = Replay.run(new StalledOscillationDetector(s), rs);
        assertEquals(1, of(ds, P, DetectionState.OPEN).size(), ds.toString());
        assertEquals(0, of(ds, P, DetectionState.RESOLVED).size(), ds.toString());
    }

    /**
     * The same numerics with the default target, about half a decade below the noisy plateau: one stall
     * while the data are inconsistent, resolved once after they are made consistent at iteration 8000 and
     * the residual falls again (randomized Kaczmarz then converges linearly), within one window.
     */
    @Test
    void aNoisyStallOpensOnceAndResolvesOnceWhenTheResidualFallsAgain() {
        List<IterationRecord> rs = SmallSolvers.randomizedKaczmarz(50, 10, 1e-4, 12000, 8000, 7);
        List<Detection> ds = Replay.run(new StalledOscillationDetector(DetectSettings.defaults()), rs);
        List<Detection> opened = of(ds, P, DetectionState.OPEN);
        List<Detection> resolved = of(ds, P, DetectionState.RESOLVED);
        assertEquals(1, opened.size(), ds.toString());
        assertEquals(1, resolved.size(), ds.toString());
        assertTrue(opened.get(0).iter() < 8000, ds.toString());
        assertTrue(resolved.get(0).iter() > 8000 && resolved.get(0).iter() <= 8400, ds.toString());
    }
}
