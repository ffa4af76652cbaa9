package dev.watcher.demo;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.model.IterationRecord;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.Test;

/**
 * Each scenario really shows the behaviour its name promises, asserted on the residual history the solver
 * computed. Thresholds (1e-5 target, 0.1 % monitor flatness) are common practice, no published source.
 */
class ScenarioBehaviourTest {

    private static double[] series(List<IterationRecord> h, String eq) {
        return h.stream().mapToDouble(r -> r.residuals().get(eq, Double.NaN)).toArray();
    }

    private static int argMin(double[] s, int from, int to) {
        int best = from;
        for (int i = from; i < to; i++) {
            if (s[i] < s[best]) {
                best = i;
            }
        }
        return best;
    }

    private static double max(double[] s, int from, int to) {
        double m = Double.NEGATIVE_INFINITY;
        for (int i = from; i < to; i++) {
            m = Math.max(m, s[i]);
        }
        return m;
    }

    @Test
    void convergingReachesTheTargetWithFlatMonitors() {
        List<IterationRecord> h = Histories.run("converging");
        IterationRecord last = h.get(h.size() - 1);
        for (int i = 0; i < last.residuals().size(); i++) {
            assertTrue(last.residuals().value(i) < 1e-5, last.residuals().toString());
        }
        IterationRecord earlier = h.get(h.size() - 101);
        for (int i = 0; i < last.monitors().size(); i++) {
            double a = earlier.monitors().value(i);
            double b = last.monitors().value(i);
            assertTrue(Math.abs(b - a) <= 1e-3 * Math.abs(b), "monitor " + last.monitors().name(i) + " drifts");
        }
    }

    @Test
    void hotRelaxationMomentumFamilyTurnsFromFallingToRisingTogether() {
        List<IterationRecord> h = Histories.run("hot-relaxation");
        for (String eq : List.of("mom-x", "mom-y")) {
            double[] s = series(h, eq);
            int low = argMin(s, 5, 200);
            assertTrue(s[low] < s[5] / 3, eq + " first falls");
            assertTrue(max(s, low, s.length) > 50 * s[low], eq + " then rises by more than 1.7 decades");
        }
        // continuity does not fall first here; it rises with the momentum pair
        double[] cont = series(h, "cont");
        assertTrue(max(cont, 100, cont.length) > 50 * cont[50], "cont rises with the family");
        // the rise ends in a stalled, large oscillation rather than convergence
        double[] mx = series(h, "mom-x");
        assertTrue(mx[mx.length - 1] > 0.1, "still far from any target: " + mx[mx.length - 1]);
    }

    private static List<Double> stepPeaks(List<IterationRecord> h, String eq) {
        List<Double> peaks = new ArrayList<>();
        for (IterationRecord r : h) {
            if (r.inner() == 1 && r.step() > 1) {
                peaks.add(r.residuals().get(eq, Double.NaN));
            }
        }
        return peaks;
    }

    @Test
    void bigStepPeakResidualClimbsStepAfterStepWhileTheSmallStepTwinFalls() {
        List<Double> big = stepPeaks(Histories.run("big-step"), "mom-y");
        // after the start-up steps, the peak of each step exceeds the previous one for 20 steps in a row
        for (int k = 10; k < 30; k++) {
            assertTrue(big.get(k + 1) > big.get(k), "big-step peak did not climb at step " + (k + 2));
        }
        assertTrue(big.get(30) > 5 * big.get(8));
        List<Double> small = stepPeaks(Histories.run("small-step"), "mom-y");
        for (int k = 10; k < 60; k++) {
            assertTrue(small.get(k + 1) < small.get(k), "small-step peak rose at step " + (k + 2));
        }
    }

    @Test
    void centralConvectionAtHighCellPecletDivergesWhereUpwindConverges() {
        List<IterationRecord> central = Histories.run("high-peclet-central");
        double[] my = series(central, "mom-y");
        int low = argMin(my, 0, 400);
        assertTrue(my[low] < 0.05, "central first falls: " + my[low]);
        IterationRecord end = central.get(central.size() - 1);
        assertTrue(!Double.isFinite(end.residuals().get("mom-y", 0)), "central run ends in a blow-up");
        assertTrue(max(my, low, my.length - 3) > 100 * my[low], "mom-y climbs two decades before the blow-up");

        List<IterationRecord> upwind = Histories.run("high-peclet-upwind");
        IterationRecord last = upwind.get(upwind.size() - 1);
        for (double r : last.residuals().values()) {
            assertTrue(r < 1e-5, "upwind twin converges: " + last.residuals());
        }
    }

    @Test
    void badCellBlowsUpOnlyTheEnergyEquation() {
        List<IterationRecord> h = Histories.run("bad-cell", 600);
        double[] temp = series(h, "temp");
        int low = argMin(temp, 0, temp.length);
        assertTrue(temp[temp.length - 1] > 1e3 * temp[low], "temp rises three decades above its minimum");
        for (String eq : List.of("cont", "mom-x", "mom-y")) {
            double[] s = series(h, eq);
            assertTrue(s[s.length - 1] < s[low] / 10, eq + " keeps converging while temp blows up");
        }
    }

    @Test
    void slowPlateausRunConvergesWithoutAnyLargeRiseAboveItsRunningMinimum() {
        List<IterationRecord> h = Histories.run("slow-plateaus");
        for (String eq : List.of("cont", "mom-x", "mom-y", "temp")) {
            double[] s = series(h, eq);
            double runningMin = s[4];
            double worstRise = 0;
            int firstAtTarget = -1;
            for (int i = 5; i < s.length; i++) {
                runningMin = Math.min(runningMin, s[i]);
                if (runningMin > 1e-11) { // below that the residuals sit on the round-off floor and jitter
                    worstRise = Math.max(worstRise, Math.log10(s[i] / runningMin));
                }
                if (firstAtTarget < 0 && s[i] < 1e-5) {
                    firstAtTarget = i;
                }
            }
            // the largest bump is cont's jump of 0.50 decades right after the declared relaxation change
            assertTrue(worstRise < 0.6, eq + " bumps stay below 0.6 decades: " + worstRise);
            assertTrue(firstAtTarget > 1000, eq + " converges slowly: at target from record " + firstAtTarget);
            assertTrue(s[s.length - 1] < 1e-5, eq + " reaches the target in the end");
        }
        // a start-up plateau: mom-x stays within 10 % between iterations 50 and 110
        double[] mx = series(h, "mom-x");
        assertTrue(Math.abs(mx[109] / mx[49] - 1) < 0.1, "plateau " + mx[49] + " .. " + mx[109]);
    }

    @Test
    void restartContinuesFromTheSnapshotInANewSegmentWithTheSameState() {
        List<IterationRecord> h = Histories.run("restart", 400);
        IterationRecord cut = h.get(Scenario.RESTART_KILLED_AT - 1);
        IterationRecord resumed = h.get(Scenario.RESTART_KILLED_AT);
        assertEquals(300, cut.iter());
        assertEquals(0, cut.segment());
        assertEquals(Scenario.RESTART_SNAPSHOT + 1, resumed.iter());
        assertEquals(1, resumed.segment());
        // an exact restart: iteration 201 after the restart equals iteration 201 before it
        IterationRecord before = h.get(Scenario.RESTART_SNAPSHOT);
        assertEquals(before.residuals(), resumed.residuals());
        assertEquals(before.monitors(), resumed.monitors());
        assertEquals(400 + Scenario.RESTART_SNAPSHOT - Scenario.RESTART_KILLED_AT, h.get(h.size() - 1).iter());
    }
}
