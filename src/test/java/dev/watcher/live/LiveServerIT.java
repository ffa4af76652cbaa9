package dev.watcher.live;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.watcher.daemon.LiveFeeds;
import dev.watcher.demo.Histories;
import dev.watcher.detect.DetectSettings;
import dev.watcher.model.EventType;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.Malformed;
import dev.watcher.model.Patterns;
import dev.watcher.model.Severity;
import dev.watcher.model.TimelineEvent;
import io.micrometer.prometheusmetrics.PrometheusConfig;
import io.micrometer.prometheusmetrics.PrometheusMeterRegistry;
import io.vertx.core.Future;
import io.vertx.core.MultiMap;
import io.vertx.core.Vertx;
import io.vertx.core.buffer.Buffer;
import io.vertx.core.http.HttpClient;
import io.vertx.core.http.HttpClientOptions;
import io.vertx.core.http.HttpClientResponse;
import io.vertx.core.http.HttpMethod;
import io.vertx.core.http.RequestOptions;
import java.io.InputStream;
import java.net.URLEncoder;
import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.Iterator;
import java.util.List;
import java.util.Map;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;

/** The live server on 127.0.0.1 with a real HTTP client: event stream, API, metrics, access and assets. */
class LiveServerIT {

    private static final ObjectMapper JSON = new ObjectMapper();

    private Vertx vertx;
    private HttpClient client;
    private final RecordedRuns runs = new RecordedRuns();
    private final List<LiveServer> servers = new ArrayList<>();

    @BeforeEach
    void setUp() {
        vertx = Vertx.vertx();
        // a fresh connection per request: no test depends on a kept-alive connection the server may close
        client = vertx.createHttpClient(new HttpClientOptions().setKeepAlive(false));
    }

    @AfterEach
    void tearDown() throws Exception {
        servers.forEach(LiveServer::close);
        get(client.close());
        get(vertx.close());
    }

    static <T> T get(Future<T> f) throws Exception {
        return f.toCompletionStage().toCompletableFuture().get(20, TimeUnit.SECONDS);
    }

    private LiveServer start(String hostPort, String token, PrometheusMeterRegistry registry) throws Exception {
        LiveServer s = get(LiveServer.start(vertx, hostPort, runs, registry, token));
        servers.add(s);
        return s;
    }

    private LiveServer start(String token) throws Exception {
        return start("127.0.0.1:0", token, new PrometheusMeterRegistry(PrometheusConfig.DEFAULT));
    }

    record Reply(int status, MultiMap headers, Buffer body) {
        String text() {
            return body.toString();
        }
    }

    private Reply fetch(LiveServer s, String path, String bearer) throws Exception {
        RequestOptions o = new RequestOptions().setHost("127.0.0.1").setPort(s.port()).setURI(path)
                .setMethod(HttpMethod.GET);
        if (bearer != null) {
            o.putHeader("Authorization", "Bearer " + bearer);
        }
        return get(client.request(o).compose(r -> r.send()).compose(
                (HttpClientResponse r) -> r.body().map(b -> new Reply(r.statusCode(), r.headers(), b))));
    }

    private static TimelineEvent detection(long seq, String run, long iter, String pattern) {
        return new TimelineEvent(seq, run, EventType.DETECTION, Instant.parse("2026-12-02T03:04:05.678Z"), iter,
                "open", Severity.CRITICAL, Map.of("pattern", pattern, "summary", "temp rising while the rest fall"));
    }

    @Test
    void portZeroGivesARealPortInTheUrl() throws Exception {
        LiveServer s = start(null);
        assertNotEquals(0, s.port());
        assertEquals("http://127.0.0.1:" + s.port() + "/", s.url());
        assertEquals(200, fetch(s, "/health", null).status());
    }

