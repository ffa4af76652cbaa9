package dev.watcher.notify;

import io.vertx.core.Vertx;
import io.vertx.core.http.HttpServer;
import io.vertx.core.http.HttpServerRequest;
import io.vertx.core.json.JsonObject;
import java.nio.charset.StandardCharsets;
import java.security.MessageDigest;
import java.time.Instant;
import java.util.ArrayList;
import java.util.Base64;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.concurrent.TimeUnit;
import javax.crypto.Mac;
import javax.crypto.spec.SecretKeySpec;

/**
 * A real HTTP server on 127.0.0.1 that receives webhooks: it checks the Standard Webhooks signature on the
 * raw body bytes with its own HMAC code (not the code under test), and answers as a script says for the
 * n-th request of each notice id.
 */
final class Receiver implements AutoCloseable {

    /** What to answer: a status, optional headers, and a delay before answering. */
    record Reply(int status, Map<String, String> headers, long delayMs) {
        static Reply of(int status) {
            return new Reply(status, Map.of(), 0);
        }
    }

    /** The script: the reply to the {@code nth} request (from 1) that carries {@code id}. */
    interface Script {
        Reply reply(String id, int nth);
    }

    /** One request as received. */
    record Hit(String path, String id, String contentType, byte[] body, boolean signed, boolean signatureValid,
            int status, String timestamp) {
        JsonObject json() {
            return new JsonObject(new String(body, StandardCharsets.UTF_8));
        }
    }

    private final Vertx vertx;
    private final byte[] key;
    private volatile Script script = (id, nth) -> Reply.of(200);
    private final List<Hit> hits = new ArrayList<>();
    private final Map<String, Integer> seen = new HashMap<>();
    private final Map<String, Integer> accepted = new HashMap<>();
    private HttpServer server;

    /** @param key the signing key the receiver shares with the sender, or null to accept unsigned requests */
    Receiver(Vertx vertx, byte[] key) {
        this.vertx = vertx;
        this.key = key;
    }

    Receiver start() throws Exception {
        server = vertx.createHttpServer().requestHandler(this::handle).listen(0, "127.0.0.1")
                .toCompletionStage().toCompletableFuture().get(10, TimeUnit.SECONDS);
        return this;
    }

    String url(String path) {
        return "http://127.0.0.1:" + server.actualPort() + path;
    }

    void script(Script s) {
        this.script = s;
    }

    synchronized List<Hit> hits() {
        return List.copyOf(hits);
    }

    synchronized List<Hit> hits(String id) {
        return hits.stream().filter(h -> id.equals(h.id())).toList();
    }

    /** How many times a 2xx answer went out for the id. */
    synchronized int accepted(String id) {
        return accepted.getOrDefault(id, 0);
    }

    private void handle(HttpServerRequest req) {
        req.body().onSuccess(buf -> {
            byte[] body = buf.getBytes();
            String id = req.getHeader("webhook-id");
            if (id == null) {
                JsonObject o = new JsonObject(buf);
                id = o.getString("notice_id", o.getString("id"));
            }
            boolean signed = req.getHeader("webhook-signature") != null;
            boolean valid = key != null && verify(req.getHeader("webhook-id"), req.getHeader("webhook-timestamp"),
                    body, req.getHeader("webhook-signature"));
            Reply reply;
            synchronized (this) {
                int nth = seen.merge(id, 1, Integer::sum);
                reply = (key != null && !valid) ? Reply.of(401) : script.reply(id, nth);
                hits.add(new Hit(req.path(), id, req.getHeader("content-type"), body, signed, valid, reply.status(),
                        req.getHeader("webhook-timestamp")));
                if (reply.status() / 100 == 2) {
                    accepted.merge(id, 1, Integer::sum);
                }
            }
            Runnable answer = () -> {
                reply.headers().forEach(req.response()::putHeader);
                req.response().setStatusCode(reply.status()).end().onFailure(e -> { });
            };
            if (reply.delayMs() > 0) {
                vertx.setTimer(reply.delayMs(), t -> answer.run());
            } else {
                answer.run();
            }
        });
    }

    /** Standard Webhooks verification, written independently of the sender's code. */
    private boolean verify(String id, String ts, byte[] body, String header) {
        if (id == null || ts == null || header == null) {
            return false;
        }
        long t = Long.parseLong(ts);
        // receivers reject stale timestamps (the spec's replay protection); five minutes of tolerance
        if (Math.abs(Instant.now().getEpochSecond() - t) > 300) {
            return false;
        }
        try {
            Mac mac = Mac.getInstance("HmacSHA256");
            mac.init(new SecretKeySpec(key, "HmacSHA256"));
            mac.update((id + "." + ts + ".").getBytes(StandardCharsets.UTF_8));
            byte[] expected = mac.doFinal(body);
            for (String part : header.split(" ")) {
                if (part.startsWith("v1,")
                        && MessageDigest.isEqual(expected, Base64.getDecoder().decode(part.substring(3)))) {
                    return true;
                }
            }
            return false;
        } catch (Exception e) {
            return false;
        }
    }

    @Override
    public void close() throws Exception {
        if (server != null) {
            server.close().toCompletionStage().toCompletableFuture().get(10, TimeUnit.SECONDS);
        }
    }
}
