package dev.watcher.report;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.bench.ReportBench;
import dev.watcher.bench.ReportBench.Scenario;
import dev.watcher.journal.Journal;
import dev.watcher.model.Detection;
import dev.watcher.model.DetectionState;
import dev.watcher.model.PendingEvent;
import dev.watcher.model.Severity;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.NoSuchFileException;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Instant;
import java.time.ZoneId;
import java.time.ZoneOffset;
import java.util.List;
import java.util.Map;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The report written from real state directories on disk (generated through the history and journal stages). */
class ReportWriterIT {

    /** The issue's bound for a 10-million-iteration run; a million iterations must stay well inside it. */
    static final long FIVE_MB = 5L * 1024 * 1024;

    @TempDir
    Path tmp;

    @Test
    void millionIterationRunGivesASmallSelfContainedReport() throws Exception {
        Path state = tmp.resolve("state");
        ReportBench.generate(state, "header", 1_000_000, Scenario.CONVERGING, "");
        Path out = ReportWriter.write(state, tmp.resolve("out/report.html"), ZoneOffset.UTC);
        long size = Files.size(out);
        assertTrue(size < FIVE_MB, "report of 1M iterations is " + size + " bytes");
        // the history is bounded: the report of 1M iterations is no bigger than a tenth of the bound
        assertTrue(size < FIVE_MB / 10, "report of 1M iterations is " + size + " bytes");
        String html = Files.readString(out);
        assertTrue(html.contains("converged at iteration 920000 \u2014 meets the configured criteria"), "verdict");
        assertTrue(html.contains("uPlot"), "plot library inlined");
        assertNoNetworkReference(html);
        assertFalse(Files.exists(tmp.resolve("out/report.html.tmp")), "no temporary file left");
    }

    static void assertNoNetworkReference(String html) {
        // no element loads anything: no src/href to a URL, no <link>, no @import, no url() to a remote place
        Matcher m = Pattern.compile("(?i)(src|href)\\s*=\\s*[\"']?\\s*(https?:|//)").matcher(html);
        assertFalse(m.find(), () -> "network reference: " + html.substring(Math.max(0, m.start() - 40),
                Math.min(html.length(), m.end() + 40)));
        assertFalse(Pattern.compile("(?i)<link\\b").matcher(html).find(), "a <link> element");
        assertFalse(Pattern.compile("(?i)@import|url\\(\\s*['\"]?(https?:|//)").matcher(html).find(), "remote CSS");
    }

    @Test
    void severalRunsGetASummaryTableAndTheirOwnSections() throws Exception {
        Path state = tmp.resolve("state");
        ReportBench.generate(state, "header", 20_000, Scenario.CONVERGING, "");
        ReportBench.generate(state, "tunnel-fan", 20_000, Scenario.STOPPED, "");
        ReportBench.generate(state, "rooftop", 20_000, Scenario.UNSTEADY, "");
        String html = Files.readString(ReportWriter.write(state, tmp.resolve("r.html"), ZoneOffset.UTC));
        int summary = html.indexOf("Runs at a glance");
        assertTrue(summary > 0, "summary table");
        assertTrue(summary < html.indexOf("id=\"run-1\""), "summary first");
        assertTrue(html.contains("id=\"run-3\""), "three sections");
        assertTrue(html.contains("stopped at iteration 12400 because family-divergence: the momentum equations"
                + " diverge"), "stop verdict");
        assertTrue(html.contains("blew up at iteration 20000: non-finite values in energy"), "blow-up verdict");
        assertTrue(html.contains("Core-hours saved by stopping the job: <strong>1843.2</strong>"), "core-hours");
        assertTrue(html.contains("Per-step peaks and floors"), "unsteady plot");
        assertTrue(html.contains("lower the energy under-relaxation factor"), "remedy shown");
    }

    @Test
    void markupInNamesAndSummariesIsEscapedEverywhere() throws Exception {
        Path state = tmp.resolve("state");
        String evil = "<img src=x onerror=alert(1)></script><script>alert(2)</script>";
        ReportBench.generate(state, "header<b>", 5_000, Scenario.CONVERGING, evil);
        String html = Files.readString(ReportWriter.write(state, tmp.resolve("r.html"), ZoneOffset.UTC));
        assertFalse(html.contains("<img"), "raw <img> in the page");
        assertFalse(html.contains("<b>"), "raw <b> in the page");
        assertFalse(html.contains("alert(2)</script>"), "script text unescaped");
        assertTrue(html.contains("&lt;img src=x onerror=alert(1)&gt;"), "escaped in HTML text");
        assertTrue(html.contains("\\u003cimg src=x onerror=alert(1)\\u003e"), "escaped in the plot data");
        // exactly the page's own three script elements: data, plot library, page script
        Matcher m = Pattern.compile("(?i)<script\\b").matcher(html);
        int n = 0;
        while (m.find()) {
            n++;
        }
        assertEquals(3, n, "script elements");
    }

    @Test
    void timesAreShownInTheGivenZoneAndTheZoneIsNamed() throws Exception {
        Path state = tmp.resolve("state");
        ReportBench.generate(state, "header", 2_000, Scenario.CONVERGING, "");
        // the generator's first event is at 2026-12-01T22:00:01Z; Asia/Kolkata is UTC+05:30 all year
        // (IANA tz database)
        String html = Files.readString(ReportWriter.write(state, tmp.resolve("r.html"), ZoneId.of("Asia/Kolkata")));
        assertTrue(html.contains("2026-12-02 03:30:01"), "first event in local time");
        assertTrue(html.contains("Asia/Kolkata (UTC+05:30)"), "zone named with its offset");
        assertTrue(html.contains("Time (Asia/Kolkata)"), "table header names the zone");
        assertTrue(Files.readString(state.resolve("timeline.jsonl")).contains("\"at\":\"2026-12-01T22:00:01.000Z\""),
                "the timeline stays UTC");
    }