    @Test
    void eventStreamCarriesEachRunsProgressAndTimelineEventsWhileRecordsArrive() throws Exception {
        runs.record("header", SolverFeed.record(1), 2);
        LiveServer s = start(null);
        Sse sse = new Sse();
        // the body handler is set on the response's own context before any chunk can arrive
        HttpClientResponse resp = get(client.request(HttpMethod.GET, s.port(), "127.0.0.1", "/events")
                .compose(r -> r.send()).map(r -> r.handler(b -> sse.feed(b.toString()))));
        assertEquals(200, resp.statusCode());
        assertTrue(resp.getHeader("Content-Type").startsWith("text/event-stream"), resp.getHeader("Content-Type"));
        await().atMost(Duration.ofSeconds(20)).until(() -> !sse.messages().isEmpty());
        assertEquals("hello", sse.messages().get(0).event());
        assertEquals("header", JSON.readTree(sse.messages().get(0).data()).get(0).path("run").asText());

        // the log grows: records arrive one by one from another thread, as the run's thread would give them
        Thread writer = new Thread(() -> {
            for (long i = 2; i <= 300; i++) {
                runs.record("header", SolverFeed.record(i), 2);
                if (i == 150) {
                    runs.state("header", RunStatus.FOLLOWING);
                    runs.malformed("header", Malformed.BAD_NUMBER);
                }
                try {
                    Thread.sleep(3);
                } catch (InterruptedException e) {
                    return;
                }
            }
        });
        writer.start();
        TimelineEvent blowup = detection(7, "header", 120, Patterns.SINGLE_EQUATION_BLOWUP);
        s.onEvent(blowup);
        writer.join();

        await().atMost(Duration.ofSeconds(20)).until(() -> progress(sse).stream()
                .anyMatch(n -> n.path("iter").asLong() == 300));
        List<JsonNode> progress = progress(sse);
        long previous = 0;
        for (JsonNode n : progress) {
            assertEquals("header", n.path("run").asText());
            assertTrue(n.path("iter").asLong() > previous, "each summary is news: " + progress);
            previous = n.path("iter").asLong();
        }
        JsonNode last = progress.get(progress.size() - 1);
        IterationRecord r300 = SolverFeed.record(300);
        assertEquals("following", last.path("state").asText());
        assertEquals(300, last.path("records").asLong());
        assertEquals(2 * 300 + 1, last.path("lines").asLong());
        assertEquals(1, last.path("malformed").path("bad-number").asLong());
        for (int i = 0; i < r300.residuals().size(); i++) {
            assertEquals(r300.residuals().value(i), last.path("residuals").path(r300.residuals().name(i)).asDouble());
        }
        assertEquals(r300.monitors().value(0), last.path("monitors").path("outlet-temp").asDouble());

        List<Sse.Message> timeline = sse.messages().stream().filter(m -> m.event().equals("timeline")).toList();
        assertEquals(1, timeline.size());
        JsonNode ev = JSON.readTree(timeline.get(0).data());
        assertEquals(7, ev.path("seq").asLong());
        assertEquals("detection", ev.path("type").asText());
        assertEquals("single-equation-blowup", ev.path("pattern").asText());
        assertEquals("2026-12-02T03:04:05.678Z", ev.path("at").asText());
        assertEquals("critical", ev.path("severity").asText());
        resp.request().connection().close();
    }

    /** Opens the event stream at {@code path}, with a {@code Last-Event-ID} header when it is not null. */
    private Stream open(LiveServer s, String path, String lastEventId) throws Exception {
        Sse sse = new Sse();
        RequestOptions o = new RequestOptions().setHost("127.0.0.1").setPort(s.port()).setURI(path)
                .setMethod(HttpMethod.GET);
        if (lastEventId != null) {
            o.putHeader("Last-Event-ID", lastEventId);
        }
        HttpClientResponse resp = get(client.request(o).compose(r -> r.send())
                .map(r -> r.handler(b -> sse.feed(b.toString()))));
        assertEquals(200, resp.statusCode());
        return new Stream(sse, resp);
    }

    private record Stream(Sse sse, HttpClientResponse response) {
        List<Sse.Message> timeline() {
            return sse.messages().stream().filter(m -> m.event().equals("timeline")).toList();
        }

        void close() {
            response.request().connection().close();
        }
    }

    private static long seq(Sse.Message m) throws Exception {
        return JSON.readTree(m.data()).path("seq").asLong();
    }

    private static List<String> runSeqs(List<Sse.Message> ms) throws Exception {
        List<String> out = new ArrayList<>();
        for (Sse.Message m : ms) {
            JsonNode n = JSON.readTree(m.data());
            out.add(n.path("run").asText() + "#" + n.path("seq").asLong());
        }
        return out;
    }

