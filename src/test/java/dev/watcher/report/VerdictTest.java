package dev.watcher.report;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import org.junit.jupiter.api.Test;

/**
 * The verdict line. Events are written as the timeline lines of CONTRACT.md ("Output: the event timeline")
 * and read back through the report's own reader; the expected verdicts follow the precedence the report
 * documents (a stop carried out, non-finite values, converged, ended, still running).
 */
class VerdictTest {

    private final List<Event> events = new ArrayList<>();

    private void line(String type, long iter, String state, String severity, String rest) {
        String json = "{\"seq\":" + (events.size() + 1) + ",\"run\":\"r\",\"type\":\"" + type
                + "\",\"at\":\"2026-12-01T02:13:07.000Z\",\"iter\":" + iter + ",\"state\":\"" + state
                + "\",\"severity\":\"" + severity + "\"" + (rest.isEmpty() ? "" : "," + rest) + "}";
        Event e = Timeline.parse(json);
        assertTrue(e != null, json);
        events.add(e);
    }

    private void detection(long iter, String pattern, String state, String severity, String equations,
            String evidence) {
        line("detection", iter, state, severity, "\"pattern\":\"" + pattern + "\",\"equations\":[" + equations
                + "],\"monitor\":null,\"summary\":\"s\",\"remedy\":\"\",\"evidence\":{" + evidence + "}");
    }

    private void run(long iter, String state, String reason) {
        line("run", iter, state, "info", "\"reason\":\"" + reason + "\"");
    }

    private void action(long iter, String state, String reason) {
        line("action", iter, state, "critical", "\"method\":\"slurm\",\"signal\":\"TERM\",\"reason\":\"" + reason
                + "\",\"core_hours_saved\":null,\"pattern\":\"family-divergence\"");
    }

    private Verdict verdict() {
        return Verdict.of(events, null);
    }

    @Test
    void openConvergedDetectionGivesConvergedAtItsIterationAndNeverSaysSafe() {
        run(0, "started", "replay");
        detection(5120, "converged", "open", "info", "\"energy\"", "\"basis\":\"residuals-and-monitors\"");
        run(6000, "ended", "end of the log");
        Verdict v = verdict();
        assertEquals(Verdict.Kind.CONVERGED, v.kind());
        assertEquals(5120, v.iter());
        assertTrue(v.text().startsWith("converged at iteration 5120"), v.text());
        assertTrue(v.text().contains("meets the configured criteria"), v.text());
        assertFalse(v.text().toLowerCase(Locale.ROOT).contains("safe"), v.text());
    }

    @Test
    void residualsOnlyConvergenceSaysTheLogHasNoMonitors() {
        detection(900, "converged", "open", "info", "\"p\"", "\"basis\":\"residuals-only\",\"monitors\":\"missing\"");
        Verdict v = verdict();
        assertEquals(Verdict.Kind.CONVERGED, v.kind());
        assertTrue(v.text().contains("residuals only"), v.text());
    }

    @Test
    void convergedThatResolvedAgainIsNotAVerdictOfConvergence() {
        run(0, "started", "watch");
        detection(900, "converged", "open", "info", "\"p\"", "");
        detection(1400, "converged", "resolved", "info", "\"p\"", "");
        Verdict v = verdict();
        assertEquals(Verdict.Kind.RUNNING, v.kind());
        assertEquals(1400, v.iter());
        assertTrue(v.text().startsWith("still running: last seen at iteration 1400"), v.text());
    }

    @Test
    void carriedOutStopWinsAndGivesItsReason() {
        run(0, "started", "watch");
        detection(3000, "family-divergence", "open", "critical", "\"x-momentum\",\"y-momentum\"", "");
        action(3100, "requested", "family-divergence: momentum diverges");
        action(3150, "done", "family-divergence: momentum diverges");
        run(3150, "ended", "the watched job ended");
        Verdict v = verdict();
        assertEquals(Verdict.Kind.STOPPED, v.kind());
        assertEquals(3150, v.iter());
        assertEquals("stopped at iteration 3150 because family-divergence: momentum diverges", v.text());
    }

    @Test
    void requestedStopWithoutConfirmationSaysSo() {
        action(3100, "requested", "non-finite values");
        Verdict v = verdict();
        assertEquals(Verdict.Kind.STOPPED, v.kind());
        assertTrue(v.text().contains("no confirmation"), v.text());
    }

    @Test
    void wouldStopOrRefusedIsNotAStop() {
        detection(3000, "family-divergence", "open", "critical", "\"x-momentum\"", "");
        action(3100, "would-stop", "family-divergence");
        action(3100, "refused", "no job given");
        run(3500, "ended", "end of the log");
        Verdict v = verdict();
        assertEquals(Verdict.Kind.ENDED, v.kind());
        assertEquals("ended at iteration 3500 (end of the log) without meeting the configured criteria; still open:"
                + " family-divergence (x-momentum)", v.text());
    }

    @Test
    void openNonFiniteDetectionMeansTheRunBlewUp() {
        detection(700, "converged", "open", "info", "\"energy\"", "");
        detection(800, "non-finite", "open", "critical", "\"energy\"", "\"value\":\"NaN\"");
        Verdict v = verdict();
        assertEquals(Verdict.Kind.BLEW_UP, v.kind());
        assertEquals("blew up at iteration 800: non-finite values in energy", v.text());
    }

    @Test
    void resolvedNonFiniteDoesNotCountAsBlownUp() {
        detection(800, "non-finite", "open", "critical", "\"energy\"", "");
        detection(820, "non-finite", "resolved", "critical", "\"energy\"", "");
        run(900, "ended", "end");
        assertEquals(Verdict.Kind.ENDED, verdict().kind());
    }

    @Test
    void aRestartAfterAnEndMeansRunningAgain() {
        run(0, "started", "watch");
        run(500, "ended", "watcher stopped");
        run(500, "resumed", "watch");
        detection(640, "stalled-oscillation", "open", "warning", "\"continuity\"", "");
        Verdict v = verdict();
        assertEquals(Verdict.Kind.RUNNING, v.kind());
        assertTrue(v.text().endsWith("still open: stalled-oscillation (continuity)"), v.text());
    }

    @Test
    void infoConditionsAreNotListedAsStillOpen() {
        detection(10, "monitor-settled", "open", "info", "", "");
        run(20, "ended", "end");
        assertEquals("ended at iteration 20 (end) without meeting the configured criteria", verdict().text());
    }

    @Test
    void noEventsAndNoStateIsNoData() {
        assertEquals(Verdict.Kind.NO_DATA, verdict().kind());
    }
}
