package dev.watcher.detect;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertSame;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.detect.stats.SeasonalKendall;
import dev.watcher.model.Detection;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.Samples;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

/**
 * The step splitter and the shortcuts that keep the unsteady detectors cheap: steps found from the jump
 * pattern are the solver's own steps, a splitter shared by rising-peaks and inner-stall gives each the
 * detections it gives alone, and the screening form of the seasonal Kendall test agrees with the full test.
 */
class TimeStepsTest {

    private static List<TimeSteps.Step> split(List<IterationRecord> h, TimeSteps steps) {
        List<TimeSteps.Step> out = new ArrayList<>();
        for (IterationRecord r : h) {
            TimeSteps.Step s = steps.accept(r);
            if (s != null) {
                out.add(s);
            }
        }
        return out;
    }

    @Test
    void stepsFoundFromTheJumpPatternAreTheSolversOwnSteps() {
        // the solver knows its steps (step and inner fields); without them the splitter finds them from the
        // jump of the residuals at each step's first inner iteration
        List<IterationRecord> h = SmallSolvers.reactionDiffusion(2.2, 120, 4, 1e-4);
        List<TimeSteps.Step> known = split(h, new TimeSteps(1.0));
        TimeSteps jumps = new TimeSteps(1.0);
        List<TimeSteps.Step> found = split(SmallSolvers.withoutStepFields(h, false), jumps);
        assertEquals("jump", jumps.basis());
        assertTrue(jumps.unsteady());
        assertEquals(known.size(), found.size());
        for (int i = 0; i < known.size(); i++) {
            assertEquals(known.get(i).firstIter(), found.get(i).firstIter(), "step " + i);
            assertEquals(known.get(i).lastIter(), found.get(i).lastIter(), "step " + i);
            assertEquals(known.get(i).peak(), found.get(i).peak(), "step " + i);
            assertEquals(known.get(i).floor(), found.get(i).floor(), "step " + i);
        }
    }

    @Test
    void theStepsPeakAndFloorAreItsFirstAndLastInnerIterations() {
        List<IterationRecord> h = SmallSolvers.reactionDiffusion(0.5, 30, 4, 1e-4);
        List<TimeSteps.Step> steps = split(h, new TimeSteps(1.0));
        assertEquals(29, steps.size(), "the last step is reported when a next one starts");
        for (TimeSteps.Step s : steps) {
            IterationRecord first = h.get((int) s.firstIter() - 1);
            IterationRecord last = h.get((int) s.lastIter() - 1);
            assertEquals(1, first.inner());
            assertEquals(4, last.inner());
            assertEquals(4, s.records());
            assertSame(first.residuals(), s.peaks());
            assertSame(last.residuals(), s.floors());
            assertEquals(last.monitors().toMap(), s.monitors());
            assertEquals(last.time(), s.time());
        }
    }

    @Test
    void anEquationThatAppearsWithinAStepKeepsItsFirstValueAsPeakAndItsLastAsFloor() {
        // the definition of peak and floor when a log adds an equation in the middle of a step
        List<String> one = List.of("cont");
        List<String> two = List.of("cont", "energy");
        List<IterationRecord> h = List.of(
                record(1, 1, 1, new Samples(one, new double[] {1.0})),
                record(2, 1, 2, new Samples(two, new double[] {0.5, 0.2})),
                record(3, 1, 3, new Samples(two, new double[] {0.25, 0.1})),
                record(4, 2, 1, new Samples(one, new double[] {0.9})));
        List<TimeSteps.Step> steps = split(h, new TimeSteps(1.0));
        assertEquals(1, steps.size());
        assertEquals(Map.of("cont", 1.0, "energy", 0.2), steps.get(0).peak());
        assertEquals(Map.of("cont", 0.25, "energy", 0.1), steps.get(0).floor());
        assertEquals(List.of("cont", "energy"), steps.get(0).floors().names());
    }

    private static IterationRecord record(long iter, long step, long inner, Samples residuals) {
        return new IterationRecord(iter, step, step * 0.1, inner, residuals, Samples.EMPTY, 0, iter);
    }

    @Test
    void aSharedSplitterHandsEachConsumerTheStepOfTheRecordOnce() {
        List<IterationRecord> h = SmallSolvers.reactionDiffusion(0.5, 10, 4, 1e-4);
        TimeSteps shared = TimeSteps.shared(1.0);
        int steps = 0;
        for (IterationRecord r : h) {
            TimeSteps.Step a = shared.accept(r);
            assertSame(a, shared.accept(r));
            steps += a == null ? 0 : 1;
        }
        assertEquals(9, steps);
        assertEquals(9, shared.count());
        // a new segment forgets the step in progress, once however many consumers announce it
        shared.segment(1);
        shared.segment(1);
        assertNull(shared.accept(h.get(0)));
        assertNull(shared.accept(h.get(1)));
    }

