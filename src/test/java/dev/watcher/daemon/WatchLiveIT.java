package dev.watcher.daemon;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.watcher.model.SecretRef;
import dev.watcher.model.WebhookSpec;
import dev.watcher.parse.Formats;
import dev.watcher.rules.RuleSet;
import dev.watcher.rules.RulesLoader;
import io.vertx.core.Vertx;
import io.vertx.core.http.HttpServer;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardOpenOption;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.concurrent.CopyOnWriteArrayList;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The daemon live, in one process: a log appended by another thread (records split across writes), a
 * NaN that reaches a real HTTP receiver as a notice through the quick webhook channel, and the silence
 * watchdog opening when the writer pauses and resolving when lines come back; the live view and metrics of
 * the same daemon show the run.
 */
class WatchLiveIT {

    private static final ObjectMapper JSON = new ObjectMapper();

    private static void append(Path log, String s) throws Exception {
        Files.writeString(log, s, StandardCharsets.UTF_8, StandardOpenOption.CREATE, StandardOpenOption.APPEND);
    }

    private static List<JsonNode> timeline(Path f) throws Exception {
        List<JsonNode> out = new ArrayList<>();
        if (Files.exists(f)) {
            for (String l : Files.readAllLines(f)) {
                out.add(JSON.readTree(l));
            }
        }
        return out;
    }

    private static boolean has(List<JsonNode> events, String pattern, String state) {
        return events.stream().anyMatch(e -> pattern.equals(e.path("pattern").asText(null))
                && state.equals(e.get("state").asText()) && e.get("type").asText().equals("detection"));
    }

    @Test
    void aNanReachesTheWebhookAndASilentLogOpensAndResolves(@TempDir Path dir) throws Exception {
        Vertx vertx = Vertx.vertx();
        List<JsonNode> received = new CopyOnWriteArrayList<>();
        HttpServer server = vertx.createHttpServer().requestHandler(req -> req.body().onSuccess(body -> {
            received.add(new io.vertx.core.json.JsonObject(body).mapTo(JsonNode.class));
            req.response().setStatusCode(204).end();
        })).listen(0, "127.0.0.1").await(10, TimeUnit.SECONDS);
        String url = "http://127.0.0.1:" + server.actualPort() + "/hook";
        Path rulesFile = dir.resolve("rules.yaml");
        Files.writeString(rulesFile, "kind: rules\nextends: default\ndelivery:\n  gather: 0\n");
        RuleSet rules = RulesLoader.load(rulesFile.toString(), Files.readString(rulesFile), RulesLoader.defaults());
        Path log = dir.resolve("fan.jsonl");
        Path state = dir.resolve("state");
        DaemonConfig c = new DaemonConfig(
                List.of(new RunSpec("fan", List.of(log), List.of(Formats.builtIn("jsonl")))), rules, Map.of(),
                List.of(new WebhookSpec("quick-webhook", SecretRef.ofLiteral(url), null, "native",
                        Duration.ofSeconds(5), 5, Duration.ofSeconds(1))),
                state, null, false, Map.of(), false, null, "127.0.0.1:0", null, false, Duration.ofMillis(50), Duration.ofMillis(200),
                Duration.ofSeconds(1), Duration.ofSeconds(5), new PrintStream(java.io.OutputStream.nullOutputStream()),
                true, null);
        Daemon daemon = new Daemon(c);
        Thread t = new Thread(() -> {
            try {
                daemon.run();
            } catch (Exception e) {
                throw new IllegalStateException(e);
            }
        });
        t.start();
        try {
            Path tl = state.resolve("timeline.jsonl");
            // the log does not exist yet: the daemon waits for it, and the watchdog is not armed
            Thread.sleep(1500);
            assertTrue(!has(timeline(tl), "log-silent", "open"), "no silence before the first record");
            for (int i = 1; i <= 40; i++) {
                String rec = "{\"iter\": " + i + ", \"residuals\": {\"cont\": " + Math.pow(10, -i / 20.0) + "}}\n";
                append(log, rec.substring(0, 10)); // a record split across two writes
                Thread.sleep(5);
                append(log, rec.substring(10));
                Thread.sleep(20);
            }
            // the writer pauses: after max(1 s, 20 x the median interval) the log is silent
            await().atMost(Duration.ofSeconds(20)).until(() -> has(timeline(tl), "log-silent", "open"));
            append(log, "{\"iter\": 41, \"residuals\": {\"cont\": \"NaN\"}}\n");
            await().atMost(Duration.ofSeconds(20)).until(() -> has(timeline(tl), "log-silent", "resolved"));
            await().atMost(Duration.ofSeconds(30)).until(() -> received.stream()
                    .anyMatch(n -> n.toString().contains("non-finite")));
            await().atMost(Duration.ofSeconds(10)).until(() -> timeline(tl).stream().anyMatch(e -> e.get("type")
                    .asText().equals("notice") && e.get("state").asText().equals("sent")));
            List<JsonNode> events = timeline(tl);
            TimelineContract.check(events);
            // the live view and metrics of the same daemon: its URL is in the run's first event
            String started = events.get(0).get("reason").asText();
            String base = started.substring(started.indexOf("live view at ") + "live view at ".length()).strip();
            java.net.http.HttpClient http = java.net.http.HttpClient.newHttpClient();
            String runs = http.send(java.net.http.HttpRequest.newBuilder(java.net.URI.create(base + "api/runs")).build(),
                    java.net.http.HttpResponse.BodyHandlers.ofString()).body();
            assertTrue(runs.contains("\"fan\"") && runs.contains("non-finite"), runs);
            String metrics = http.send(java.net.http.HttpRequest.newBuilder(java.net.URI.create(base + "metrics"))
                    .build(), java.net.http.HttpResponse.BodyHandlers.ofString()).body();
            assertTrue(metrics.lines().anyMatch(l -> l.startsWith("watcher_") && l.contains("run=\"fan\"")),
                    metrics);
            assertEquals(41, events.stream().filter(e -> e.get("type").asText().equals("detection"))
                    .filter(e -> e.get("pattern").asText().equals("non-finite")).findFirst().orElseThrow()
                    .get("iter").asLong());
            assertTrue(events.stream().noneMatch(e -> e.toString().contains(String.valueOf(server.actualPort()))
                    && e.toString().contains("/hook")), "the webhook URL is not written as it is");
        } finally {
            daemon.shutdown("test over");
            t.join(30_000);
            server.close();
            vertx.close();
        }
        assertTrue(!t.isAlive());
    }
}
