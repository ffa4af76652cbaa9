package dev.watcher.detect;

import static dev.watcher.detect.DetectorTestSupport.alarms;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.model.Detection;
import dev.watcher.model.IterationRecord;
import java.util.List;
import org.junit.jupiter.api.Test;

/** Healthy histories: they may raise level, settling and convergence events, never an alarm. */
class FalseAlarmTest {

    @Test
    void aLongSlowNonlinearRunWithBumpsAtEveryConductivityUpdateRaisesNoAlarm() {
        List<IterationRecord> rs = ResidualSolvers.nonlinearConduction(40, 5000, 60, 0);
        List<Detection> ds = Replay.standard(rs);
        assertEquals(List.of(), alarms(ds));
        assertTrue(ds.stream().filter(d -> d.pattern().equals(dev.watcher.model.Patterns.RESIDUAL_LEVEL)).count() >= 8,
                "both equations pass all four levels");
    }

    @Test
    void aRestartFromAnEarlierSnapshotIsNotABlowUp() {
        List<IterationRecord> rs = ResidualSolvers.nonlinearConduction(40, 4000, 60, 2400);
        assertEquals(1, rs.get(rs.size() - 1).segment());
        assertEquals(List.of(), alarms(Replay.standard(rs)));
    }

    @Test
    void theStartUpOfADevelopingFlowRaisesNoAlarm() {
        assertEquals(List.of(), alarms(Replay.standard(ResidualSolvers.developingVortex(false, 4.5, 1200))));
    }

    @Test
    void theIterationsBeforeADivergenceBeginsRaiseNothing() {
        List<IterationRecord> rs = ResidualSolvers.developingVortex(true, 4.5, 1500);
        int onset = DetectorTestSupport.onset(rs, "mom-x", 0.3);
        assertTrue(onset > 200);
        assertEquals(List.of(), alarms(Replay.standard(rs.subList(0, onset + 1))));
    }

    @Test
    void theSameRecordsGiveTheSameDetections() {
        List<IterationRecord> rs = ResidualSolvers.badCell(0.40, 1e-7, 1500, 0);
        assertEquals(Replay.standard(rs), Replay.standard(rs));
    }
}
