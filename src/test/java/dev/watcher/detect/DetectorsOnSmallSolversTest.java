package dev.watcher.detect;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.model.Detection;
import dev.watcher.model.DetectionState;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.Patterns;
import java.util.List;
import java.util.Map;
import java.util.Set;
import org.junit.jupiter.api.Test;

/**
 * The unsteady, monitor and convergence detectors on histories of real iterative numerics ({@link SmallSolvers}):
 * each pattern fires between its onset and its deadline, and healthy runs raise nothing but settling and
 * level events.
 */
class DetectorsOnSmallSolversTest {

    private static final Set<String> HEALTHY = Set.of(Patterns.MONITOR_SETTLED, Patterns.MONITOR_PERIODIC,
            Patterns.CONVERGED, Patterns.RESIDUAL_LEVEL);

    private static Detector[] mine(DetectSettings s) {
        return new Detector[] {new RisingPeaksDetector(s), new InnerStallDetector(s), new MonitorSettledDetector(s),
            new MonitorPeriodicDetector(s), new ConvergedDetector(s)};
    }

    @Test
    void tooLargeATimeStepRaisesRisingPeaksBeforeThePeaksHaveGrownTwoDecades() {
        // dt k = 2.2 > 2: the explicitly treated reaction is unstable (|1 - dt k| ~ 1.2 per step)
        List<IterationRecord> h = SmallSolvers.reactionDiffusion(2.2, 200, 4, 1e-4);
        Harness r = Harness.run(h, mine(DetectSettings.defaults()));
        Detection open = r.firstOpen(Patterns.RISING_PEAKS).orElseThrow();
        assertEquals(List.of("concentration"), open.equations());
        assertTrue(open.remedy().contains("reduce the time step"), open.remedy());
        long deadline = h.stream().filter(x -> x.inner() == 1 && x.residuals().value(0) > 100).findFirst()
                .orElseThrow().iter();
        assertTrue(open.iter() >= 10 * 4 && open.iter() < deadline, open.iter() + " vs deadline " + deadline);
        assertTrue(((Number) open.evidence().get("slope_decades_per_step")).doubleValue() > 0.02);
        // the inner sweeps still reduce the residual within each step: no inner stall
        assertTrue(r.of(Patterns.INNER_STALL).isEmpty(), r.of(Patterns.INNER_STALL).toString());
    }

    @Test
    void aStableTimeStepRaisesOnlySettlingEvents() {
        List<IterationRecord> h = SmallSolvers.reactionDiffusion(0.5, 200, 4, 1e-4);
        Harness r = Harness.run(h, mine(DetectSettings.defaults()));
        for (Detection d : r.detections) {
            assertTrue(HEALTHY.contains(d.pattern()), d.toString());
        }
        assertTrue(r.firstOpen(Patterns.MONITOR_SETTLED).isPresent());
    }

    @Test
    void sweepsThatCannotReduceADiffusionDominatedSystemRaiseInnerStall() {
        // nu = 0.05: Gauss-Seidel on the diffusion-dominated step system gains only ~1 - O(h^2) per sweep
        List<IterationRecord> h = SmallSolvers.reactionDiffusion(1.5, 60, 3, 5e-2);
        Harness r = Harness.run(h, mine(DetectSettings.defaults()));
        Detection open = r.firstOpen(Patterns.INNER_STALL).orElseThrow();
        assertEquals(List.of("concentration"), open.equations());
        assertTrue(((Number) open.evidence().get("median_drop_decades")).doubleValue() < 0.5);
        assertTrue(open.iter() <= 10 * 3, "opened at " + open.iter());
        assertTrue(r.of(Patterns.RISING_PEAKS).isEmpty());
    }

    @Test
    void aLimitCycleIsReportedPeriodicWithItsPeriodAmplitudeAndCycleMean() {
        // Van der Pol, mu = 1: limit-cycle period about 6.663 and amplitude about 2.009 [memory, e.g. Strogatz,
        // Nonlinear Dynamics and Chaos]; the cycle mean is 0 by the x -> -x symmetry of the equation.
        List<IterationRecord> h = SmallSolvers.vanDerPol(0.1, 1500, 5, 2.0);
        Harness r = Harness.run(h, mine(DetectSettings.defaults()));
        Detection p = r.firstOpen(Patterns.MONITOR_PERIODIC).orElseThrow();
        assertEquals("position", p.monitor());
        Map<String, Object> e = p.evidence();
        assertEquals(6.663, ((Number) e.get("period_time")).doubleValue(), 6.663 * 0.02);
        assertEquals(2.009, ((Number) e.get("amplitude")).doubleValue(), 0.03);
        assertEquals(0.0, ((Number) e.get("cycle_mean")).doubleValue(), 0.01);
        assertTrue(e.containsKey("period_iterations"));
        assertTrue(r.of(Patterns.MONITOR_SETTLED).isEmpty(), "an oscillation is not settled");
    }

