package dev.watcher.live;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.LineParser;
import dev.watcher.model.Malformed;
import dev.watcher.model.ParseSink;
import dev.watcher.model.TailPosition;
import dev.watcher.parse.Formats;
import dev.watcher.tail.FileFollower;
import dev.watcher.tail.TailOptions;
import io.micrometer.prometheusmetrics.PrometheusConfig;
import io.micrometer.prometheusmetrics.PrometheusMeterRegistry;
import io.vertx.core.Vertx;
import io.vertx.core.http.HttpClient;
import io.vertx.core.http.HttpClientResponse;
import io.vertx.core.http.HttpMethod;
import java.io.Writer;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardOpenOption;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicBoolean;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The event stream while a real log grows: a writer appends JSON Lines to a file, the tail stage's
 * follower reads it and the built-in jsonl parser makes records, which reach the page's stream through the
 * source, as in the daemon.
 */
class LogGrowthStreamIT {

    private static final ObjectMapper JSON = new ObjectMapper();

    @TempDir
    Path tmp;

    @Test
    void streamFollowsALogAsItGrowsIncludingAMalformedLine() throws Exception {
        Path log = tmp.resolve("header.jsonl");
        Files.createFile(log);
        RecordedRuns runs = new RecordedRuns();
        LineParser parser = Formats.builtIn("jsonl").newParser();
        ParseSink sink = new ParseSink() {
            @Override
            public void record(IterationRecord r) {
                runs.record("header", r, 1);
            }

            @Override
            public void segment(int segment, long line, String reason) {
            }

            @Override
            public void malformed(Malformed kind, long line, String detail) {
                runs.malformed("header", kind);
            }
        };
        AtomicBoolean reading = new AtomicBoolean(true);
        Thread reader = new Thread(() -> {
            try (FileFollower f = new FileFollower(log, TailPosition.START,
                    TailOptions.DEFAULTS.withPoll(Duration.ofMillis(20), Duration.ofMillis(50)))) {
                while (reading.get()) {
                    f.poll((line, no) -> parser.accept(line, no, sink));
                    Thread.sleep(20);
                }
                f.poll((line, no) -> parser.accept(line, no, sink));
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
            }
        });
        reader.start();

        Vertx vertx = Vertx.vertx();
        try (LiveServer live = LiveServerIT.get(LiveServer.start(vertx, "127.0.0.1:0", runs,
                new PrometheusMeterRegistry(PrometheusConfig.DEFAULT), null))) {
            HttpClient client = vertx.createHttpClient();
            Sse sse = new Sse();
            HttpClientResponse resp = LiveServerIT.get(client.request(HttpMethod.GET, live.port(), "127.0.0.1",
                    "/events").compose(r -> r.send()).map(r -> r.handler(b -> sse.feed(b.toString()))));
            assertEquals(200, resp.statusCode());

            try (Writer w = Files.newBufferedWriter(log, StandardCharsets.UTF_8, StandardOpenOption.APPEND)) {
                for (int i = 1; i <= 400; i++) {
                    IterationRecord r = SolverFeed.record(i);
                    StringBuilder line = new StringBuilder("{\"iter\": ").append(i).append(", \"residuals\": {");
                    for (int k = 0; k < r.residuals().size(); k++) {
                        line.append(k == 0 ? "" : ", ").append('"').append(r.residuals().name(k)).append("\": ")
                                .append(String.format(Locale.ROOT, "%.6e", r.residuals().value(k)));
                    }
                    line.append("}, \"monitors\": {\"outlet-temp\": ")
                            .append(String.format(Locale.ROOT, "%.4f", r.monitors().value(0))).append("}}\n");
                    w.write(line.toString());
                    if (i == 200) {
                        w.write("{\"iter\": 200.5, \"residuals\": \n"); // a broken line, counted and skipped
                    }
                    if (i % 20 == 0) {
                        w.flush();
                        Thread.sleep(25);
                    }
                }
            }
            await().atMost(Duration.ofSeconds(30)).until(() -> last(sse) != null && last(sse).path("iter").asLong() == 400
                    && last(sse).path("lines").asLong() == 401);
            JsonNode end = last(sse);
            assertEquals(400, end.path("records").asLong());
            long bad = 0;
            for (JsonNode n : end.path("malformed")) {
                bad += n.asLong(); // which kind is the parser's judgement; the count is ours
            }
            assertEquals(1, bad, end.toString());
            assertEquals(String.format(Locale.ROOT, "%.6e", SolverFeed.record(400).residuals().value(0)),
                    String.format(Locale.ROOT, "%.6e", end.path("residuals").path("cont").asDouble()));
            List<Long> iters = new ArrayList<>();
            for (Sse.Message m : sse.messages()) {
                if (m.event().equals("progress")) {
                    iters.add(JSON.readTree(m.data()).path("iter").asLong());
                }
            }
            assertTrue(iters.size() >= 2, "the stream showed the log growing, not only its end: " + iters);
            for (int i = 1; i < iters.size(); i++) {
                assertTrue(iters.get(i) >= iters.get(i - 1), "in order: " + iters);
            }
            LiveServerIT.get(client.close());
        } finally {
            reading.set(false);
            reader.join(10_000);
            vertx.close().toCompletionStage().toCompletableFuture().get(20, TimeUnit.SECONDS);
        }
    }

    private static JsonNode last(Sse sse) throws Exception {
        JsonNode out = null;
        for (Sse.Message m : sse.messages()) {
            if (m.event().equals("progress")) {
                out = JSON.readTree(m.data());
            }
        }
        return out;
    }
}
