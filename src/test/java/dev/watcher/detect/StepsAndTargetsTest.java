package dev.watcher.detect;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.model.Detection;
import dev.watcher.model.DetectionState;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.Patterns;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

/** Step splitting without step fields, targets as orders of drop, monitors near zero, and hysteresis. */
class StepsAndTargetsTest {

    @Test
    void risingPeaksAreFoundFromTheInnerCounterWhenTheLogHasNoStepField() {
        List<IterationRecord> h = SmallSolvers.withoutStepFields(SmallSolvers.reactionDiffusion(2.2, 200, 4, 1e-4), true);
        Harness r = Harness.run(h, new RisingPeaksDetector(DetectSettings.defaults()));
        Detection open = r.firstOpen(Patterns.RISING_PEAKS).orElseThrow();
        assertEquals("inner", open.evidence().get("step_basis"));
    }

    @Test
    void risingPeaksAreFoundFromTheJumpPatternWhenTheLogHasNeitherStepNorInner() {
        List<IterationRecord> h = SmallSolvers.withoutStepFields(SmallSolvers.reactionDiffusion(2.2, 200, 4, 1e-4),
                false);
        Harness r = Harness.run(h, new RisingPeaksDetector(DetectSettings.defaults()));
        Detection open = r.firstOpen(Patterns.RISING_PEAKS).orElseThrow();
        assertEquals("jump", open.evidence().get("step_basis"));
        assertEquals(List.of("concentration"), open.equations());
    }

    @Test
    void aSteadyRunIsNeverSplitIntoSteps() {
        List<IterationRecord> h = SmallSolvers.poissonGaussSeidel(48, 2000, 0.5, 1);
        TimeSteps steps = new TimeSteps(1.0);
        h.forEach(steps::accept);
        assertTrue(!steps.unsteady(), steps.basis());
    }

    @Test
    void aTargetInOrdersOfDropServesASolverThatPrintsRawResiduals() {
        // the normalised residuals start at 1, so a drop of five orders is the absolute target 1e-5; printed raw
        // (times 350) the absolute target would be reached much later, the drop target at the same iteration
        List<IterationRecord> normalised = SmallSolvers.poissonGaussSeidel(48, 3000, 0.5, 1);
        List<IterationRecord> raw = SmallSolvers.scaledResiduals(normalised, 350);
        DetectSettings drop = DetectSettings.defaults().with(Map.of("converged.drop_orders", "5"));
        long absolute = Harness.run(normalised, new ConvergedDetector(DetectSettings.defaults()))
                .firstOpen(Patterns.CONVERGED).orElseThrow().iter();
        ConvergedDetector d = new ConvergedDetector(drop);
        Detection byDrop = Harness.run(raw, d).firstOpen(Patterns.CONVERGED).orElseThrow();
        assertEquals(absolute, byDrop.iter());
        assertEquals(350 * 1e-5, ((Number) byDrop.evidence().get("heat_target")).doubleValue(), 350 * 1e-5 * 1e-3);
        assertTrue(Harness.run(raw, new ConvergedDetector(DetectSettings.defaults())).firstOpen(Patterns.CONVERGED)
                .map(x -> x.iter() > absolute).orElse(true));
    }

    @Test
    void aPerEquationTargetOverridesTheDefault() {
        List<IterationRecord> h = SmallSolvers.poissonGaussSeidel(48, 3000, 0.5, 1);
        ConvergedDetector d = new ConvergedDetector(DetectSettings.defaults().with(Map.of(
                "converged.residual_target.species", "1e-3")));
        assertEquals(1e-3, d.targetOf("species"));
        assertEquals(1e-5, d.targetOf("heat"));
        // read at construction, so that a check of the overrides before the run knows the key
        DetectSettings fresh = DetectSettings.defaults().with(Map.of("converged.residual_target.species", "1e-3"));
        new ConvergedDetector(fresh);
        assertEquals("0.001", fresh.used().get("converged.residual_target.species"));
    }

    @Test
    void aMonitorThatSettlesAtZeroIsJudgedWithTheAbsoluteTolerance() {
        List<IterationRecord> h = SmallSolvers.poissonGaussSeidel(48, 4000, 0.5, 1);
        Harness r = Harness.run(h, new MonitorSettledDetector(DetectSettings.defaults()));
        Detection open = r.detections.stream().filter(x -> "asymmetry".equals(x.monitor())).findFirst().orElseThrow();
        assertEquals(DetectionState.OPEN, open.state());
        assertEquals(1e-6, ((Number) open.evidence().get("tolerance")).doubleValue(), 1e-12);
        assertTrue(Math.abs(((Number) open.evidence().get("mean")).doubleValue()) < 1e-6);
    }

    @Test
    void settledMonitorsOpenOnceAndDoNotFlap() {
        List<IterationRecord> h = SmallSolvers.poissonGaussSeidel(48, 4000, 0.5, 1);
        Harness r = Harness.run(h, new MonitorSettledDetector(DetectSettings.defaults()));
        for (String m : List.of("centre-value", "species-mean", "asymmetry")) {
            List<Detection> ds = r.detections.stream().filter(x -> m.equals(x.monitor())).toList();
            assertEquals(1, ds.size(), m + ": " + ds);
            assertEquals(DetectionState.OPEN, ds.get(0).state());
        }
        // the settled value is the run's final value within the tolerance
        Detection c = r.detections.stream().filter(x -> "centre-value".equals(x.monitor())).findFirst().orElseThrow();
        double last = h.get(h.size() - 1).monitors().value(0);
        assertEquals(last, ((Number) c.evidence().get("predicted_final")).doubleValue(), 1e-3 * Math.abs(last));
    }
}