    @Test
    void periodicPeaksAreComparedPeriodByPeriodAndNotCalledRising() {
        List<IterationRecord> h = SmallSolvers.vanDerPol(0.1, 1500, 5, 2.0);
        Harness r = Harness.run(h, mine(DetectSettings.defaults()));
        // once two whole periods of the peaks are on record (about 140 steps), the comparison is by period:
        // nothing may open afterwards, and whatever opened during the first periods has resolved
        long afterTwoPeriods = 200 * 5;
        for (Detection d : r.of(Patterns.RISING_PEAKS)) {
            assertFalse(d.state() == DetectionState.OPEN && d.iter() > afterTwoPeriods, d.toString());
        }
        long opens = r.of(Patterns.RISING_PEAKS).stream().filter(d -> d.state() == DetectionState.OPEN).count();
        long resolves = r.of(Patterns.RISING_PEAKS).stream().filter(d -> d.state() == DetectionState.RESOLVED)
                .count();
        assertEquals(opens, resolves);
        assertTrue(r.of(Patterns.INNER_STALL).isEmpty());
    }

    @Test
    void residualsAtTargetWhileAMonitorStillDriftsIsNotConverged() {
        List<IterationRecord> h = SmallSolvers.poissonGaussSeidel(48, 4000, 0.5, 1);
        // the naive rule: stop at the first iteration where every residual is at or below 1e-5
        int naive = -1;
        for (int i = 0; i < h.size() && naive < 0; i++) {
            double[] v = h.get(i).residuals().values();
            if (v[0] <= 1e-5 && v[1] <= 1e-5) {
                naive = i;
            }
        }
        assertTrue(naive > 0);
        double finalCentre = h.get(h.size() - 1).monitors().value(0);
        double atNaive = h.get(naive).monitors().value(0);
        // a fact of this run: when the naive rule says stop, the centre value is still more than 0.1 % off
        assertTrue(Math.abs(atNaive / finalCentre - 1) > 1e-3, "drift at naive stop " + (atNaive / finalCentre - 1));

        ConvergedDetector c = new ConvergedDetector(DetectSettings.defaults());
        Harness r = Harness.run(h, c);
        Detection conv = r.firstOpen(Patterns.CONVERGED).orElseThrow();
        assertTrue(conv.iter() > h.get(naive).iter(), conv.iter() + " vs naive " + h.get(naive).iter());
        double atVerdict = h.get((int) conv.iter() - 1).monitors().value(0);
        assertTrue(Math.abs(atVerdict / finalCentre - 1) < 2e-3, "drift at verdict " + (atVerdict / finalCentre - 1));
        assertTrue(conv.summary().contains("meets the configured criteria"), conv.summary());
        assertFalse(conv.summary().contains("safe"));
        assertEquals("residuals-and-monitors", conv.evidence().get("basis"));
        assertEquals("settled", conv.evidence().get("centre_value_state"));
        assertEquals("settled", conv.evidence().get("species_mean_state"));
    }

    @Test
    void anOpenVerdictResolvesWhenAMonitorDriftsAwayWhileTheResidualsStayAtTarget() {
        // converged on the Poisson run, then the heat source is ramped (1e-5 per sweep): the residuals keep
        // their targets, the centre value drifts, and the verdict must not stay open. Once open, the monitors
        // are judged every open_every samples (125) instead of every 25: the resolution may come later by at
        // most clear_checks (3) of the longer intervals, no more
        List<IterationRecord> plain = SmallSolvers.poissonGaussSeidel(48, 6000, 0.5, 1);
        long opened = Harness.run(plain, new ConvergedDetector(DetectSettings.defaults()))
                .firstOpen(Patterns.CONVERGED).orElseThrow().iter();
        int rampFrom = (int) opened + 500;
        List<IterationRecord> h = SmallSolvers.poissonGaussSeidel(48, 6000, 0.5, 1, rampFrom, 1e-5);
        long[] resolvedAt = new long[2];
        int k = 0;
        for (int openEvery : new int[] {25, 125}) {
            DetectSettings s = DetectSettings.of(Map.of("converged.open_every", Integer.toString(openEvery)), Map.of());
            Harness r = Harness.run(h, new ConvergedDetector(s));
            assertEquals(opened, r.firstOpen(Patterns.CONVERGED).orElseThrow().iter(), "the opening is unchanged");
            Detection resolved = r.of(Patterns.CONVERGED).stream().filter(d -> d.state() == DetectionState.RESOLVED)
                    .findFirst().orElseThrow(() -> new AssertionError("still open with open_every " + openEvery));
            assertTrue(resolved.iter() > rampFrom, resolved.iter() + " vs ramp from " + rampFrom);
            double[] res = h.get((int) resolved.iter() - 1).residuals().values();
            assertTrue(res[0] <= 1e-5 && res[1] <= 1e-5, "the residuals still hold their targets: " + res[0] + ", " + res[1]);
            resolvedAt[k++] = resolved.iter();
        }
        assertTrue(resolvedAt[1] - resolvedAt[0] <= 3 * 125, "every 25: " + resolvedAt[0] + ", every 125: " + resolvedAt[1]);
    }