    /** The daemon's journal hands each event to the source (the page's snapshot) and then to the server. */
    private static void journal(RecordedRuns runs, LiveServer s, TimelineEvent e) {
        runs.event(e);
        s.onEvent(e);
    }

    /**
     * Regression: the page takes its snapshot (the runs' recent events), builds its plots and only then opens
     * the stream; an event journaled in between was neither in the snapshot nor streamed to it. The client here
     * does what the page does: it names the highest seq of each run in its snapshot ({@code after}); and, when
     * it reconnects, the last event id it received in the standard {@code Last-Event-ID} header (HTML Living
     * Standard, "Server-sent events": the id field sets the last event ID, which a reconnecting EventSource
     * sends in that header).
     */
    @Test
    void eventsJournaledBetweenTheSnapshotAndTheStreamReachTheClientAndAReconnectLosesNothing() throws Exception {
        String fan = "fan: loop, 2%";
        runs.record("header", SolverFeed.record(1), 1);
        runs.record(fan, SolverFeed.record(1), 1);
        LiveServer s = start(null);
        for (long k = 1; k <= 3; k++) {
            journal(runs, s, detection(k, "header", 10 * k, Patterns.RESIDUAL_LEVEL));
        }
        journal(runs, s, detection(1, fan, 5, Patterns.RESIDUAL_LEVEL));

        // the snapshot: header up to seq 3, fan up to seq 1
        JsonNode snapshot = JSON.readTree(fetch(s, "/api/events?run=header&max=50", null).text());
        long headerSeen = snapshot.get(snapshot.size() - 1).path("seq").asLong();
        assertEquals(3, headerSeen);
        JsonNode fanSnapshot = JSON.readTree(fetch(s, "/api/events?run=" + URLEncoder.encode(fan, StandardCharsets.UTF_8)
                + "&max=50", null).text());
        assertEquals(1, fanSnapshot.size());

        // journaled after the snapshot, before the stream connects
        journal(runs, s, detection(4, "header", 40, Patterns.SINGLE_EQUATION_BLOWUP));
        journal(runs, s, detection(2, fan, 41, Patterns.STALLED_OSCILLATION));

        String after = URLEncoder.encode(URLEncoder.encode("header", StandardCharsets.UTF_8) + ":" + headerSeen + ","
                + URLEncoder.encode(fan, StandardCharsets.UTF_8) + ":1", StandardCharsets.UTF_8);
        Stream first = open(s, "/events?after=" + after, null);
        await().atMost(Duration.ofSeconds(20)).until(() -> first.timeline().size() >= 2);
        assertEquals("hello", first.sse().messages().get(0).event(), "the state first, then what was missed");
        assertEquals(List.of("header#4", fan + "#2"), runSeqs(first.timeline()), "only what the snapshot lacks");
        assertEquals("header:4", first.timeline().get(0).lastEventId());
        assertEquals(URLEncoder.encode(fan, StandardCharsets.UTF_8) + ":2", first.timeline().get(1).lastEventId());

        // live from here on
        journal(runs, s, detection(5, "header", 50, Patterns.RESIDUAL_LEVEL));
        await().atMost(Duration.ofSeconds(20)).until(() -> first.timeline().size() >= 3);
        assertEquals(5, seq(first.timeline().get(2)));
        String lastId = first.timeline().get(2).lastEventId();
        assertEquals("header:5", lastId);
        first.close();

        // the connection drops; two events are journaled meanwhile; the client comes back as EventSource does:
        // the same URL (its after is stale now) and the last event id it received
        journal(runs, s, detection(3, fan, 55, Patterns.RESIDUAL_LEVEL));
        journal(runs, s, detection(6, "header", 60, Patterns.RESIDUAL_LEVEL));
        Stream again = open(s, "/events?after=" + after, lastId);
        await().atMost(Duration.ofSeconds(20)).until(() -> again.timeline().size() >= 2);
        journal(runs, s, detection(7, "header", 70, Patterns.RESIDUAL_LEVEL));
        await().atMost(Duration.ofSeconds(20)).until(() -> again.timeline().size() >= 3);
        assertEquals(List.of(fan + "#3", "header#6", "header#7"), runSeqs(again.timeline()),
                "what came after the last event received, in the order written, then live");
        again.close();

        // a client naming no position gets the live stream only, as before
        Stream plain = open(s, "/events", null);
        await().atMost(Duration.ofSeconds(20)).until(() -> !plain.sse().messages().isEmpty());
        journal(runs, s, detection(8, "header", 80, Patterns.RESIDUAL_LEVEL));
        await().atMost(Duration.ofSeconds(20)).until(() -> !plain.timeline().isEmpty());
        assertEquals(List.of("header#8"), runSeqs(plain.timeline()));
        plain.close();
    }

