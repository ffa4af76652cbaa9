package dev.watcher.notify;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.model.ChannelSpec;
import dev.watcher.model.EventType;
import dev.watcher.model.SecretRef;
import dev.watcher.model.Severity;
import dev.watcher.model.TimelineEvent;
import dev.watcher.model.WebhookSpec;
import io.vertx.core.Future;
import io.vertx.core.Vertx;
import io.vertx.core.json.JsonObject;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.util.Base64;
import java.util.List;
import java.util.Map;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicBoolean;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** Webhook delivery against a real HTTP server on 127.0.0.1, with short delays instead of minutes. */
class WebhookDeliveryIT {

    private static final byte[] KEY = "a shared signing secret".getBytes(StandardCharsets.UTF_8);
    private static final Duration WAIT = Duration.ofSeconds(20);

    @TempDir
    Path dir;

    private Vertx vertx;
    private Receiver receiver;
    private Path secretFile;
    private final List<Dispatcher> dispatchers = new java.util.ArrayList<>();

    private final DeliveryOptions fast = DeliveryOptions.defaults().withBaseBackoff(Duration.ofMillis(50))
            .withMaxBackoff(Duration.ofMillis(200)).withTimeout(Duration.ofMillis(400)).withMaxAttempts(6)
            .withDoneIdsKept(100);

    @BeforeEach
    void up() throws Exception {
        vertx = Vertx.vertx();
        receiver = new Receiver(vertx, KEY).start();
        secretFile = dir.resolve("hook.secret");
        Files.writeString(secretFile, "whsec_" + Base64.getEncoder().encodeToString(KEY) + "\n");
    }

    @AfterEach
    void down() throws Exception {
        // let recording of finished notices end before the worker threads go away
        await().atMost(WAIT).until(() -> dispatchers.stream().allMatch(Dispatcher::settled));
        dispatchers.forEach(Dispatcher::close);
        receiver.close();
        vertx.close().toCompletionStage().toCompletableFuture().get(10, TimeUnit.SECONDS);
    }

    /**
     * A signed channel. The per-attempt timeout is generous (the build machine is shared and busy): a reply
     * that the client gives up on would be sent again, which is right but would blur the counts here. Only
     * the slow-reply test uses a short one.
     */
    private WebhookSpec hook(String name, String path, String body, int attempts) {
        return hook(name, path, body, attempts, Duration.ofSeconds(5));
    }

    private WebhookSpec hook(String name, String path, String body, int attempts, Duration timeout) {
        return new WebhookSpec(name, SecretRef.ofLiteral(receiver.url(path)), SecretRef.ofFile(secretFile.toString()),
                body, timeout, attempts, Duration.ofMillis(200));
    }

    private Dispatcher dispatcher(Path outbox, List<ChannelSpec> channels, RecordingSink sink) {
        Dispatcher d = new Dispatcher(vertx, outbox, channels, sink, Clock.systemUTC(), fast);
        dispatchers.add(d);
        return d;
    }

    private static <T> T get(Future<T> f) throws Exception {
        return f.toCompletionStage().toCompletableFuture().get(30, TimeUnit.SECONDS);
    }

    private static void awaitFinished(RecordingSink sink, String id) {
        await().atMost(WAIT).until(() -> sink.finished(id));
    }

    @Test
    void retriesThrough500And429AndASlowReplyThenSendsWithTheSameSignedId() throws Exception {
        receiver.script((id, nth) -> switch (nth) {
            case 1 -> Receiver.Reply.of(500);
            case 2 -> new Receiver.Reply(429, Map.of("Retry-After", "1"), 0);
            case 3 -> new Receiver.Reply(500, Map.of(), 6000);
            default -> Receiver.Reply.of(200);
        });
        RecordingSink sink = new RecordingSink();
        Dispatcher d = dispatcher(dir.resolve("outbox"),
                List.of(hook("ops", "/in", "native", 6, Duration.ofMillis(1500))), sink);
        get(d.start());
        d.submit(Notices.blowup("n-1", "ops"));
        awaitFinished(sink, "n-1");

        assertEquals(List.of("queued", "failed", "failed", "failed", "sent"), sink.states("n-1"));
        List<TimelineEvent> ev = sink.of("n-1");
        assertEquals(List.of(0, 1, 2, 3, 4), ev.stream().map(e -> e.fields().get("attempt")).toList());
        assertTrue(ev.get(1).fields().get("error").toString().contains("HTTP 500"));
        assertTrue(ev.get(2).fields().get("error").toString().contains("HTTP 429"));
        assertTrue(ev.get(3).fields().get("error").toString().contains("within 1500 ms"));
        assertNull(ev.get(4).fields().get("error"));
        TimelineEvent sent = ev.get(4);
        assertEquals(EventType.NOTICE, sent.type());
        assertEquals("hx-header-07", sent.run());
        assertEquals(4120, sent.iter());
        assertEquals(Severity.CRITICAL, sent.severity());
        assertEquals("ops", sent.fields().get("channel"));
        assertEquals("single-equation-blowup", sent.fields().get("pattern"));

        List<Receiver.Hit> hits = receiver.hits("n-1");
        assertEquals(4, hits.size());
        assertTrue(hits.stream().allMatch(h -> h.signed() && h.signatureValid()), "every attempt signed validly");
        assertEquals(1, receiver.accepted("n-1"));
        assertEquals("hx-header-07", hits.get(3).json().getString("run"));
        await().atMost(WAIT).until(() -> d.pending() == 0);
        assertFalse(d.inOutbox("n-1"));
    }

