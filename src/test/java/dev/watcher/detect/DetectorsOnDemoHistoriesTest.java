package dev.watcher.detect;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.demo.Histories;
import dev.watcher.model.Detection;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.Patterns;
import java.util.List;
import java.util.Set;
import org.junit.jupiter.api.Test;

/**
 * The unsteady, monitor and convergence detectors on the demo solver's histories (a lid-driven cavity solved
 * by our own SIMPLE-type iteration, {@link Histories}): the patterns its scenarios name fire in time, and the
 * healthy scenarios raise nothing but settling and level events.
 */
class DetectorsOnDemoHistoriesTest {

    private static final Set<String> HEALTHY = Set.of(Patterns.MONITOR_SETTLED, Patterns.MONITOR_PERIODIC,
            Patterns.CONVERGED, Patterns.RESIDUAL_LEVEL);

    private static Harness run(List<IterationRecord> h) {
        DetectSettings s = DetectSettings.defaults();
        return Harness.run(h, new RisingPeaksDetector(s), new InnerStallDetector(s), new MonitorSettledDetector(s),
                new MonitorPeriodicDetector(s), new ConvergedDetector(s));
    }

    @Test
    void theBigStepScenarioRaisesRisingPeaksAfterTheFirstStepsAndBeforeItsEnd() {
        List<IterationRecord> h = Histories.run("big-step");
        Detection open = run(h).firstOpen(Patterns.RISING_PEAKS).orElseThrow();
        // the scenario's peaks fall for about the first 7 steps (4 inner iterations each), then climb
        assertTrue(open.iter() > 7 * 4 && open.iter() < h.get(h.size() - 1).iter(), "opened at " + open.iter());
        assertTrue(open.equations().contains("cont"), open.equations().toString());
    }

    @Test
    void theSmallStepScenarioRaisesNoUnsteadyAlarm() {
        for (Detection d : run(Histories.run("small-step")).detections) {
            assertTrue(HEALTHY.contains(d.pattern()), d.toString());
        }
    }

    @Test
    void theConvergingScenarioConvergesNoEarlierThanTheNaiveRuleAndWithEvidence() {
        List<IterationRecord> h = Histories.run("converging");
        Harness r = run(h);
        Detection c = r.firstOpen(Patterns.CONVERGED).orElseThrow();
        long naive = h.stream().filter(x -> {
            for (double v : x.residuals().values()) {
                if (!(v <= 1e-5)) {
                    return false;
                }
            }
            return true;
        }).findFirst().orElseThrow().iter();
        assertTrue(c.iter() >= naive, c.iter() + " vs naive " + naive);
        assertEquals("residuals-and-monitors", c.evidence().get("basis"));
        for (String m : List.of("vmid", "lid_shear", "wall_q")) {
            assertEquals("settled", c.evidence().get(m + "_state"), m);
        }
        for (Detection d : r.detections) {
            assertTrue(HEALTHY.contains(d.pattern()), d.toString());
        }
    }

    @Test
    void theLongSlowRunRaisesOnlySettlingEventsAndConvergesNoEarlierThanItsResidualsReachTarget() {
        List<IterationRecord> h = Histories.run("slow-plateaus");
        Harness r = run(h);
        for (Detection d : r.detections) {
            assertTrue(HEALTHY.contains(d.pattern()), d.toString());
        }
        long naive = h.stream().filter(x -> {
            for (double v : x.residuals().values()) {
                if (!(v <= 1e-5)) {
                    return false;
                }
            }
            return true;
        }).findFirst().map(IterationRecord::iter).orElse(Long.MAX_VALUE);
        r.firstOpen(Patterns.CONVERGED).ifPresent(c -> assertTrue(c.iter() >= naive, c.iter() + " vs " + naive));
    }

    @Test
    void aRestartedRunRaisesNoAlarm() {
        for (Detection d : run(Histories.run("restart")).detections) {
            assertTrue(HEALTHY.contains(d.pattern()), d.toString());
        }
    }

    @Test
    void theFirstOrderTwinOfTheDivergingCaseConverges() {
        Harness r = run(Histories.run("high-peclet-upwind"));
        assertTrue(r.firstOpen(Patterns.CONVERGED).isPresent());
        for (Detection d : r.detections) {
            assertTrue(HEALTHY.contains(d.pattern()), d.toString());
        }
    }

    @Test
    void aRunWithTooHighRelaxationNeverConverges() {
        assertTrue(run(Histories.run("hot-relaxation")).firstOpen(Patterns.CONVERGED).isEmpty());
    }
}
