package dev.watcher.detect;

import static dev.watcher.detect.DetectorTestSupport.firstNonFinite;
import static dev.watcher.detect.DetectorTestSupport.of;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;

import dev.watcher.model.Detection;
import dev.watcher.model.DetectionState;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.Patterns;
import dev.watcher.model.Samples;
import dev.watcher.model.Severity;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

class NonFiniteDetectorTest {

    private static final String P = Patterns.NON_FINITE;
    private static final List<String> EQS = List.of("cont", "mom-x", "temp");

    private static IterationRecord rec(long iter, double cont, double momx, double temp) {
        return IterationRecord.steady(iter, new Samples(EQS, new double[] {cont, momx, temp}), Samples.EMPTY);
    }

    @Test
    void firesAtTheFirstOverflowOfARealDivergenceAndOncePerEquation() {
        // the central-differenced vortex overflows; a solver log prints an overflow field, the parser gives
        // +Infinity; mom-y overflows two sweeps before mom-x
        List<IterationRecord> rs = ResidualSolvers.developingVortex(true, 5.0, 1500);
        List<Detection> ds = Replay.run(new NonFiniteDetector(DetectSettings.defaults()), rs);
        assertEquals(2, ds.size(), ds.toString());
        Detection d = ds.get(0);
        assertEquals(DetectionState.OPEN, d.state());
        assertEquals(Severity.CRITICAL, d.severity());
        assertEquals(firstNonFinite(rs), d.iter());
        assertEquals(List.of("mom-y"), d.equations());
        assertEquals("Infinity", d.evidence().get("value"));
        assertEquals(List.of("mom-x"), ds.get(1).equations());
    }

    @Test
    void namesEveryEquationThatBreaksDownInTheSameRecordInOneEvent() {
        List<IterationRecord> rs = List.of(rec(1, 1, 1, 1), rec(2, 0.5, Double.NaN, Double.POSITIVE_INFINITY),
                rec(3, Double.NaN, Double.NaN, Double.NaN));
        List<Detection> ds = Replay.run(new NonFiniteDetector(DetectSettings.defaults()), rs);
        assertEquals(2, ds.size(), ds.toString());
        assertEquals(List.of("mom-x", "temp"), ds.get(0).equations());
        assertEquals(2L, ds.get(0).iter());
        assertEquals("NaN", ds.get(0).evidence().get("value"));
        assertEquals(List.of("cont"), ds.get(1).equations());
    }

    @Test
    void resolvesOnlyAfterFiniteValuesHaveLastedTheConfiguredRun() {
        DetectSettings s = DetectSettings.defaults().with(Map.of(P + ".resolve_after", "5"));
        List<IterationRecord> rs = new ArrayList<>();
        rs.add(rec(1, 1, 1, 1));
        rs.add(rec(2, 1, Double.NaN, 1));
        for (int i = 3; i <= 5; i++) {
            rs.add(rec(i, 1, 1, 1));
        }
        rs.add(rec(6, 1, Double.NEGATIVE_INFINITY, 1)); // breaks the finite run: no flapping
        for (int i = 7; i <= 20; i++) {
            rs.add(rec(i, 1, 1, 1));
        }
        List<Detection> ds = Replay.run(new NonFiniteDetector(s), rs);
        assertEquals(2, ds.size(), ds.toString());
        assertEquals(DetectionState.OPEN, ds.get(0).state());
        assertEquals(DetectionState.RESOLVED, ds.get(1).state());
        assertEquals(11L, ds.get(1).iter()); // finite at 7, 8, 9, 10, 11
        assertEquals(ds.get(0).conditionKey(), ds.get(1).conditionKey());
    }

    @Test
    void aMonitorThatBecomesNaNIsItsOwnCondition() {
        List<IterationRecord> rs = List.of(
                IterationRecord.steady(1, Samples.EMPTY, Samples.of(Map.of("drag", 1.0))),
                IterationRecord.steady(2, Samples.EMPTY, Samples.of(Map.of("drag", Double.NaN))));
        List<Detection> ds = Replay.run(new NonFiniteDetector(DetectSettings.defaults()), rs);
        assertEquals(1, ds.size());
        assertEquals("drag", ds.get(0).monitor());
        assertEquals(List.of(), ds.get(0).equations());
        assertEquals(1.0, ds.get(0).evidence().get("last_finite"));
    }

    @Test
    void aZeroResidualIsFinite() {
        List<Detection> ds = Replay.run(new NonFiniteDetector(DetectSettings.defaults()),
                List.of(rec(1, 0, 0, 0)));
        assertEquals(List.of(), ds);
        assertNull(of(ds, P, DetectionState.OPEN).stream().findFirst().orElse(null));
    }
}