    private static List<JsonNode> progress(Sse sse) throws Exception {
        List<JsonNode> out = new ArrayList<>();
        for (Sse.Message m : sse.messages()) {
            if (m.event().equals("progress")) {
                out.add(JSON.readTree(m.data()));
            }
        }
        return out;
    }

    @Test
    void apiServesRunsPlotsAndRecentEventsFromTheSource() throws Exception {
        for (long i = 1; i <= 2000; i++) {
            runs.record("header", SolverFeed.record(i), 1);
        }
        runs.record("fan", IterationRecord.steady(5, dev.watcher.model.Samples.of(Map.of("cont", Double.NaN)), null), 1);
        runs.open("header", Patterns.STALLED_OSCILLATION);
        for (int k = 1; k <= 5; k++) {
            runs.event(detection(k, "header", 100L * k, Patterns.RESIDUAL_LEVEL));
        }
        LiveServer s = start(null);

        JsonNode list = JSON.readTree(fetch(s, "/api/runs", null).text());
        assertEquals(2, list.size());
        assertEquals("header", list.get(0).path("run").asText());
        assertEquals(2000, list.get(0).path("iter").asLong());
        assertEquals("stalled-oscillation", list.get(0).path("open").get(0).asText());
        assertEquals("NaN", list.get(1).path("residuals").path("cont").asText(), "NaN travels as a string");

        JsonNode plots = JSON.readTree(fetch(s, "/api/plots?run=header", null).text());
        RunPlots expected = runs.plots("header").orElseThrow();
        assertEquals(SolverFeed.EQUATIONS.size(), plots.path("residuals").size());
        JsonNode cont = plots.path("residuals").get(0);
        assertEquals("cont", cont.path("name").asText());
        long[] x = new long[cont.path("x").size()];
        for (int i = 0; i < x.length; i++) {
            x[i] = cont.path("x").get(i).asLong();
        }
        assertArrayEquals(expected.residuals().get(0).x(), x);
        assertEquals(404, fetch(s, "/api/plots?run=nobody", null).status());

        JsonNode events = JSON.readTree(fetch(s, "/api/events?run=header&max=3", null).text());
        assertEquals(3, events.size());
        assertEquals(3, events.get(0).path("seq").asLong());
        assertEquals(5, events.get(2).path("seq").asLong());

        JsonNode health = JSON.readTree(fetch(s, "/health", null).text());
        assertEquals("up", health.path("status").asText());
        assertEquals(2, health.path("runs").asInt());
    }

    /** Records of the project's cavity solver, the converging run, and the number of them a save had seen. */
    private static final int SAVED_AT = 500;
    /** The pace of the live run the wall forecast observed: iterations per second. */
    private static final double PACE = 4.0;