    @Test
    void theStandardSetSharesOneSplitterAndDetectsWhatEachDetectorDetectsAlone() {
        DetectSettings s = DetectSettings.defaults();
        List<List<IterationRecord>> runs = List.of(
                SmallSolvers.reactionDiffusion(2.2, 200, 4, 1e-4),
                SmallSolvers.reactionDiffusion(1.5, 60, 3, 5e-2),
                SmallSolvers.withoutStepFields(SmallSolvers.reactionDiffusion(2.2, 200, 4, 1e-4), false),
                restarted(SmallSolvers.reactionDiffusion(2.2, 200, 4, 1e-4), 100));
        for (List<IterationRecord> h : runs) {
            List<Detector> standard = Detectors.standard(s).stream()
                    .filter(d -> d instanceof RisingPeaksDetector || d instanceof InnerStallDetector).toList();
            assertEquals(2, standard.size());
            List<Detection> together = Harness.run(h, standard.toArray(new Detector[0])).detections;
            List<Detection> alone = new ArrayList<>(Harness.run(h, new RisingPeaksDetector(s)).detections);
            alone.addAll(Harness.run(h, new InnerStallDetector(s)).detections);
            assertEquals(sorted(alone), sorted(together));
            assertTrue(!together.isEmpty(), "each run raises something");
        }
        // with different jump thresholds each keeps its own splitter
        DetectSettings apart = s.with(Map.of("inner-stall.jump_decades", "2"));
        TimeSteps steps = TimeSteps.shared(RisingPeaksDetector.jumpDecades(apart));
        new InnerStallDetector(apart, steps);
        assertEquals(1.0, steps.jumpDecades());
    }

    private static List<IterationRecord> restarted(List<IterationRecord> h, int at) {
        List<IterationRecord> out = new ArrayList<>();
        for (int i = 0; i < h.size(); i++) {
            out.add(i < at ? h.get(i) : h.get(i).withSegment(1));
        }
        return out;
    }

    private static List<String> sorted(List<Detection> ds) {
        return ds.stream().map(Detection::toString).sorted().toList();
    }

    @Test
    void theScreeningTestAgreesWithTheFullSeasonalKendallTest() {
        // the log peaks of real runs, as measured and rounded to 0.05 decades (ties), over whole periods and
        // over short windows (the exact small-sample tail)
        List<double[]> series = new ArrayList<>();
        series.add(logPeaks(SmallSolvers.vanDerPol(0.1, 400, 5, 2.0), 0));
        series.add(logPeaks(SmallSolvers.vanDerPol(0.1, 400, 5, 2.0), 1));
        series.add(logPeaks(SmallSolvers.reactionDiffusion(0.5, 300, 4, 1e-4, 20, 0.5, 0.1), 0));
        series.add(logPeaks(SmallSolvers.reactionDiffusion(2.2, 100, 4, 1e-4, 20, 0.5, 0.1), 0));
        int checked = 0;
        for (double[] full : series) {
            for (double[] x : List.of(full, rounded(full, 0.05))) {
                for (int n : new int[] {5, 8, 10, 20, 64, x.length}) {
                    for (int p : new int[] {1, 2, 3, 7, 20, 33}) {
                        if (n > x.length) {
                            continue;
                        }
                        double[] y = java.util.Arrays.copyOfRange(x, x.length - n, x.length);
                        SeasonalKendall want = SeasonalKendall.of(y, n, p);
                        SeasonalKendall got = SeasonalKendall.test(y, n, p);
                        assertEquals(want.withSlope(Double.NaN), got, "n " + n + ", p " + p);
                        assertEquals(want.slope(), SeasonalKendall.slope(y, n, p), 0.0, "n " + n + ", p " + p);
                        checked++;
                    }
                }
            }
        }
        assertTrue(checked > 200);
    }

    private static double[] logPeaks(List<IterationRecord> h, int eq) {
        return h.stream().filter(r -> r.inner() == 1).mapToDouble(r -> Math.log10(r.residuals().value(eq)))
                .filter(Double::isFinite).toArray();
    }

    private static double[] rounded(double[] x, double q) {
        double[] y = new double[x.length];
        for (int i = 0; i < x.length; i++) {
            y[i] = Math.round(x[i] / q) * q;
        }
        return y;
    }
}
