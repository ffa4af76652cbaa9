package dev.watcher.live;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assertions.fail;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.watcher.daemon.LiveFeeds;
import dev.watcher.demo.Histories;
import dev.watcher.detect.DetectSettings;
import dev.watcher.model.EventType;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.Patterns;
import dev.watcher.model.Samples;
import dev.watcher.model.Severity;
import dev.watcher.model.TimelineEvent;
import io.micrometer.prometheusmetrics.PrometheusConfig;
import io.micrometer.prometheusmetrics.PrometheusMeterRegistry;
import io.vertx.core.Vertx;
import java.io.File;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.Base64;
import java.util.Iterator;
import java.util.List;
import java.util.Map;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Assumptions;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The live page in a real headless Chromium (Debian's {@code chromium}), driven over the DevTools protocol:
 * the page loads through the token, draws its plots (its self-check counts canvases with series pixels),
 * follows the event stream while records arrive, shows each run's outlook (the forecasts of its last save)
 * and the level lines of its residual plot, shows no console error, uncaught exception or failed request, and
 * leaves a screenshot under the build directory ({@code live-it/live.png}).
 *
 * <p>With the environment variable {@code CI} set, a missing chromium fails the test
 * ({@code .ci/up.d/20-chromium.sh} installs it); elsewhere the test is skipped.
 */
class LivePageBrowserIT {

    private static final ObjectMapper JSON = new ObjectMapper();
    private static final String CHECK = "(function(){var e=document.getElementById('self-check');"
            + "return e.dataset.done==='1'?e.textContent:'';})()";

    @TempDir
    Path tmp;

    static Path chromium() {
        for (String dir : System.getenv().getOrDefault("PATH", "/usr/bin").split(File.pathSeparator)) {
            for (String name : new String[] {"chromium", "chromium-browser"}) {
                Path p = Path.of(dir, name);
                if (Files.isExecutable(p)) {
                    return p;
                }
            }
        }
        if (System.getenv("CI") != null) {
            fail("chromium is not installed (.ci/up.d/20-chromium.sh installs it)");
        }
        Assumptions.abort("chromium is not installed; skipped outside CI");
        return null;
    }

    static Path buildDir() throws Exception {
        return Path.of(LivePageBrowserIT.class.getProtectionDomain().getCodeSource().getLocation().toURI())
                .getParent();
    }

    private static JsonNode check(Cdp cdp) throws Exception {
        String s = cdp.eval(CHECK);
        return s.isEmpty() ? JSON.createObjectNode() : JSON.readTree(s);
    }

    /** The cells of the rows of a table of the card of {@code run}, as JSON (an array of arrays of text). */
    private static JsonNode cells(Cdp cdp, String run, String table) throws Exception {
        return JSON.readTree(cdp.eval("(function(){var card=Array.from(document.querySelectorAll('.run'))"
                + ".find(function(c){return c.querySelector('.name').textContent===" + JSON.writeValueAsString(run)
                + ";});return JSON.stringify(Array.from(card.querySelectorAll('." + table + " tr'))"
                + ".map(function(tr){return Array.from(tr.cells).map(function(x){return x.textContent;});}));})()"));
    }

    /**
     * The intake run's outlook against the detectors' own snapshot and the wall forecast of its save: one row
     * per equation with its status, its target, the iterations to target with their interval and the wall
     * time at the observed pace; one row per monitor with its predicted final value and remaining error.
     */
    private static void outlookShowsTheSave(Cdp cdp, LiveFeeds.Saved saved) throws Exception {
        JsonNode judge = JSON.valueToTree(saved.snapshot()).path("ConvergedDetector");
        JsonNode wall = JSON.valueToTree(saved.wall()).path("equations");
        JsonNode rows = cells(cdp, "intake", "fc-eq");
        assertEquals(List.of("equation", "target", "outlook", "iterations to target", "time to target"),
                JSON.convertValue(rows.get(0), List.class));
        JsonNode eqs = judge.path("equations");
        assertEquals(eqs.size() + 1, rows.size(), rows.toString());
        int i = 1;
        int converging = 0;
        for (Iterator<Map.Entry<String, JsonNode>> it = eqs.fields(); it.hasNext(); i++) {
            Map.Entry<String, JsonNode> e = it.next();
            JsonNode f = e.getValue();
            JsonNode row = rows.get(i);
            assertEquals(e.getKey(), row.get(0).asText());
            // the target to the three significant digits shown
            assertEquals(f.path("target").asDouble(), Double.parseDouble(row.get(1).asText()),
                    f.path("target").asDouble() * 5e-3, row.toString());
            assertTrue(row.get(2).asText().endsWith(" " + f.path("forecast").asText()), row.toString());
            if (f.path("forecast").asText().equals(RunForecast.CONVERGING)) {
                converging++;
                assertEquals(range(f.path("iterations").asDouble(), f.path("iterations_low").asDouble(),
                        f.path("iterations_high").asDouble(), v -> Long.toString(Math.round(v))), row.get(3).asText());
                JsonNode w = wall.path(e.getKey());
                assertEquals(range(w.path("seconds").asDouble(), w.path("seconds_low").asDouble(),
                        w.path("seconds_high").asDouble(), LivePageBrowserIT::span), row.get(4).asText());
            } else if (f.path("forecast").asText().equals(RunForecast.REACHED)) {
                assertEquals("at target", row.get(3).asText());
            }
        }
        assertTrue(converging > 0, "temp still falls towards 1e-5 at iteration 500: " + rows);
        String rate = cdp.eval("(function(){var card=Array.from(document.querySelectorAll('.run')).find(function(c)"
                + "{return c.querySelector('.name').textContent==='intake';});return card.querySelector('.outlook .rate')"
                + ".textContent;})()");
        assertTrue(rate.startsWith("times at 4 iterations/s, the pace of the last 2 min"), rate);

        JsonNode settled = JSON.valueToTree(saved.snapshot()).path("MonitorSettledDetector").path("monitors");
        JsonNode mons = cells(cdp, "intake", "fc-mon");
        assertEquals(settled.size() + 1, mons.size(), mons.toString());
        for (JsonNode row : mons) {
            if (row.get(0).asText().equals("monitor")) {
                continue;
            }
            JsonNode own = judge.path("monitors").has(row.get(0).asText())
                    ? judge.path("monitors").path(row.get(0).asText()) : settled.path(row.get(0).asText());
            assertEquals(own.path("state").asText(), row.get(1).asText());
            // shown to four or five significant digits
            for (int k : new int[] {3, 4}) {
                double want = own.path(k == 3 ? "predicted_final" : "remaining_error").asDouble();
                assertEquals(want, Double.parseDouble(row.get(k).asText()), Math.abs(want) * 1e-3, row.toString());
            }
        }
    }

    /** The page's "value (low–high)", the interval only when it reads differently from the value. */
    private static String range(double v, double lo, double hi, java.util.function.DoubleFunction<String> show) {
        String t = show.apply(v);
        String a = show.apply(Math.min(lo, hi));
        String b = show.apply(Math.max(lo, hi));
        return a.equals(t) && b.equals(t) ? t : t + " (" + a + "\u2013" + b + ")";
    }

    /** The page's wall time: seconds under two minutes, minutes under two hours, else hours and minutes. */
    private static String span(double seconds) {
        long s = Math.round(seconds);
        if (s < 120) {
            return s + " s";
        }
        long m = Math.round(s / 60.0);
        if (m < 120) {
            return m + " min";
        }
        return (m / 60) + " h " + String.format("%02d", m % 60) + " min";
    }

    /**
     * The residual plots' level lines, counted by the page in the canvas's own pixels along each line's row:
     * 1e-3 on every run's plot, and the target line on the run that has a residual target.
     */
    private static void levelLinesAreDrawn(JsonNode c) {
        Map<String, List<String>> byRun = new java.util.LinkedHashMap<>();
        for (JsonNode l : c.path("levels")) {
            // a dashed line one pixel high across a plot over 400 pixels wide: well over 100 of its pixels
            assertTrue(l.path("pixels").asInt() > 100, "level line drawn: " + l + " of " + c.path("levels"));
            byRun.computeIfAbsent(l.path("run").asText(), k -> new ArrayList<>()).add(l.path("label").asText());
        }
        assertEquals(List.of("loose 1e-3"), byRun.get("header"), c.toString());
        assertEquals(List.of("loose 1e-3"), byRun.get("fan <b>loop</b>"), c.toString());
        assertEquals(List.of("loose 1e-3", "target 1e-5"), byRun.get("intake"), c.toString());
    }

    @Test
    void livePageDrawsItsPlotsAndFollowsTheStreamWithoutErrors() throws Exception {
        Path chromium = chromium();
        RecordedRuns runs = new RecordedRuns();
        for (long i = 1; i <= 600; i++) {
            runs.record("header", SolverFeed.record(i), 1);
        }
        runs.state("header", RunStatus.FOLLOWING);
        runs.open("header", Patterns.STALLED_OSCILLATION);
        runs.event(new TimelineEvent(1, "header", EventType.DETECTION, Instant.parse("2026-12-02T02:10:00Z"), 420,
                "open", Severity.WARNING, Map.of("pattern", Patterns.STALLED_OSCILLATION,
                        "summary", "residuals bounce around 2e-3 with no downward trend")));
        // a second run, still catching up, with a name that must stay text
        for (long i = 1; i <= 300; i++) {
            double drag = 412.0 + 3.0 * Math.sin(i / 9.0);
            runs.record("fan <b>loop</b>", IterationRecord.steady(i,
                    new Samples(List.of("cont", "k"), new double[] {0.2 * Math.pow(0.99, i), 0.05 * Math.pow(0.993, i)}),
                    new Samples(List.of("drag", "swirl"), new double[] {drag, 0.3 + 1e-4 * i})), 1);
        }
        // a third run from the project's cavity solver (the converging run, 500 iterations), with the forecasts
        // and the residual target its save would give the live view, at a pace of 4 iterations per second
        List<IterationRecord> intake = Histories.run("converging", 500);
        for (IterationRecord r : intake) {
            runs.record("intake", r, 1);
        }
        runs.state("intake", RunStatus.FOLLOWING);
        LiveFeeds.Saved saved = LiveFeeds.save(intake, DetectSettings.defaults(), 4.0);
        runs.forecast("intake", saved.forecast());
        runs.residualTarget("intake", LiveFeeds.residualTarget(DetectSettings.defaults()));
        Vertx vertx = Vertx.vertx();
        Process browser = null;
        String token = "rooftop-array-9d";
        try (LiveServer live = LiveServerIT.get(LiveServer.start(vertx, "127.0.0.1:0", runs,
                new PrometheusMeterRegistry(PrometheusConfig.DEFAULT), token))) {
            Path profile = Files.createDirectory(tmp.resolve("profile"));
            Path log = tmp.resolve("chromium.log");
            browser = new ProcessBuilder(chromium.toString(), "--headless", "--no-sandbox", "--disable-gpu",
                    "--no-first-run", "--disable-background-networking", "--disable-component-update",
                    "--disable-sync", "--disable-quic", "--user-data-dir=" + profile, "--remote-debugging-port=0",
                    "--remote-debugging-address=127.0.0.1", "--remote-allow-origins=*", "--window-size=1360,1500",
                    "about:blank").redirectErrorStream(true).redirectOutput(log.toFile()).start();
            Path portFile = profile.resolve("DevToolsActivePort");
            Process b = browser;
            await().atMost(Duration.ofSeconds(60)).until(() -> {
                if (!b.isAlive()) {
                    throw new AssertionError("chromium exited: " + Files.readString(log));
                }
                return Files.exists(portFile) && Files.readAllLines(portFile).size() >= 1;
            });
            int port = Integer.parseInt(Files.readAllLines(portFile).get(0).trim());
            try (Cdp cdp = Cdp.connect(port)) {
                cdp.call("Emulation.setDeviceMetricsOverride", Map.of("width", 1360, "height", 1500,
                        "deviceScaleFactor", 1, "mobile", false));
                // journaled but not in the source's recent events the page loads (as when it is journaled after
                // the page's snapshot and before its stream connects): the stream must replay it
                live.onEvent(new TimelineEvent(2, "header", EventType.DETECTION, Instant.parse("2026-12-02T02:10:01Z"),
                        610, "resolved", Severity.INFO, Map.of("pattern", Patterns.STALLED_OSCILLATION,
                                "summary", "residuals fall again below 1e-3")));
                cdp.call("Page.navigate", Map.of("url", live.url() + "?token=" + token));
                // residuals + monitor plots: header 4 equations + 1 monitor, fan 2 equations + 2 monitors,
                // intake 4 equations + 3 monitors
                await().atMost(Duration.ofSeconds(60)).pollInterval(Duration.ofMillis(300)).ignoreExceptions()
                        .until(() -> check(cdp).path("charts").asInt() == 9 && check(cdp).path("nonBlank").asInt() == 9);

                // the page opens its event stream once its plots are built; progress sent before that is not
                // replayed (the stream's hello carries the state), so the writer starts once the stream is open
                await().atMost(Duration.ofSeconds(60)).pollInterval(Duration.ofMillis(100)).ignoreExceptions()
                        .until(() -> "open".equals(cdp.eval("document.getElementById('link').dataset.state || ''")));

                // the logs grow while the page is open
                Thread writer = new Thread(() -> {
                    for (long i = 601; i <= 900; i++) {
                        runs.record("header", SolverFeed.record(i), 1);
                        try {
                            Thread.sleep(4);
                        } catch (InterruptedException e) {
                            return;
                        }
                    }
                });
                writer.start();
                live.onEvent(new TimelineEvent(3, "header", EventType.NOTICE, Instant.parse("2026-12-02T02:10:03Z"),
                        640, "sent", Severity.WARNING, Map.of("channel", "ops-mail", "notice_id", "n-1",
                                "pattern", Patterns.STALLED_OSCILLATION)));
                writer.join();
                await().atMost(Duration.ofSeconds(60)).pollInterval(Duration.ofMillis(300)).ignoreExceptions()
                        .until(() -> cdp.eval("document.querySelector('.run .counts').textContent")
                                .startsWith("iteration 900 "));
                await().atMost(Duration.ofSeconds(30)).pollInterval(Duration.ofMillis(300)).ignoreExceptions()
                        .until(() -> check(cdp).path("livePoints").asInt() > 0 && check(cdp).path("timeline").asInt() == 2);

                JsonNode c = check(cdp);
                assertEquals(3, c.path("runs").asInt(), c.toString());
                assertEquals(9, c.path("canvases").asInt(), c.toString());
                assertEquals(9, c.path("nonBlank").asInt(), "canvases with series drawn: " + c);
                assertEquals(0, c.path("errors").size(), "errors caught in the page: " + c);
                assertTrue(c.path("progress").asInt() > 0, c.toString());
                String timeline = cdp.eval("document.querySelector('.run .timeline').textContent");
                assertTrue(timeline.contains("notice sent · ops-mail"), timeline);
                assertTrue(timeline.contains("residuals bounce around"), timeline);
                assertTrue(timeline.contains("residuals fall again below 1e-3"), "replayed to the page: " + timeline);
                assertEquals("[\"3\",\"2\",\"1\"]", cdp.eval("JSON.stringify(Array.from(document.querySelector('.run')"
                        + ".querySelectorAll('.timeline tr')).map(function(tr){return tr.dataset.seq;}))"), "newest first, each once");
                assertEquals("0", cdp.eval("String(document.querySelectorAll('main b').length)"),
                        "a run's name is shown as text, never as markup");
                assertTrue(cdp.eval("document.body.textContent").contains("fan <b>loop</b>"));
                assertEquals("live", cdp.eval("document.getElementById('link').textContent"));

                Path artifacts = buildDir().resolve("live-it");
                Files.createDirectories(artifacts);
                Path shot = artifacts.resolve("live.png");
                JsonNode png = cdp.call("Page.captureScreenshot", Map.of("format", "png"));
                Files.write(shot, Base64.getDecoder().decode(png.path("data").asText()));
                assertTrue(Files.size(shot) > 20_000, "screenshot " + shot);
                cdp.eval("(function(){document.querySelectorAll('.run')[2].scrollIntoView();return '';})()");
                JsonNode png2 = cdp.call("Page.captureScreenshot", Map.of("format", "png"));
                Files.write(artifacts.resolve("live-outlook.png"), Base64.getDecoder().decode(png2.path("data").asText()));

                outlookShowsTheSave(cdp, saved);
                levelLinesAreDrawn(c);

                List<String> problems = new ArrayList<>(cdp.problems);
                assertTrue(problems.isEmpty(), "console errors, exceptions or failed requests: " + problems);
            }
        } finally {
            if (browser != null) {
                browser.descendants().forEach(ProcessHandle::destroy);
                browser.destroy();
                if (!browser.waitFor(20, TimeUnit.SECONDS)) {
                    browser.descendants().forEach(ProcessHandle::destroyForcibly);
                    browser.destroyForcibly();
                }
            }
            vertx.close().toCompletionStage().toCompletableFuture().get(20, TimeUnit.SECONDS);
        }
    }
}