    @Test
    void forecastsOfTheLastSaveReachTheApiAndTheStreamAndThePlotsCarryTheirLevelLines() throws Exception {
        // A history of real numerics (the project's cavity solver): after 500 iterations of the converging run
        // cont, mom-x and mom-y are below 1e-5 and temp still falls; the monitors have a predicted final value.
        List<IterationRecord> history = Histories.run("converging", SAVED_AT);
        for (IterationRecord r : history.subList(0, SAVED_AT)) {
            runs.record("intake", r, 1);
        }
        runs.state("intake", RunStatus.FOLLOWING);
        LiveFeeds.Saved saved = LiveFeeds.save(history.subList(0, SAVED_AT), DetectSettings.defaults(), PACE);
        runs.residualTarget("intake", LiveFeeds.residualTarget(DetectSettings.defaults()));
        LiveServer s = start(null);

        // before the first save: the status carries an empty forecast
        JsonNode before = JSON.readTree(fetch(s, "/api/runs", null).text()).get(0).path("forecast");
        assertEquals(0, before.path("equations").size(), before.toString());
        assertTrue(!before.has("iterations_per_second"), before.toString());

        Sse sse = new Sse();
        HttpClientResponse resp = get(client.request(HttpMethod.GET, s.port(), "127.0.0.1", "/events")
                .compose(r -> r.send()).map(r -> r.handler(b -> sse.feed(b.toString()))));
        await().atMost(Duration.ofSeconds(20)).until(() -> !sse.messages().isEmpty());
        // the save arrives: only the forecast changes, and that alone is news for the stream
        runs.forecast("intake", saved.forecast());
        await().atMost(Duration.ofSeconds(20)).until(() -> progress(sse).stream()
                .anyMatch(n -> n.path("forecast").path("equations").size() > 0));
        JsonNode streamed = progress(sse).stream().filter(n -> n.path("forecast").path("equations").size() > 0)
                .findFirst().orElseThrow().path("forecast");
        JsonNode api = JSON.readTree(fetch(s, "/api/runs", null).text()).get(0).path("forecast");
        assertEquals(api, streamed, "the stream and the API carry the same forecast");
        resp.request().connection().close();

        // against the detectors' own snapshot of the same records (read here from the snapshot maps)
        JsonNode snap = JSON.valueToTree(saved.snapshot());
        JsonNode wall = JSON.valueToTree(saved.wall());
        JsonNode judge = snap.path("ConvergedDetector");
        assertEquals(judge.path("verdict").asText(), api.path("verdict").asText());
        double rate = api.path("iterations_per_second").asDouble();
        assertEquals(PACE, rate, 1e-9, "the pace the log was written at: " + api);
        assertEquals(120, api.path("rate_seconds").asDouble(), 1e-9, "the two minutes observed");
        JsonNode eqs = judge.path("equations");
        assertEquals(eqs.size(), api.path("equations").size());
        int i = 0;
        int converging = 0;
        int reached = 0;
        for (Iterator<Map.Entry<String, JsonNode>> it = eqs.fields(); it.hasNext(); i++) {
            Map.Entry<String, JsonNode> e = it.next();
            JsonNode f = e.getValue();
            JsonNode row = api.path("equations").get(i);
            assertEquals(e.getKey(), row.path("name").asText(), "the log's order");
            assertEquals(f.path("forecast").asText(), row.path("status").asText(), e.getKey());
            assertEquals(f.path("target").asDouble(), row.path("target").asDouble(), e.getKey());
            switch (row.path("status").asText()) {
                case RunForecast.CONVERGING -> {
                    converging++;
                    for (String k : new String[] {"", "_low", "_high"}) {
                        double iterations = f.path("iterations" + k).asDouble();
                        assertEquals(iterations, row.path("iterations" + k).asDouble(), e.getKey() + k);
                        assertEquals(wall.path("equations").path(e.getKey()).path("seconds" + k).asDouble(),
                                row.path("seconds" + k).asDouble(), e.getKey() + k);
                        // whole seconds at the observed pace
                        assertEquals(iterations / PACE, row.path("seconds" + k).asDouble(), 0.5, e.getKey() + k);
                    }
                }
                case RunForecast.REACHED -> {
                    reached++;
                    assertTrue(f.path("residual").asDouble() <= f.path("target").asDouble(), e.getKey() + " " + f);
                    assertEquals(0, row.path("iterations").asDouble(), e.getKey());
                }
                default -> assertTrue(!row.has("seconds"), "no time without a forecast in iterations: " + row);
            }
        }
        // cont, mom-x, mom-y under 1e-5 by iteration 500 and temp still above (the solver's own history)
        assertTrue(converging > 0 && reached > 0, api.toString());

        JsonNode settled = snap.path("MonitorSettledDetector").path("monitors");
        assertEquals(history.get(0).monitors().size(), api.path("monitors").size(), api.toString());
        for (JsonNode m : api.path("monitors")) {
            JsonNode own = judge.path("monitors").has(m.path("name").asText())
                    ? judge.path("monitors").path(m.path("name").asText()) : settled.path(m.path("name").asText());
            assertTrue(!own.isMissingNode(), m.toString());
            assertEquals(own.path("state").asText(), m.path("state").asText());
            assertEquals(own.path("predicted_final").asDouble(), m.path("predicted_final").asDouble(), m.toString());
            assertEquals(own.path("remaining_error").asDouble(), m.path("remaining_error").asDouble(), m.toString());
        }

        // the residual plot's level lines: 1e-3 and the target the judge used for every equation
        JsonNode levels = JSON.readTree(fetch(s, "/api/plots?run=intake", null).text()).path("residualLevels");
        assertEquals(2, levels.size(), levels.toString());
        assertEquals(RunPlots.LOOSE_RESIDUAL, levels.get(0).path("value").asDouble());
        assertEquals("loose 1e-3", levels.get(0).path("label").asText());
        double target = eqs.elements().next().path("target").asDouble();
        assertEquals(target, levels.get(1).path("value").asDouble());
        // 1e-5: the judge's default target (ConvergedDetector's Javadoc: residual_target, common practice)
        assertEquals("target 1e-5", levels.get(1).path("label").asText());
    }

