package dev.watcher.parse;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertSame;

import dev.watcher.model.IterationRecord;
import dev.watcher.model.Samples;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

/** Residuals in one file and monitors in another, joined on the iteration. */
class RecordJoinerTest {

    private static IterationRecord res(long iter, double cont) {
        return IterationRecord.steady(iter, Samples.of(Map.of("cont", cont)), Samples.EMPTY);
    }

    private static IterationRecord mon(long iter, double vmid) {
        return IterationRecord.steady(iter, Samples.EMPTY, Samples.of(Map.of("vmid", vmid)));
    }

    @Test
    void mergesTheRecordsOfBothSourcesOnceBothReachedTheIteration() {
        RecordJoiner j = new RecordJoiner(2);
        List<IterationRecord> out = new ArrayList<>();
        j.accept(0, res(1, 0.5), out::add);
        j.accept(0, res(2, 0.4), out::add);
        assertEquals(0, out.size(), "the monitor file has not reached iteration 1");
        j.accept(1, mon(1, 0.21), out::add);
        assertEquals(1, out.size());
        assertEquals(Map.of("cont", 0.5), out.get(0).residuals().toMap());
        assertEquals(Map.of("vmid", 0.21), out.get(0).monitors().toMap());
        j.accept(1, mon(2, 0.22), out::add);
        j.accept(1, mon(3, 0.23), out::add);
        assertEquals(List.of(1L, 2L), out.stream().map(IterationRecord::iter).toList());
        j.flush(out::add);
        assertEquals(List.of(1L, 2L, 3L), out.stream().map(IterationRecord::iter).toList());
        assertEquals(Map.of("vmid", 0.23), out.get(2).monitors().toMap());
        assertSame(out.get(0).residuals().names(), out.get(1).residuals().names());
    }

    @Test
    void letsRecordsOfALaggingSourceGoWhenTheBoundIsReached() {
        RecordJoiner j = new RecordJoiner(2, 3);
        List<IterationRecord> out = new ArrayList<>();
        for (int i = 1; i <= 5; i++) {
            j.accept(0, res(i, 1.0 / i), out::add);
        }
        assertEquals(List.of(1L, 2L), out.stream().map(IterationRecord::iter).toList());
        assertEquals(3, j.pending());
        j.accept(1, mon(1, 0.2), out::add);
        assertEquals(1, j.late(), "iteration 1 already left without its monitor");
        j.accept(1, mon(4, 0.2), out::add);
        assertEquals(List.of(1L, 2L, 3L, 4L), out.stream().map(IterationRecord::iter).toList());
        assertEquals(Map.of("vmid", 0.2), out.get(3).monitors().toMap());
    }

    @Test
    void ordersBySegmentThenIterationSoARestartedRunJoinsByItsNewSegment() {
        RecordJoiner j = new RecordJoiner(2);
        List<IterationRecord> out = new ArrayList<>();
        j.accept(0, res(10, 0.1), out::add);
        j.accept(1, mon(10, 0.3), out::add);
        j.accept(0, res(5, 0.2).withSegment(1), out::add);
        j.accept(1, mon(5, 0.4).withSegment(1), out::add);
        assertEquals(List.of(10L, 5L), out.stream().map(IterationRecord::iter).toList());
        assertEquals(1, out.get(1).segment());
        assertEquals(Map.of("vmid", 0.4), out.get(1).monitors().toMap());
    }

    @Test
    void passesRecordsThroughUnchangedWithOneSource() {
        RecordJoiner j = new RecordJoiner(1);
        List<IterationRecord> out = new ArrayList<>();
        IterationRecord r = res(1, 0.5);
        j.accept(0, r, out::add);
        assertSame(r, out.get(0));
    }
}
