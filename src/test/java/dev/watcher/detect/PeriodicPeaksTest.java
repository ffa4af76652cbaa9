package dev.watcher.detect;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.model.Detection;
import dev.watcher.model.DetectionState;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.Patterns;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.Test;

/**
 * {@code rising-peaks} on periodic unsteady runs of real numerics: step peaks that oscillate periodically are
 * not rising, also in the first two periods, before any period can be recognised from the peaks. The runs are
 * {@link SmallSolvers#reactionDiffusion(double, int, int, double, double, double, double)} driven by a periodic
 * source (stable time step: after the start-up the peaks repeat every forcing period) and the Van der Pol limit
 * cycle; the same driving with an unstable time step must still raise the alarm between onset and deadline.
 */
class PeriodicPeaksTest {

    /** log10 of each step's first residual of {@code eq}, step by step. */
    private static List<Double> peaks(List<IterationRecord> h, String eq) {
        List<Double> p = new ArrayList<>();
        for (IterationRecord r : h) {
            if (r.inner() == 1) {
                p.add(Math.log10(r.residuals().get(eq, Double.NaN)));
            }
        }
        return p;
    }

    @Test
    void peaksThatOnlyOscillateAreNotCalledRisingFromTheFirstPeriodOn() {
        for (double period : new double[] {20, 40, 80}) {
            for (double dt : new double[] {0.25, 0.5, 1.0}) {
                int perPeriod = (int) Math.round(period / dt);
                List<IterationRecord> h = SmallSolvers.reactionDiffusion(dt, 3 * perPeriod, 4, 1e-4, period, 0.5, 0.1);
                String run = "period " + period + ", dt " + dt;
                // facts of the run: after the start-up the peaks repeat every forcing period, and they swing by at
                // least min_rise_decades within a period, so each climb is as large as a real rise must be
                List<Double> p = peaks(h, "concentration");
                double lo = Double.POSITIVE_INFINITY;
                double hi = Double.NEGATIVE_INFINITY;
                for (int s = p.size() - perPeriod; s < p.size(); s++) {
                    assertEquals(p.get(s - perPeriod), p.get(s), 1e-3, run + ", step " + (s + 1));
                    lo = Math.min(lo, p.get(s));
                    hi = Math.max(hi, p.get(s));
                }
                assertTrue(hi - lo >= 0.3, run + ": swing " + (hi - lo));
                Harness r = Harness.run(h, new RisingPeaksDetector(DetectSettings.defaults()));
                assertEquals(List.of(), r.of(Patterns.RISING_PEAKS), run);
            }
        }
    }

    @Test
    void theSameDrivingWithTooLargeATimeStepRaisesRisingPeaksBeforeThePeaksHaveGrownTwoDecades() {
        // dt k = 2.2 > 2: the explicitly treated reaction is unstable; the peaks climb on top of the oscillation
        List<IterationRecord> h = SmallSolvers.reactionDiffusion(2.2, 200, 4, 1e-4, 20, 0.5, 0.1);
        Detection open = Harness.run(h, new RisingPeaksDetector(DetectSettings.defaults()))
                .firstOpen(Patterns.RISING_PEAKS).orElseThrow();
        assertEquals(List.of("concentration"), open.equations());
        long deadline = h.stream().filter(x -> x.inner() == 1 && x.residuals().value(0) > 100).findFirst()
                .orElseThrow().iter();
        // no earlier than min_steps (10) steps of 4 inner iterations
        assertTrue(open.iter() >= 10 * 4 && open.iter() < deadline, open.iter() + " vs deadline " + deadline);
    }

    @Test
    void onAVanDerPolLimitCycleOnlyTheFirstClimbFromRestMayOpen() {
        // started on (x0 = 2) or outside (x0 = 3) the limit cycle (amplitude about 2.009, e.g. Strogatz,
        // Nonlinear Dynamics and Chaos [memory]): the peaks are periodic from the first cycle on. The first
        // climb from rest goes to levels never seen before and cannot be told from the start of a blow-up; every
        // later climb returns to levels already seen and must not open.
        for (double dt : new double[] {0.05, 0.1}) {
            for (double x0 : new double[] {2.0, 3.0}) {
                List<IterationRecord> h = SmallSolvers.vanDerPol(dt, 1500, 5, x0);
                Harness r = Harness.run(h, new RisingPeaksDetector(DetectSettings.defaults()));
                for (Detection d : r.of(Patterns.RISING_PEAKS)) {
                    if (d.state() != DetectionState.OPEN) {
                        continue;
                    }
                    for (String eq : d.equations()) {
                        long crest = firstCrest(h, eq);
                        assertTrue(d.iter() <= crest, "dt " + dt + ", x0 " + x0 + ": " + d + " after the first crest of "
                                + eq + " at " + crest);
                    }
                }
            }
        }
    }

    /** The iteration of the first step whose peak of {@code eq} is higher than the step before and after it. */
    private static long firstCrest(List<IterationRecord> h, String eq) {
        List<IterationRecord> starts = h.stream().filter(x -> x.inner() == 1).toList();
        List<Double> p = peaks(h, eq);
        for (int s = 1; s + 1 < p.size(); s++) {
            if (p.get(s) > p.get(s - 1) && p.get(s) >= p.get(s + 1)) {
                return starts.get(s).iter();
            }
        }
        return Long.MAX_VALUE;
    }
}