    @Test
    void withATokenEveryRequestMustCarryIt() throws Exception {
        runs.record("header", SolverFeed.record(1), 1);
        LiveServer s = start("tunnel-fan-7Q2x");
        for (String path : List.of("/", "/health", "/metrics", "/api/runs", "/events", "/assets/live.js")) {
            Reply r = fetch(s, path, null);
            assertEquals(401, r.status(), path);
            assertTrue(r.headers().get("WWW-Authenticate").startsWith("Bearer"), path);
            assertEquals(401, fetch(s, path, "tunnel-fan-7Q2y").status(), "wrong token on " + path);
            assertEquals(401, fetch(s, path + "?token=tunnel-fan-7Q2", null).status(), "a prefix on " + path);
        }
        assertEquals(200, fetch(s, "/health", "tunnel-fan-7Q2x").status());
        assertEquals(200, fetch(s, "/api/runs?token=tunnel-fan-7Q2x", null).status());
        Reply page = fetch(s, "/?token=tunnel-fan-7Q2x", null);
        assertEquals(200, page.status());
        assertTrue(page.text().contains("assets/live.js?token=tunnel-fan-7Q2x"), "asset links carry the token");
    }

    @Test
    void refusesToStartOnANonLoopbackAddressWithoutAToken() throws Exception {
        Future<LiveServer> f = LiveServer.start(vertx, "0.0.0.0:0", runs,
                new PrometheusMeterRegistry(PrometheusConfig.DEFAULT), null);
        Throwable t = f.toCompletionStage().toCompletableFuture().handle((v, e) -> e).get(20, TimeUnit.SECONDS);
        assertTrue(t != null && t.getMessage().contains("token"), String.valueOf(t));
        Throwable bad = LiveServer.start(vertx, "127.0.0.1", runs,
                new PrometheusMeterRegistry(PrometheusConfig.DEFAULT), null).toCompletionStage().toCompletableFuture()
                .handle((v, e) -> e).get(20, TimeUnit.SECONDS);
        assertTrue(bad != null && bad.getMessage().contains("HOST:PORT"), String.valueOf(bad));
    }

    @Test
    void servesItsOwnAssetsAndNothingElse() throws Exception {
        LiveServer s = start(null);
        Reply js = fetch(s, "/assets/uplot.js", null);
        assertEquals(200, js.status());
        try (InputStream in = getClass().getClassLoader()
                .getResourceAsStream("META-INF/resources/webjars/uplot/1.6.30/dist/uPlot.iife.min.js")) {
            assertArrayEquals(in.readAllBytes(), js.body().getBytes(), "the WebJar's own file");
        }
        assertTrue(js.headers().get("Content-Type").startsWith("text/javascript"));
        assertEquals("nosniff", js.headers().get("X-Content-Type-Options"));
        for (String path : List.of("/assets/", "/assets", "/assets/..%2Fpom.xml", "/assets/../pom.xml",
                "/pom.xml", "/dev/watcher/live/live.js", "/META-INF/resources/webjars/uplot/1.6.30/dist/uPlot.min.css",
                "/assets/%2e%2e/%2e%2e/etc/passwd", "/etc/passwd", "/api/")) {
            Reply r = fetch(s, path, null);
            assertEquals(404, r.status(), path);
            assertTrue(!r.text().contains("root:") && !r.text().contains("<project"), path);
        }
        Reply page = fetch(s, "/", null);
        assertTrue(page.headers().get("Content-Type").startsWith("text/html"));
        assertTrue(page.text().contains("assets/live.js\""), "no token, plain links");
    }

