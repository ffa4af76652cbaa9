package dev.watcher.notify;

import dev.watcher.model.Notice;
import dev.watcher.model.WebhookSpec;
import io.vertx.core.Future;
import io.vertx.core.buffer.Buffer;
import io.vertx.ext.web.client.HttpRequest;
import io.vertx.ext.web.client.HttpResponse;
import io.vertx.ext.web.client.WebClient;
import java.time.Clock;
import java.time.Duration;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.TimeoutException;

/**
 * Delivers notices by HTTP POST to one endpoint: our JSON, a CloudEvents envelope or a chat {@code text}
 * body, signed per Standard Webhooks when a secret is set (the {@code webhook-id} is the notice id, the same
 * on every attempt; the timestamp is the attempt's). 2xx is success; a redirect is a failure and is not
 * followed; 410 disables the endpoint for the rest of this daemon's life; 429, 502, 503 and 504 ask to slow
 * down; a Retry-After is passed on; every attempt is bounded by the channel's timeout.
 */
final class WebhookNotifier implements Notifier {

    private final WebClient client;
    private final WebhookSpec spec;
    private final String url;
    private final String shownUrl;
    private final byte[] key;
    private final String style;
    private final Clock clock;
    private final long timeoutMs;
    private final int maxAttempts;
    private final Duration maxBackoff;
    private volatile String disabledBecause;

    /**
     * Resolves the URL and the secret now, so that a bad channel fails start-up, not a delivery.
     *
     * @throws IllegalArgumentException when the URL or secret cannot be resolved or the body style is unknown
     */
    WebhookNotifier(WebClient client, WebhookSpec spec, DeliveryOptions options, Clock clock) {
        this.client = client;
        this.spec = spec;
        this.clock = clock;
        this.style = NoticeFormat.bodyStyle(spec.body());
        if (spec.url() == null) {
            throw new IllegalArgumentException("webhook channel '" + spec.name() + "' has no url");
        }
        try {
            this.url = Secrets.resolve(spec.url());
        } catch (IllegalArgumentException e) {
            throw new IllegalArgumentException("webhook channel '" + spec.name() + "': url: " + e.getMessage(), e);
        }
        if (!(url.startsWith("http://") || url.startsWith("https://"))) {
            throw new IllegalArgumentException("webhook channel '" + spec.name() + "': url from "
                    + spec.url().describe() + " is not an http(s) URL: " + Redact.url(url));
        }
        this.shownUrl = Redact.url(url);
        try {
            String secret = Secrets.resolve(spec.secret());
            this.key = secret == null ? null : Signature.key(secret);
        } catch (IllegalArgumentException e) {
            throw new IllegalArgumentException("webhook channel '" + spec.name() + "': secret: " + e.getMessage(), e);
        }
        Duration t = spec.timeout() == null || spec.timeout().isZero() ? options.timeout() : spec.timeout();
        this.timeoutMs = Math.max(1, t.toMillis());
        this.maxAttempts = spec.maxAttempts() > 0 ? spec.maxAttempts() : options.maxAttempts();
        this.maxBackoff = spec.maxBackoff() == null || spec.maxBackoff().isZero() ? options.maxBackoff()
                : spec.maxBackoff();
    }

    @Override
    public String name() {
        return spec.name();
    }

    @Override
    public int maxAttempts() {
        return maxAttempts;
    }

    @Override
    public Duration maxBackoff() {
        return maxBackoff;
    }

    /** The endpoint as logs and the timeline may show it. */
    String shownUrl() {
        return shownUrl;
    }

    @Override
    public Future<Outcome> send(Notice notice, int attempt) {
        String why = disabledBecause;
        if (why != null) {
            return Future.succeededFuture(Outcome.giveUp("endpoint " + shownUrl + " disabled earlier: " + why));
        }
        byte[] body = NoticeFormat.body(style, notice);
        HttpRequest<Buffer> req;
        try {
            req = client.postAbs(url).followRedirects(false).timeout(timeoutMs).connectTimeout(timeoutMs)
                    .putHeader("content-type", NoticeFormat.contentType(style))
                    .putHeader("user-agent", "watcher-notify");
        } catch (RuntimeException e) {
            return Future.succeededFuture(Outcome.giveUp("bad request to " + shownUrl + ": " + scrub(e.toString())));
        }
        if (key != null) {
            long ts = clock.instant().getEpochSecond();
            req.putHeader(Signature.HEADER_ID, notice.id())
                    .putHeader(Signature.HEADER_TIMESTAMP, Long.toString(ts))
                    .putHeader(Signature.HEADER_SIGNATURE, Signature.header(key, notice.id(), ts, body));
        }
        return req.sendBuffer(Buffer.buffer(body))
                // a second bound on the whole exchange: the client's own timeout is an idle timeout
                .timeout(timeoutMs + 1000, TimeUnit.MILLISECONDS)
                .transform(ar -> Future.succeededFuture(ar.succeeded() ? classify(ar.result())
                        : Outcome.retry(failureText(ar.cause()), null)));
    }

    Outcome classify(HttpResponse<Buffer> r) {
        int code = r.statusCode();
        String text = "HTTP " + code + (r.statusMessage() == null ? "" : " " + r.statusMessage()) + " from "
                + shownUrl;
        if (code >= 200 && code < 300) {
            return Outcome.sent();
        }
        if (code == 410) {
            disabledBecause = "HTTP 410 Gone";
            return Outcome.disable(text + ": endpoint disabled");
        }
        Duration wish = Backoff.retryAfter(r.getHeader("retry-after"), clock.instant());
        if (code == 429 || code == 502 || code == 503 || code == 504) {
            return Outcome.slowDown(text, wish);
        }
        if (code >= 300 && code < 400) {
            return Outcome.retry(text + " (redirects are not followed)", wish);
        }
        return Outcome.retry(text, wish);
    }

    private String failureText(Throwable t) {
        if (t instanceof TimeoutException || (t.getMessage() != null && t.getMessage().contains("timeout"))) {
            return "no answer from " + shownUrl + " within " + timeoutMs + " ms";
        }
        return "cannot reach " + shownUrl + ": " + scrub(t.getClass().getSimpleName() + ": " + t.getMessage());
    }

    private String scrub(String s) {
        return Redact.scrub(s, url);
    }

    @Override
    public Future<Void> close() {
        return Future.succeededFuture();
    }
}