    @Test
    void aLogWithoutMonitorsReachesOnlyAResidualsOnlyVerdict() {
        List<IterationRecord> h = SmallSolvers.withoutMonitors(SmallSolvers.poissonGaussSeidel(48, 2500, 0.5, 1));
        Harness r = Harness.run(h, new ConvergedDetector(DetectSettings.defaults()));
        Detection conv = r.firstOpen(Patterns.CONVERGED).orElseThrow();
        assertEquals("residuals-only", conv.evidence().get("basis"));
        assertEquals("missing", conv.evidence().get("monitors"));
        assertTrue(conv.summary().contains("monitors are missing"), conv.summary());
    }

    @Test
    void forecastOfIterationsToTargetBracketsTheIterationActuallyNeeded() {
        List<IterationRecord> h = SmallSolvers.poissonGaussSeidel(48, 3000, 0.5, 1);
        ConvergedDetector c = new ConvergedDetector(DetectSettings.defaults());
        int at = 600;
        for (int i = 0; i < at; i++) {
            c.observe(h.get(i), d -> { });
        }
        ConvergedDetector.Forecast f = c.forecastOf("heat");
        assertEquals("converging", f.status());
        long reached = h.stream().filter(x -> x.residuals().value(0) <= 1e-5).findFirst().orElseThrow().iter();
        double actual = reached - h.get(at - 1).iter();
        // Sen's interval is narrow on this smooth history; allow 5 % around it
        assertTrue(actual >= 0.95 * f.low() && actual <= 1.05 * f.high(),
                "needed " + actual + ", forecast " + f.iterations() + " [" + f.low() + ", " + f.high() + "]");
        @SuppressWarnings("unchecked")
        Map<String, Object> eq = (Map<String, Object>) ((Map<String, Object>) c.snapshot().get("equations"))
                .get("heat");
        assertEquals("converging", eq.get("forecast"));
    }

    @Test
    void anUnstableRunIsForecastNotConverging() {
        List<IterationRecord> h = SmallSolvers.reactionDiffusion(2.2, 120, 4, 1e-4);
        ConvergedDetector c = new ConvergedDetector(DetectSettings.defaults().with(Map.of(
                "converged.forecast_every", "5")));
        h.forEach(x -> c.observe(x, d -> { }));
        assertEquals("not converging", c.forecastOf("concentration").status());
    }

    @Test
    void theSameHistoryGivesTheSameDetections() {
        List<IterationRecord> h = SmallSolvers.reactionDiffusion(2.2, 150, 4, 1e-4);
        List<Detection> a = Harness.run(h, mine(DetectSettings.defaults())).detections;
        List<Detection> b = Harness.run(h, mine(DetectSettings.defaults())).detections;
        assertEquals(a, b);
    }

    @Test
    void aNewSegmentResetsThePeakBaseline() {
        List<IterationRecord> h = SmallSolvers.reactionDiffusion(2.2, 200, 4, 1e-4);
        RisingPeaksDetector d = new RisingPeaksDetector(DetectSettings.defaults());
        Harness r = new Harness();
        // after each segment start the detector needs min_steps fresh steps before it may judge again
        for (IterationRecord x : h) {
            int seg = (int) ((x.step() - 1) / 8);
            d.observe(x.withSegment(seg), r.detections::add);
        }
        assertTrue(r.firstOpen(Patterns.RISING_PEAKS).isEmpty(), r.detections.toString());
    }

    @Test
    void evidenceAndSnapshotsCarryOnlyFiniteNumbers() {
        // JSON has no NaN: an unknown value is left out instead
        Detector[] ds = mine(DetectSettings.defaults());
        Harness r = Harness.run(SmallSolvers.reactionDiffusion(2.2, 150, 4, 1e-4), ds);
        Harness.run(SmallSolvers.poissonGaussSeidel(48, 300, 0.5, 1), ds);
        for (Detection d : r.detections) {
            assertFinite(d.evidence());
        }
        for (Detector d : ds) {
            assertFinite(d.snapshot());
        }
    }

    private static void assertFinite(Map<?, ?> m) {
        for (Object v : m.values()) {
            if (v instanceof Double d) {
                assertTrue(Double.isFinite(d), m.toString());
            } else if (v instanceof Map<?, ?> inner) {
                assertFinite(inner);
            }
        }
    }
}
