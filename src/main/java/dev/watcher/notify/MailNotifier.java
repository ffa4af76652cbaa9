package dev.watcher.notify;

import dev.watcher.model.MailSpec;
import dev.watcher.model.Notice;
import io.vertx.core.Future;
import io.vertx.core.Vertx;
import io.vertx.ext.mail.LoginOption;
import io.vertx.ext.mail.MailClient;
import io.vertx.ext.mail.MailConfig;
import io.vertx.ext.mail.MailMessage;
import io.vertx.ext.mail.SMTPException;
import io.vertx.ext.mail.StartTLSOptions;
import java.time.Duration;
import java.util.Locale;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.TimeoutException;

/**
 * Delivers notices as plain-text mail through one SMTP relay with Vert.x's mail client: STARTTLS required,
 * optional or off, login when a user is set, several recipients. A permanent SMTP reply (5xx) gives up at
 * once; anything else (connection refused, 4xx, timeout) is retried like a webhook.
 */
final class MailNotifier implements Notifier {

    private final MailSpec spec;
    private final MailClient client;
    private final String from;
    private final long timeoutMs;
    private final int maxAttempts;
    private final Duration maxBackoff;

    /**
     * @throws IllegalArgumentException when the spec lacks a host or recipients, STARTTLS is not one of
     *                                  required/optional/off, or the password cannot be resolved
     */
    MailNotifier(Vertx vertx, MailSpec spec, DeliveryOptions options) {
        this.spec = spec;
        if (spec.host() == null || spec.host().isBlank()) {
            throw new IllegalArgumentException("mail channel '" + spec.name() + "' has no SMTP host");
        }
        if (spec.to().isEmpty()) {
            throw new IllegalArgumentException("mail channel '" + spec.name() + "' has no recipients");
        }
        Duration t = spec.timeout() == null || spec.timeout().isZero() ? options.timeout() : spec.timeout();
        this.timeoutMs = Math.max(1, t.toMillis());
        this.maxAttempts = spec.maxAttempts() > 0 ? spec.maxAttempts() : options.maxAttempts();
        this.maxBackoff = options.maxBackoff();
        this.from = spec.from() == null || spec.from().isBlank() ? "watcher@localhost" : spec.from();
        MailConfig config = new MailConfig()
                .setHostname(spec.host())
                .setPort(spec.port() > 0 ? spec.port() : 25)
                .setStarttls(starttls(spec.starttls(), spec.name()))
                .setConnectTimeout((int) Math.min(Integer.MAX_VALUE, timeoutMs))
                // a fresh connection per notice: notices are rare, and a relay restarted meanwhile then
                // needs no stale pooled connection to fail first
                .setKeepAlive(false);
        if (spec.user() != null && !spec.user().isBlank()) {
            String password;
            try {
                password = Secrets.resolve(spec.password());
            } catch (IllegalArgumentException e) {
                throw new IllegalArgumentException("mail channel '" + spec.name() + "': password: "
                        + e.getMessage(), e);
            }
            config.setLogin(LoginOption.REQUIRED).setUsername(spec.user()).setPassword(password);
        } else {
            config.setLogin(LoginOption.DISABLED);
        }
        this.client = MailClient.create(vertx, config);
    }

    /** Maps our option words to the client's STARTTLS setting. */
    static StartTLSOptions starttls(String word, String channel) {
        String w = word == null ? "optional" : word.strip().toLowerCase(Locale.ROOT);
        return switch (w) {
            case "required" -> StartTLSOptions.REQUIRED;
            case "optional" -> StartTLSOptions.OPTIONAL;
            case "off" -> StartTLSOptions.DISABLED;
            default -> throw new IllegalArgumentException("mail channel '" + channel
                    + "': starttls must be required, optional or off, got '" + word + "'");
        };
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

    @Override
    public Future<Outcome> send(Notice notice, int attempt) {
        MailMessage m = new MailMessage()
                .setFrom(from)
                .setTo(spec.to())
                .setSubject(NoticeFormat.subject(notice))
                .setText(NoticeFormat.mailBody(notice));
        m.addHeader("X-Watcher-Notice-Id", notice.id());
        return client.sendMail(m).timeout(timeoutMs, TimeUnit.MILLISECONDS)
                .transform(ar -> Future.succeededFuture(ar.succeeded() ? Outcome.sent() : classify(ar.cause())));
    }

    private Outcome classify(Throwable t) {
        String where = "SMTP " + spec.host() + ":" + spec.port();
        if (t instanceof SMTPException s) {
            String text = where + " replied: " + s.getReplyMessage();
            return s.isPermanent() ? Outcome.giveUp(text) : Outcome.retry(text, null);
        }
        if (t instanceof TimeoutException) {
            return Outcome.retry("no answer from " + where + " within " + timeoutMs + " ms", null);
        }
        return Outcome.retry(where + ": " + t.getClass().getSimpleName() + ": " + t.getMessage(), null);
    }

    @Override
    public Future<Void> close() {
        return client.close();
    }
}
