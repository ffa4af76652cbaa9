package dev.watcher.live;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assertions.fail;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.watcher.model.IterationRecord;
import io.micrometer.prometheusmetrics.PrometheusConfig;
import io.micrometer.prometheusmetrics.PrometheusMeterRegistry;
import io.vertx.core.Vertx;
import java.io.File;
import java.net.InetAddress;
import java.net.ServerSocket;
import java.net.URI;
import java.net.URLEncoder;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.HashMap;
import java.util.Map;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Assumptions;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * A real Prometheus server (Debian's {@code prometheus}) scrapes the live view on 127.0.0.1, with the
 * token as its bearer credentials, and answers a query for the residual series through its HTTP API
 * ({@code /api/v1/query}, documented in Prometheus's "HTTP API" page). The shipped scrape example passes
 * {@code promtool check config}.
 *
 * <p>With the environment variable {@code CI} set, a missing prometheus fails the test
 * ({@code .ci/up.d/30-prometheus.sh} installs it); elsewhere the test is skipped.
 */
class PrometheusScrapeIT {

    private static final ObjectMapper JSON = new ObjectMapper();

    @TempDir
    Path tmp;

    static Path tool(String name) {
        for (String dir : System.getenv().getOrDefault("PATH", "/usr/bin").split(File.pathSeparator)) {
            Path p = Path.of(dir, name);
            if (Files.isExecutable(p)) {
                return p;
            }
        }
        if (System.getenv("CI") != null) {
            fail(name + " is not installed (.ci/up.d/30-prometheus.sh installs it)");
        }
        Assumptions.abort(name + " is not installed; skipped outside CI");
        return null;
    }

    private static int freePort() throws Exception {
        try (ServerSocket s = new ServerSocket(0, 1, InetAddress.getLoopbackAddress())) {
            return s.getLocalPort();
        }
    }

    @Test
    void realPrometheusScrapesTheResidualSeriesWithTheToken() throws Exception {
        Path prometheus = tool("prometheus");
        RecordedRuns runs = new RecordedRuns();
        for (long i = 1; i <= 400; i++) {
            runs.record("header", SolverFeed.record(i), 1);
        }
        IterationRecord last = SolverFeed.record(400);
        Vertx vertx = Vertx.vertx();
        Process p = null;
        PrometheusMeterRegistry registry = new PrometheusMeterRegistry(PrometheusConfig.DEFAULT);
        WatcherMetrics.commonTags(registry, "node-a");
        String token = "header-scrape-5Jk9";
        try (LiveServer live = LiveServerIT.get(LiveServer.start(vertx, "127.0.0.1:0", runs, registry, token))) {
            int promPort = freePort();
            Path tokenFile = tmp.resolve("token");
            Files.writeString(tokenFile, token);
            Path config = tmp.resolve("prometheus.yml");
            Files.writeString(config, String.join("\n",
                    "global:",
                    "  scrape_interval: 1s",
                    "  evaluation_interval: 1s",
                    "scrape_configs:",
                    "  - job_name: watcher",
                    "    metrics_path: /metrics",
                    "    authorization:",
                    "      type: Bearer",
                    "      credentials_file: " + tokenFile,
                    "    static_configs:",
                    "      - targets: ['127.0.0.1:" + live.port() + "']",
                    ""));
            Path log = tmp.resolve("prometheus.log");
            p = new ProcessBuilder(prometheus.toString(), "--config.file=" + config,
                    "--storage.tsdb.path=" + tmp.resolve("data"), "--web.listen-address=127.0.0.1:" + promPort)
                    .redirectErrorStream(true).redirectOutput(log.toFile()).start();
            HttpClient http = HttpClient.newBuilder().connectTimeout(Duration.ofSeconds(5)).build();
            String base = "http://127.0.0.1:" + promPort;
            Process proc = p;
            await().atMost(Duration.ofSeconds(90)).pollInterval(Duration.ofMillis(500)).ignoreExceptions()
                    .until(() -> {
                        if (!proc.isAlive()) {
                            throw new AssertionError("prometheus exited: " + Files.readString(log));
                        }
                        JsonNode targets = get(http, base + "/api/v1/targets").path("data").path("activeTargets");
                        return targets.size() == 1 && targets.get(0).path("health").asText().equals("up");
                    });
            String q = URLEncoder.encode("watcher_residual{run=\"header\"}", StandardCharsets.UTF_8);
            Map<String, Double> found = new HashMap<>();
            await().atMost(Duration.ofSeconds(60)).pollInterval(Duration.ofMillis(500)).ignoreExceptions()
                    .until(() -> {
                        found.clear();
                        JsonNode res = get(http, base + "/api/v1/query?query=" + q).path("data").path("result");
                        for (JsonNode r : res) {
                            found.put(r.path("metric").path("equation").asText(),
                                    Double.parseDouble(r.path("value").get(1).asText()));
                            assertEquals("node-a", r.path("metric").path("host").asText());
                            assertEquals("watcher", r.path("metric").path("job").asText());
                        }
                        return found.size() == last.residuals().size();
                    });
            for (int i = 0; i < last.residuals().size(); i++) {
                double v = found.get(last.residuals().name(i));
                assertEquals(last.residuals().value(i), v, Math.abs(v) * 1e-12, last.residuals().name(i));
            }
        } finally {
            if (p != null) {
                p.destroy();
                if (!p.waitFor(20, TimeUnit.SECONDS)) {
                    p.destroyForcibly();
                }
            }
            vertx.close().toCompletionStage().toCompletableFuture().get(20, TimeUnit.SECONDS);
        }
    }

    @Test
    void shippedScrapeExamplePassesPromtool() throws Exception {
        Path promtool = tool("promtool");
        Process p = new ProcessBuilder(promtool.toString(), "check", "config",
                Path.of("deploy/prometheus/watcher-scrape.yml").toAbsolutePath().toString())
                .redirectErrorStream(true).start();
        String out = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
        assertTrue(p.waitFor(60, TimeUnit.SECONDS), "promtool finished");
        assertEquals(0, p.exitValue(), out);
    }

    private static JsonNode get(HttpClient http, String url) throws Exception {
        HttpResponse<String> r = http.send(HttpRequest.newBuilder(URI.create(url)).timeout(Duration.ofSeconds(5))
                .build(), HttpResponse.BodyHandlers.ofString());
        if (r.statusCode() != 200) {
            throw new IllegalStateException(url + " answered " + r.statusCode() + ": " + r.body());
        }
        return JSON.readTree(r.body());
    }
}
