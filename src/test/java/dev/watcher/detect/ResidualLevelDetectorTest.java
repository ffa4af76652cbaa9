package dev.watcher.detect;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.model.Detection;
import dev.watcher.model.DetectionState;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.Patterns;
import dev.watcher.model.Samples;
import dev.watcher.model.Severity;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.Test;

class ResidualLevelDetectorTest {

    private static IterationRecord rec(long iter, int segment, double... v) {
        return new IterationRecord(iter, IterationRecord.NONE, Double.NaN, IterationRecord.NONE,
                new Samples(List.of("cont", "energy"), v), Samples.EMPTY, segment, iter);
    }

    @Test
    void announcesEachLevelOncePerEquationAtTheFirstRecordBelowIt() {
        List<IterationRecord> rs = ResidualSolvers.developingVortex(false, 4.5, 1200);
        List<Detection> ds = Replay.run(new ResidualLevelDetector(DetectSettings.defaults()), rs);
        double[] levels = {1e-3, 1e-4, 1e-5, 1e-6};
        for (String eq : List.of("cont", "mom-x", "mom-y", "temp")) {
            for (double level : levels) {
                long expected = -1;
                for (IterationRecord r : rs) {
                    if (r.residuals().get(eq, 1) < level) {
                        expected = r.iter();
                        break;
                    }
                }
                long e = expected;
                List<Detection> hits = ds.stream().filter(d -> d.equations().equals(List.of(eq))
                        && d.evidence().get("level").equals(level)).toList();
                if (e < 0) {
                    assertEquals(0, hits.size());
                } else {
                    assertEquals(1, hits.size(), eq + " " + level + " " + hits);
                    assertEquals(e, hits.get(0).iter());
                    assertEquals(DetectionState.INFO, hits.get(0).state());
                    assertEquals(Severity.INFO, hits.get(0).severity());
                }
            }
        }
    }

    @Test
    void aJumpAcrossSeveralLevelsGivesOneEventPerLevelHighestFirstAndBouncesRepeatNothing() {
        List<IterationRecord> rs = List.of(rec(1, 0, 1, 1), rec(2, 0, 2e-5, 1), rec(3, 0, 5e-3, 1),
                rec(4, 0, 2e-5, 1), rec(5, 0, 5e-7, 1));
        List<Detection> ds = Replay.run(new ResidualLevelDetector(DetectSettings.defaults()), rs);
        List<Double> levels = new ArrayList<>();
        List<Long> iters = new ArrayList<>();
        for (Detection d : ds) {
            levels.add((Double) d.evidence().get("level"));
            iters.add(d.iter());
        }
        assertEquals(List.of(1e-3, 1e-4, 1e-5, 1e-6), levels);
        assertEquals(List.of(2L, 2L, 5L, 5L), iters);
        assertTrue(ds.get(0).summary().contains("1e-03"), ds.get(0).summary());
    }

    @Test
    void aNewSegmentRearmsButDoesNotAnnounceLevelsItStartsBelow() {
        List<IterationRecord> rs = List.of(rec(1, 0, 1, 1), rec(2, 0, 5e-4, 1), rec(3, 1, 5e-5, 1),
                rec(4, 1, 1e-2, 1), rec(5, 1, 5e-4, 1), rec(6, 1, 5e-5, 1));
        List<Detection> ds = Replay.run(new ResidualLevelDetector(DetectSettings.defaults()), rs);
        List<String> got = ds.stream().map(d -> d.iter() + ":" + d.evidence().get("level")).toList();
        // segment 1 starts at 5e-5 (below 1e-3 and 1e-4 without having been above them): nothing; then it
        // climbs to 1e-2 and crosses 1e-3 at 5 and 1e-4 at 6
        assertEquals(List.of("2:0.001", "5:0.001", "6:1.0E-4"), got);
    }

    @Test
    void levelsAreAParameter() {
        assertArrayEquals(new double[] {1e-2, 1e-8}, ResidualLevelDetector.parseLevels("1e-8, 1e-2, bad, -3"), 0);
        DetectSettings s = DetectSettings.defaults().with(java.util.Map.of(Patterns.RESIDUAL_LEVEL + ".levels", "1e-2"));
        List<Detection> ds = Replay.run(new ResidualLevelDetector(s), List.of(rec(1, 0, 1, 1), rec(2, 0, 1e-3, 1e-3)));
        assertEquals(2, ds.size());
    }
}