    @Test
    void timelineWithoutHistoryGivesAnEventsOnlyReportThatSaysSo() throws Exception {
        Path state = tmp.resolve("state");
        ReportBench.generate(state, "header", 2_000, Scenario.CONVERGING, "");
        Path lone = tmp.resolve("elsewhere/timeline.jsonl");
        Files.createDirectories(lone.getParent());
        Files.copy(state.resolve("timeline.jsonl"), lone);
        String html = Files.readString(ReportWriter.write(lone, tmp.resolve("r.html"), ZoneOffset.UTC));
        assertTrue(html.contains("Events only:"), "said on the page");
        assertFalse(html.contains("class=\"canvas\""), "no plots");
        assertTrue(html.contains("converged at iteration 1840"), "verdict from events");
    }

    @Test
    void givenATimelineFileItFindsTheHistoryBesideIt() throws Exception {
        Path state = tmp.resolve("state");
        ReportBench.generate(state, "header", 2_000, Scenario.CONVERGING, "");
        String html = Files.readString(ReportWriter.write(state.resolve("timeline.jsonl"), tmp.resolve("r.html"),
                ZoneOffset.UTC));
        assertTrue(html.contains("class=\"canvas\""), "plots");
        assertFalse(html.contains("Events only:"));
    }

    @Test
    void missingInputIsNoSuchFile() {
        assertThrows(NoSuchFileException.class, () -> ReportWriter.write(tmp.resolve("nope"), tmp.resolve("r.html"),
                ZoneOffset.UTC));
        assertThrows(NoSuchFileException.class, () -> ReportWriter.write(tmp, tmp.resolve("r.html"), ZoneOffset.UTC));
    }

    @Test
    void hugeTimelineIsCappedWithANoteOfWhatWasLeftOut() throws Exception {
        Path state = tmp.resolve("state");
        Files.createDirectories(state);
        int n = Page.MAX_ROWS + 700;
        try (Journal j = Journal.open(state.resolve("timeline.jsonl"), Clock.fixed(Instant.parse(
                "2026-12-01T00:00:00Z"), ZoneOffset.UTC), null, true)) {
            j.append(PendingEvent.run("flappy", 0, "started", "watch"));
            for (int i = 1; i < n; i++) {
                j.append(PendingEvent.detection("flappy", new Detection("residual-level", DetectionState.INFO,
                        Severity.INFO, i, List.of("energy"), null, "energy crossed 1e-4", "", Map.of("level", 1e-4))));
            }
            j.append(PendingEvent.detection("flappy", new Detection("stalled-oscillation", DetectionState.OPEN,
                    Severity.WARNING, n, List.of("energy"), null, "energy bounces", "lower relaxation", Map.of())));
            j.append(PendingEvent.run("flappy", n, "ended", "end of the log"));
        }
        String html = Files.readString(ReportWriter.write(state, tmp.resolve("r.html"), ZoneOffset.UTC),
                StandardCharsets.UTF_8);
        int rows = html.split("<tr class=\"t-", -1).length - 1;
        assertEquals(Page.MAX_ROWS, rows, "rows in the event table");
        // the warning and both run events are kept; 702 of the level crossings are left out and counted
        assertTrue(html.contains("energy bounces"), "the warning survives the cap");
        assertTrue(html.contains("702 detection info (residual-level)"), "note of what was left out");
        assertTrue(html.contains("still open: stalled-oscillation (energy)"), "verdict");
    }

    @Test
    void routineEventsBeyondTheKeptNumberAreCountedButNotHeld() throws Exception {
        Path state = tmp.resolve("state");
        Files.createDirectories(state);
        Instant at = Instant.parse("2026-12-01T00:00:00Z");
        int levels = Timeline.ROUTINE_KEPT + 1000;
        StringBuilder lines = new StringBuilder();
        long seq = 0;
        lines.append(line(++seq, at, PendingEvent.run("long", 0, "started", "watch")));
        for (int i = 1; i <= levels; i++) {
            lines.append(line(++seq, at, PendingEvent.detection("long", new Detection("residual-level",
                    DetectionState.INFO, Severity.INFO, i, List.of("energy"), null, "energy crossed 1e-4", "",
                    Map.of()))));
        }
        lines.append(line(++seq, at, PendingEvent.detection("long", new Detection("stalled-oscillation",
                DetectionState.OPEN, Severity.WARNING, levels, List.of("energy"), null, "energy bounces", "", Map.of()))));
        lines.append(line(++seq, at, PendingEvent.run("long", levels, "ended", "end of the log")));
        Files.writeString(state.resolve("timeline.jsonl"), lines);

        Timeline t = Timeline.read(state.resolve("timeline.jsonl"));
        assertEquals(Timeline.ROUTINE_KEPT + 3, t.runs().get("long").size(), "events held");
        assertEquals(Map.of("detection info (residual-level)", 1000L), t.skipped().get("long"), "counted only");

        String html = Files.readString(ReportWriter.write(state, tmp.resolve("r.html"), ZoneOffset.UTC));
        // every event is accounted for: 1 + 6000 + 1 + 1 = 6003, of which 1500 listed
        assertTrue(html.contains("6\u202f003 events; the 1\u202f500 most important are listed, 4\u202f503 left out:"
                + " 4503 detection info (residual-level)"), "note of what was left out");
        assertTrue(html.contains("energy bounces"));
    }

    private static String line(long seq, Instant at, PendingEvent e) {
        return new String(Journal.encode(dev.watcher.model.TimelineEvent.of(seq, at, e)), StandardCharsets.UTF_8);
    }
}
