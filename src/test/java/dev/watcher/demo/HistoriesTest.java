package dev.watcher.demo;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.model.IterationRecord;
import java.util.List;
import org.junit.jupiter.api.Test;

class HistoriesTest {

    @Test
    void twoRunsOfTheSameScenarioAreIdentical() {
        assertEquals(Histories.run("hot-relaxation", 300), Histories.run("hot-relaxation", 300));
        assertEquals(Histories.run("big-step", 120), Histories.run("big-step", 120));
    }

    @Test
    void recordsCarryTheLayoutNamesAndCountIterationsFromOne() {
        List<IterationRecord> h = Histories.run("converging", 10);
        assertEquals(10, h.size());
        assertEquals(1, h.get(0).iter());
        assertEquals(List.of("cont", "mom-x", "mom-y", "temp"), h.get(0).residuals().names());
        assertEquals(List.of("vmid", "lid_shear", "wall_q"), h.get(0).monitors().names());
        assertTrue(!h.get(0).hasStep());
    }

    @Test
    void unsteadyRecordsCarryStepTimeAndInnerIteration() {
        List<IterationRecord> h = Histories.run("big-step", 9);
        IterationRecord r = h.get(8);
        assertEquals(9, r.iter());
        assertEquals(3, r.step());
        assertEquals(1, r.inner());
        assertEquals(0.21, r.time(), 1e-12);
    }

    @Test
    void unknownScenarioIsRejectedWithTheKnownNames() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> Histories.run("nope", 5));
        assertTrue(e.getMessage().contains("converging"));
    }
}
