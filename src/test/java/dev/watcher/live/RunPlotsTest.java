package dev.watcher.live;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import java.util.List;
import org.junit.jupiter.api.Test;

/** The level lines of a residual plot and how their labels write a value. */
class RunPlotsTest {

    @Test
    void theLooseLevelAndTheTarget() {
        assertEquals(List.of(new RunPlots.Level(1e-3, "loose 1e-3"), new RunPlots.Level(1e-5, "target 1e-5")),
                RunPlots.residualLevels(1e-5));
        assertEquals(List.of(new RunPlots.Level(1e-3, "loose 1e-3"), new RunPlots.Level(2.5e-6, "target 2.5e-6")),
                RunPlots.residualLevels(2.5e-6));
        // a target at 1e-3 is one line, named for what it is to this run
        assertEquals(List.of(new RunPlots.Level(1e-3, "target 1e-3")), RunPlots.residualLevels(1e-3));
        // no absolute target (relative targets, or none known)
        assertEquals(List.of(new RunPlots.Level(1e-3, "loose 1e-3")), RunPlots.residualLevels(Double.NaN));
        assertEquals(List.of(new RunPlots.Level(1e-3, "loose 1e-3")), RunPlots.residualLevels(0));
    }

    @Test
    void labelsWriteAShortScientificForm() {
        assertEquals("1e-5", RunPlots.sci(1e-5));
        assertEquals("1.23e-4", RunPlots.sci(1.234567e-4));
        assertEquals("1e+2", RunPlots.sci(100));
        assertEquals("1e+0", RunPlots.sci(1));
        assertThrows(IllegalArgumentException.class, () -> new RunPlots.Level(-1, "below zero"));
    }
}
