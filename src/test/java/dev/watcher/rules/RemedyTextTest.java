package dev.watcher.rules;

import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.watcher.model.Detection;
import dev.watcher.model.DetectionState;
import dev.watcher.model.Severity;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

/** Filling remedy templates: placeholders from the detection, its evidence and the run's last values. */
class RemedyTextTest {

    private static final Detection D = new Detection("single-equation-blowup", DetectionState.OPEN,
            Severity.CRITICAL, 10, List.of("temp"), "wall_q", "", "",
            Map.of("rise_decades", 1.9, "basis", "residuals-only", "slope", 2.5e-4));

    @Test
    void fillsEquationsMonitorEvidenceAndLastValues() {
        assertEquals("temp at wall_q rose 1.9 decades (residuals-only), 40 core-hours",
                RemedyText.fill("{equations} at {monitor} rose {rise_decades} decades ({basis}), {left} core-hours",
                        D, Map.of("left", 40.0)));
        assertEquals("slope 2.50e-04", RemedyText.fill("slope {slope}", D, Map.of()));
    }

    @Test
    void dropsABracketedPartWithAnUnknownPlaceholderAndKeepsAKnownOne() {
        assertEquals("Stop it.", RemedyText.fill("Stop it[ ({left} core-hours left)].", D, Map.of()));
        assertEquals("Stop it (12 core-hours left).",
                RemedyText.fill("Stop it[ ({left} core-hours left)].", D, Map.of("left", 12.0)));
    }

    @Test
    void leavesAnUnknownPlaceholderOutsideBracketsForTheDaemon() {
        assertEquals("up to {core_hours_left} core-hours", RemedyText.fill("up to {core_hours_left} core-hours", D,
                Map.of()));
    }

    @Test
    void evidenceWinsOverLastValuesAndNonFiniteCountsAsUnknown() {
        assertEquals("1.9", RemedyText.fill("{rise_decades}", D, Map.of("rise_decades", 7.0)));
        assertEquals("", RemedyText.fill("[{x}]", D, Map.of("x", Double.NaN)));
    }
}