    @Test
    void metricsEndpointSpeaksPrometheusTextWithTheWatchersSeries() throws Exception {
        PrometheusMeterRegistry registry = new PrometheusMeterRegistry(PrometheusConfig.DEFAULT);
        WatcherMetrics.commonTags(registry, "node-a");
        for (long i = 1; i <= 50; i++) {
            runs.record("header", SolverFeed.record(i), 3);
        }
        runs.malformed("header", Malformed.BAD_NUMBER);
        runs.malformed("header", Malformed.BAD_NUMBER);
        runs.malformed("header", Malformed.TOO_LONG);
        runs.open("header", Patterns.SINGLE_EQUATION_BLOWUP);
        LiveServer s = start("127.0.0.1:0", null, registry);
        s.onEvent(detection(1, "header", 40, Patterns.SINGLE_EQUATION_BLOWUP));
        s.onEvent(detection(2, "header", 41, "no-such-pattern"));
        Instant at = Instant.parse("2026-12-02T03:04:06Z");
        s.onEvent(new TimelineEvent(3, "header", EventType.NOTICE, at, 41, "sent", Severity.CRITICAL,
                Map.of("channel", "ops-mail", "notice_id", "n1")));
        s.onEvent(new TimelineEvent(4, "header", EventType.NOTICE, at, 41, "failed", Severity.CRITICAL,
                Map.of("channel", "ops-hook", "notice_id", "n1")));
        s.onEvent(new TimelineEvent(5, "header", EventType.ACTION, at, 42, "signalled", Severity.CRITICAL,
                Map.of("method", "pid")));

        Reply r = fetch(s, "/metrics", null);
        assertEquals(200, r.status());
        assertTrue(r.headers().get("Content-Type").startsWith("text/plain; version=0.0.4"),
                r.headers().get("Content-Type"));
        PrometheusText p = PrometheusText.parse(r.text());
        IterationRecord last = SolverFeed.record(50);
        Map<String, String> run = Map.of("run", "header", "host", "node-a");
        for (int i = 0; i < last.residuals().size(); i++) {
            double v = p.one("watcher_residual", Map.of("run", "header", "equation", last.residuals().name(i)))
                    .value();
            assertEquals(last.residuals().value(i), v, Math.abs(v) * 1e-12);
        }
        assertEquals("gauge", p.types.get("watcher_residual"));
        assertEquals(last.monitors().value(0), p.one("watcher_monitor", Map.of("monitor", "outlet-temp")).value(),
                1e-9);
        assertEquals(50, p.one("watcher_iteration", run).value());
        assertEquals(1, p.one("watcher_conditions_open", run).value());
        assertEquals(153, p.one("watcher_lines_total", run).value());
        assertEquals(50, p.one("watcher_records_total", run).value());
        assertEquals(2, p.one("watcher_malformed_lines_total", Map.of("kind", "bad-number")).value());
        assertEquals(1, p.one("watcher_malformed_lines_total", Map.of("kind", "too-long")).value());
        assertEquals(0, p.one("watcher_malformed_lines_total", Map.of("kind", "bad-utf8")).value());
        assertEquals(1, p.one("watcher_detections_total", Map.of("pattern", "single-equation-blowup")).value());
        assertEquals(1, p.one("watcher_detections_total", Map.of("pattern", "other")).value(),
                "an unknown pattern id is not a new tag value");
        assertEquals(1, p.one("watcher_notices_total", Map.of("channel", "ops-mail", "outcome", "sent")).value());
        assertEquals(1, p.one("watcher_notices_total", Map.of("channel", "ops-hook", "outcome", "failed")).value());
        assertEquals(1, p.one("watcher_actions_total", Map.of("outcome", "signalled")).value());
        assertEquals(0, p.one("watcher_series_dropped", run).value());
        assertEquals("counter", p.types.getOrDefault("watcher_lines_total", p.types.get("watcher_lines")));
        for (PrometheusText.Sample sample : p.samples) {
            if (sample.name().startsWith("watcher_")) {
                assertEquals("node-a", sample.labels().get("host"), "common tag on " + sample);
                for (String key : sample.labels().keySet()) {
                    assertTrue(!key.contains("iter") && !key.contains("path"), "bounded tags only: " + sample);
                }
            }
        }
    }
}
