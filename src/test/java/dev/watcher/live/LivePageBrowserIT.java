package dev.watcher.live;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assertions.fail;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
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
import java.util.List;
import java.util.Map;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Assumptions;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The live page in a real headless Chromium (Debian's {@code chromium}), driven over the DevTools protocol:
 * the page loads through the token, draws its plots (its self-check counts canvases with series pixels),
 * follows the event stream while records arrive, shows no console error, uncaught exception or failed
 * request, and leaves a screenshot under the build directory ({@code live-it/live.png}).
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
                cdp.call("Page.navigate", Map.of("url", live.url() + "?token=" + token));
                // residuals + monitor plots: header 4 equations + 1 monitor, fan 2 equations + 2 monitors
                await().atMost(Duration.ofSeconds(60)).pollInterval(Duration.ofMillis(300)).ignoreExceptions()
                        .until(() -> check(cdp).path("charts").asInt() == 5 && check(cdp).path("nonBlank").asInt() == 5);

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
                live.onEvent(new TimelineEvent(2, "header", EventType.NOTICE, Instant.parse("2026-12-02T02:10:03Z"),
                        640, "sent", Severity.WARNING, Map.of("channel", "ops-mail", "notice_id", "n-1",
                                "pattern", Patterns.STALLED_OSCILLATION)));
                writer.join();
                await().atMost(Duration.ofSeconds(60)).pollInterval(Duration.ofMillis(300)).ignoreExceptions()
                        .until(() -> cdp.eval("document.querySelector('.run .counts').textContent")
                                .startsWith("iteration 900 "));
                await().atMost(Duration.ofSeconds(30)).pollInterval(Duration.ofMillis(300)).ignoreExceptions()
                        .until(() -> check(cdp).path("livePoints").asInt() > 0 && check(cdp).path("timeline").asInt() == 1);

                JsonNode c = check(cdp);
                assertEquals(2, c.path("runs").asInt(), c.toString());
                assertEquals(5, c.path("canvases").asInt(), c.toString());
                assertEquals(5, c.path("nonBlank").asInt(), "canvases with series drawn: " + c);
                assertEquals(0, c.path("errors").size(), "errors caught in the page: " + c);
                assertTrue(c.path("progress").asInt() > 0, c.toString());
                String timeline = cdp.eval("document.querySelector('.run .timeline').textContent");
                assertTrue(timeline.contains("notice sent · ops-mail"), timeline);
                assertTrue(timeline.contains("residuals bounce around"), timeline);
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