    @Test
    void noticeIsOnDiskBeforeTheFirstAttemptAndGoneAfterSuccess() throws Exception {
        Path outbox = dir.resolve("outbox");
        AtomicBoolean onDiskAtFirstRequest = new AtomicBoolean(false);
        RecordingSink sink = new RecordingSink();
        Outbox probe = new Outbox(outbox, 100);
        receiver.script((id, nth) -> {
            if (nth == 1) {
                onDiskAtFirstRequest.set(probe.holds(id));
            }
            return Receiver.Reply.of(200);
        });
        Dispatcher d = dispatcher(outbox, List.of(hook("ops", "/in", "native", 3)), sink);
        d.submit(Notices.blowup("n-disk", "ops"));
        awaitFinished(sink, "n-disk");
        await().atMost(WAIT).until(d::settled);
        assertTrue(onDiskAtFirstRequest.get(), "written to the outbox before the first attempt");
        assertFalse(probe.holds("n-disk"));
    }

    @Test
    void submitFromAnEventLoopThreadIsDeliveredToo() throws Exception {
        RecordingSink sink = new RecordingSink();
        Dispatcher d = dispatcher(dir.resolve("outbox"), List.of(hook("ops", "/in", "native", 3)), sink);
        vertx.runOnContext(v -> d.submit(Notices.blowup("n-loop", "ops")));
        awaitFinished(sink, "n-loop");
        assertEquals(List.of("queued", "sent"), sink.states("n-loop"));
        assertEquals(1, receiver.accepted("n-loop"));
    }

    @Test
    void signatureTimestampComesFromTheInjectedClock() throws Exception {
        Instant then = Instant.now().minusSeconds(90).truncatedTo(java.time.temporal.ChronoUnit.SECONDS);
        RecordingSink sink = new RecordingSink();
        Dispatcher d = new Dispatcher(vertx, dir.resolve("outbox"), List.of(hook("ops", "/in", "native", 3)), sink,
                Clock.fixed(then, java.time.ZoneOffset.UTC), fast);
        dispatchers.add(d);
        d.submit(Notices.blowup("n-clock", "ops"));
        awaitFinished(sink, "n-clock");
        Receiver.Hit hit = receiver.hits("n-clock").get(0);
        assertEquals(Long.toString(then.getEpochSecond()), hit.timestamp());
        assertTrue(hit.signatureValid());
    }

    @Test
    void goneEndpointIsDisabledRecordedAndTakesNoFurtherRequest() throws Exception {
        receiver.script((id, nth) -> Receiver.Reply.of(410));
        RecordingSink sink = new RecordingSink();
        Dispatcher d = dispatcher(dir.resolve("outbox"), List.of(hook("ops", "/gone", "native", 6)), sink);
        d.submit(Notices.blowup("n-1", "ops"));
        awaitFinished(sink, "n-1");
        assertEquals(List.of("queued", "gave-up"), sink.states("n-1"));
        String error = sink.of("n-1").get(1).fields().get("error").toString();
        assertTrue(error.contains("HTTP 410") && error.contains("disabled"), error);

        d.submit(Notices.blowup("n-2", "ops"));
        awaitFinished(sink, "n-2");
        assertEquals(List.of("queued", "gave-up"), sink.states("n-2"));
        assertTrue(sink.of("n-2").get(1).fields().get("error").toString().contains("disabled"));
        assertEquals(1, receiver.hits().size(), "no request after the 410");
    }

