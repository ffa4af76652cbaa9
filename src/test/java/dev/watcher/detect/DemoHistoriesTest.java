package dev.watcher.detect;

import static dev.watcher.detect.DetectorTestSupport.alarms;
import static dev.watcher.detect.DetectorTestSupport.deadline;
import static dev.watcher.detect.DetectorTestSupport.firstNonFinite;
import static dev.watcher.detect.DetectorTestSupport.of;
import static dev.watcher.detect.DetectorTestSupport.onset;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.demo.Histories;
import dev.watcher.model.Detection;
import dev.watcher.model.DetectionState;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.Patterns;
import java.util.List;
import org.junit.jupiter.api.Test;

/**
 * The residual detectors on the histories of the project's own cavity solver (SIMPLE on a staggered grid,
 * dev.watcher.demo): each scenario raises the pattern its numerics produce, between onset and deadline
 * read off the history itself, and the healthy ones raise no alarm.
 */
class DemoHistoriesTest {

    @Test
    void overRelaxedPressureVelocityCouplingIsAMomentumFamilyDivergenceNotASingleEquation() {
        List<IterationRecord> rs = Histories.run("hot-relaxation");
        List<Detection> ds = Replay.standard(rs);
        List<Detection> family = of(ds, Patterns.FAMILY_DIVERGENCE, DetectionState.OPEN);
        assertEquals(1, family.size(), alarms(ds).toString());
        Detection d = family.get(0);
        assertEquals(List.of("mom-x", "mom-y"), d.equations());
        long onset = rs.get(onset(rs, "mom-x", 0.3)).iter();
        long deadline = Math.min(deadline(rs, "mom-x", 3.0), deadline(rs, "mom-y", 3.0));
        assertTrue(d.iter() > onset && d.iter() < deadline, d.iter() + " not in (" + onset + ", " + deadline + ")");
        assertEquals(List.of(), of(ds, Patterns.SINGLE_EQUATION_BLOWUP, DetectionState.OPEN));
    }

    @Test
    void secondOrderConvectionOnTheCoarseGridDivergesAsAFamilyBeforeTheNaN() {
        List<IterationRecord> rs = Histories.run("high-peclet-central");
        List<Detection> ds = Replay.standard(rs);
        List<Detection> family = of(ds, Patterns.FAMILY_DIVERGENCE, DetectionState.OPEN);
        assertTrue(family.size() >= 1, alarms(ds).toString());
        Detection d = family.get(0);
        assertEquals(List.of("mom-x", "mom-y"), d.equations());
        long onset = rs.get(onset(rs, "mom-y", 0.3)).iter();
        long deadline = Math.min(deadline(rs, "mom-y", 3.0), firstNonFinite(rs));
        assertTrue(d.iter() > onset && d.iter() < deadline, d.iter() + " not in (" + onset + ", " + deadline + ")");
        assertTrue(d.remedy().contains("first-order"));
    }

    @Test
    void firstOrderConvectionOnTheSameGridConvergesWithoutAlarm() {
        assertEquals(List.of(), alarms(Replay.standard(Histories.run("high-peclet-upwind"))));
    }

    @Test
    void theDegenerateCellBlowsUpTheEnergyEquationAlone() {
        List<IterationRecord> rs = Histories.run("bad-cell");
        List<Detection> ds = Replay.standard(rs);
        List<Detection> single = of(ds, Patterns.SINGLE_EQUATION_BLOWUP, DetectionState.OPEN);
        assertEquals(1, single.size(), alarms(ds).toString());
        Detection d = single.get(0);
        assertEquals(List.of("temp"), d.equations());
        long onset = rs.get(onset(rs, "temp", 0.3)).iter();
        long deadline = Math.min(deadline(rs, "temp", 3.0), firstNonFinite(rs));
        assertTrue(d.iter() > onset && d.iter() < deadline, d.iter() + " not in (" + onset + ", " + deadline + ")");
        assertEquals(List.of(), of(ds, Patterns.FAMILY_DIVERGENCE, DetectionState.OPEN));
    }

    @Test
    void aLongRunWithPlateausAndARelaxationChangeRaisesNoAlarm() {
        assertEquals(List.of(), alarms(Replay.standard(Histories.run("slow-plateaus"))));
    }

    @Test
    void aRequeuedJobResumedFromItsSnapshotRaisesNoAlarm() {
        List<IterationRecord> rs = Histories.run("restart");
        assertTrue(rs.get(rs.size() - 1).segment() > 0);
        assertEquals(List.of(), alarms(Replay.standard(rs)));
    }

    @Test
    void aRunawayIsReportedAtItsFirstNonFiniteResidual() {
        List<IterationRecord> rs = Histories.run("runaway");
        List<Detection> nf = of(Replay.standard(rs), Patterns.NON_FINITE, DetectionState.OPEN);
        Detection residuals = nf.stream().filter(d -> !d.equations().isEmpty()).findFirst().orElseThrow();
        assertEquals(firstNonFinite(rs), residuals.iter());
        assertEquals(List.of("cont", "mom-x", "mom-y"), residuals.equations());
    }
}