    @Test
    void givesUpAfterTheLastAttemptAndClearsTheOutbox() throws Exception {
        receiver.script((id, nth) -> Receiver.Reply.of(500));
        RecordingSink sink = new RecordingSink();
        Dispatcher d = dispatcher(dir.resolve("outbox"), List.of(hook("ops", "/in", "native", 3)), sink);
        d.submit(Notices.blowup("n-1", "ops"));
        awaitFinished(sink, "n-1");
        assertEquals(List.of("queued", "failed", "failed", "gave-up"), sink.states("n-1"));
        assertEquals(3, receiver.hits("n-1").size());
        await().atMost(WAIT).until(() -> d.pending() == 0);
        assertFalse(d.inOutbox("n-1"));
        // given up is done: the same id is not taken again
        d.submit(Notices.blowup("n-1", "ops"));
        assertEquals(0, d.pending());
    }

    @Test
    void redirectIsAFailureAndIsNotFollowed() throws Exception {
        receiver.script((id, nth) -> new Receiver.Reply(302, Map.of("Location", receiver.url("/elsewhere")), 0));
        RecordingSink sink = new RecordingSink();
        Dispatcher d = dispatcher(dir.resolve("outbox"), List.of(hook("ops", "/moved", "native", 2)), sink);
        d.submit(Notices.blowup("n-1", "ops"));
        awaitFinished(sink, "n-1");
        assertEquals(List.of("queued", "failed", "gave-up"), sink.states("n-1"));
        assertTrue(sink.of("n-1").get(1).fields().get("error").toString().contains("HTTP 302"));
        assertTrue(receiver.hits().stream().noneMatch(h -> h.path().equals("/elsewhere")));
    }

    @Test
    void restartedDispatcherDeliversPendingNoticesExactlyOnceById() throws Exception {
        AtomicBoolean up = new AtomicBoolean(false);
        receiver.script((id, nth) -> Receiver.Reply.of(up.get() ? 200 : 500));
        Path outbox = dir.resolve("outbox");
        List<ChannelSpec> channels = List.of(hook("ops", "/in", "native", 50));
        List<String> ids = List.of("n-a", "n-b", "n-c");

        RecordingSink first = new RecordingSink();
        Dispatcher d1 = dispatcher(outbox, channels, first);
        get(d1.start());
        ids.forEach(id -> d1.submit(Notices.blowup(id, "ops")));
        await().atMost(WAIT).until(() -> ids.stream().allMatch(id -> first.states(id).contains("failed")));
        d1.close();
        ids.forEach(id -> assertTrue(d1.inOutbox(id), id + " stays in the outbox"));
        ids.forEach(id -> assertEquals(0, receiver.accepted(id)));

        up.set(true);
        RecordingSink second = new RecordingSink();
        Dispatcher d2 = dispatcher(outbox, channels, second);
        get(d2.start());
        await().atMost(WAIT).until(() -> ids.stream().allMatch(second::finished));
        ids.forEach(id -> assertEquals("sent", second.states(id).get(second.states(id).size() - 1)));
        // submitted again in the same life: dropped by id
        d2.submit(Notices.blowup("n-a", "ops"));
        assertTrue(second.states("n-a").stream().noneMatch("queued"::equals));
        await().atMost(WAIT).until(() -> d2.pending() == 0);
        d2.close();

        // a third life: nothing left to resume, and a done id from an earlier life is dropped
        RecordingSink third = new RecordingSink();
        Dispatcher d3 = dispatcher(outbox, channels, third);
        get(d3.start());
        d3.submit(Notices.blowup("n-b", "ops"));
        assertEquals(0, d3.pending());
        assertTrue(third.all().isEmpty());
        d3.submit(Notices.blowup("n-d", "ops"));
        awaitFinished(third, "n-d");

        for (String id : List.of("n-a", "n-b", "n-c", "n-d")) {
            assertEquals(1, receiver.accepted(id), id + " accepted exactly once; timelines " + first.states(id)
                    + second.states(id) + third.states(id));
        }
        assertTrue(receiver.hits().stream().allMatch(Receiver.Hit::signatureValid));
    }

    @Test
    void drainLeavesANoticeToldToComeBackLaterInTheOutbox() throws Exception {
        receiver.script((id, nth) -> nth == 1 ? new Receiver.Reply(429, Map.of("Retry-After", "3600"), 0)
                : Receiver.Reply.of(200));
        RecordingSink sink = new RecordingSink();
        Dispatcher d = dispatcher(dir.resolve("outbox"), List.of(hook("ops", "/in", "native", 6)), sink);
        d.submit(Notices.blowup("n-1", "ops"));
        await().atMost(WAIT).until(() -> sink.states("n-1").contains("failed"));
        // without the Retry-After floor the next attempt would come within the 200 ms backoff cap
        get(d.drain(Duration.ofMillis(800)));
        assertEquals(1, d.pending());
        assertTrue(d.inOutbox("n-1"));
        assertEquals(1, receiver.hits("n-1").size());
    }

    @Test
    void drainCompletesOnceEveryNoticeIsSent() throws Exception {
        receiver.script((id, nth) -> nth < 3 ? Receiver.Reply.of(503) : Receiver.Reply.of(204));
        RecordingSink sink = new RecordingSink();
        Dispatcher d = dispatcher(dir.resolve("outbox"), List.of(hook("ops", "/in", "native", 6)), sink);
        d.submit(Notices.blowup("n-1", "ops"));
        d.submit(Notices.blowup("n-2", "ops"));
        get(d.drain(Duration.ofSeconds(25)));
        assertEquals(0, d.pending());
        assertTrue(sink.finished("n-1") && sink.finished("n-2"));
        assertEquals(1, receiver.accepted("n-1"));
        assertEquals(1, receiver.accepted("n-2"));
    }

    @Test
    void cloudEventsEnvelopeArrivesWithItsContentTypeAndRequiredAttributes() throws Exception {
        RecordingSink sink = new RecordingSink();
        Dispatcher d = dispatcher(dir.resolve("outbox"), List.of(hook("ce", "/ce", "cloudevents", 3)), sink);
        d.submit(Notices.blowup("n-ce", "ce"));
        awaitFinished(sink, "n-ce");
        Receiver.Hit hit = receiver.hits("n-ce").get(0);
        assertTrue(hit.contentType().startsWith("application/cloudevents+json"));
        JsonObject ce = hit.json();
        for (String attr : List.of("id", "source", "specversion", "type")) {
            assertFalse(ce.getString(attr, "").isEmpty(), attr);
        }
        assertEquals("n-ce", ce.getString("id"));
        assertEquals("1.0", ce.getString("specversion"));
        assertEquals("n-ce", ce.getJsonObject("data").getString("notice_id"));
        assertTrue(hit.signatureValid());
    }

    @Test
    void unsignedChatChannelGetsAPlainTextBody() throws Exception {
        Receiver open = new Receiver(vertx, null).start();
        try {
            WebhookSpec chat = new WebhookSpec("chat", SecretRef.ofLiteral(open.url("/chat")), null, "text",
                    Duration.ofSeconds(5), 3, Duration.ofMillis(200));
            RecordingSink sink = new RecordingSink();
            Dispatcher d = dispatcher(dir.resolve("outbox"), List.of(chat), sink);
            d.submit(Notices.blowup("n-chat", "chat"));
            awaitFinished(sink, "n-chat");
            assertEquals("sent", sink.states("n-chat").get(1));
            Receiver.Hit hit = open.hits().get(0);
            assertFalse(hit.signed());
            assertTrue(hit.json().getString("text").startsWith("[critical] hx-header-07"));
        } finally {
            open.close();
        }
    }

    @Test
    void noticeForAnUnknownChannelIsGivenUpAtOnce() throws Exception {
        RecordingSink sink = new RecordingSink();
        Dispatcher d = dispatcher(dir.resolve("outbox"), List.of(hook("ops", "/in", "native", 3)), sink);
        d.submit(Notices.blowup("n-x", "pager"));
        awaitFinished(sink, "n-x");
        assertEquals(List.of("queued", "gave-up"), sink.states("n-x"));
        assertTrue(sink.of("n-x").get(1).fields().get("error").toString().contains("pager"));
    }

    @Test
    void urlWithATokenNeverReachesTheTimeline() throws Exception {
        // nothing listens on this port of 127.0.0.1 (the receiver's port, closed first)
        String url = receiver.url("/hooks/T0KEN12345?sig=s3cr3t");
        receiver.close();
        WebhookSpec spec = new WebhookSpec("ops", SecretRef.ofLiteral(url), null, "native", Duration.ofMillis(400),
                2, Duration.ofMillis(100));
        RecordingSink sink = new RecordingSink();
        Dispatcher d = dispatcher(dir.resolve("outbox"), List.of(spec), sink);
        d.submit(Notices.blowup("n-1", "ops"));
        awaitFinished(sink, "n-1");
        for (TimelineEvent e : sink.all()) {
            String text = String.valueOf(e.fields());
            assertFalse(text.contains("s3cr3t") || text.contains("T0KEN12345"), text);
        }
        assertTrue(String.valueOf(sink.of("n-1").get(1).fields().get("error")).contains("/hooks/***?***"));
    }
}
