package dev.watcher.notify;

import dev.watcher.model.ChannelSpec;
import dev.watcher.model.EventSink;
import dev.watcher.model.EventType;
import dev.watcher.model.MailSpec;
import dev.watcher.model.Notice;
import dev.watcher.model.PendingEvent;
import dev.watcher.model.WebhookSpec;
import io.vertx.core.Context;
import io.vertx.core.Future;
import io.vertx.core.Promise;
import io.vertx.core.Vertx;
import io.vertx.ext.web.client.WebClient;
import io.vertx.ext.web.client.WebClientOptions;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Delivers notices to their channels and never loses one. Each submitted notice is written to the durable
 * outbox (forced to disk) before its first attempt, retried with capped exponential backoff and jitter
 * (honouring Retry-After), and leaves the outbox only once it is sent or given up; its id then goes to a
 * small persisted list of done ids, so a notice resubmitted with the same id, in this life or a later one,
 * is dropped. Every attempt's outcome becomes a {@code notice} event in the timeline ({@code queued},
 * {@code sent}, {@code failed}, {@code gave-up}).
 *
 * <p>Threads: {@link #submit(Notice)}, {@link #drain(Duration)} and {@link #close()} may be called from any
 * thread; attempts run on one Vert.x context of the given instance. The caller owns the {@link Vertx}
 * instance and the {@link EventSink}; {@link #close()} releases only what this object made.
 *
 * <p>Delivery is at least once on the wire: a receiver that answered 2xx while the daemon died before
 * recording it sees the notice again in the next life, with the same {@code webhook-id} (the notice id) to
 * deduplicate on. The attempt count starts again at 1 in a new daemon life.
 */
public final class Dispatcher implements AutoCloseable {

    private static final Logger LOG = LoggerFactory.getLogger(Dispatcher.class);

    /** Notice event states (CONTRACT.md). */
    static final String QUEUED = "queued";
    static final String SENT = "sent";
    static final String FAILED = "failed";
    static final String GAVE_UP = "gave-up";

    private final Vertx vertx;
    private final Context context;
    private final Outbox outbox;
    private final EventSink sink;
    private final DeliveryOptions options;
    private final WebClient webClient;
    private final Map<String, Notifier> notifiers = new LinkedHashMap<>();

    private final Object lock = new Object();
    private final Map<String, Delivery> pending = new LinkedHashMap<>();
    private final List<Promise<Void>> drainers = new ArrayList<>();
    private boolean closed;
    private int completing;
    private int inFlight;
    private final long closeWaitMs;

    /** One notice on its way: touched under {@link #lock}. */
    private static final class Delivery {
        final Notice notice;
        final Notifier notifier;
        int attempts;
        long timer = -1;

        Delivery(Notice notice, Notifier notifier) {
            this.notice = notice;
            this.notifier = notifier;
        }
    }

    /**
     * Makes a dispatcher; nothing is sent before {@link #start()} or {@link #submit(Notice)}. Resolves every
     * channel's URL, secret and password now, so a bad channel fails here, not on delivery.
     *
     * @param vertx     the daemon's Vert.x instance (not closed by this object)
     * @param outboxDir directory of the durable outbox (created if missing); one dispatcher per directory
     * @param channels  the channels notices may address by name
     * @param sink      the timeline; receives a {@code notice} event per outcome
     * @param clock     wall time for signatures, CloudEvents and Retry-After dates
     * @throws IllegalArgumentException when a channel is invalid (the message names it, never a secret)
     * @throws UncheckedIOException     when the outbox directory cannot be made or read
     */
    public Dispatcher(Vertx vertx, Path outboxDir, List<ChannelSpec> channels, EventSink sink, Clock clock) {
        this(vertx, outboxDir, channels, sink, clock, DeliveryOptions.defaults());
    }

    /** As the public constructor, with given timing (tests shorten the delays). */
    Dispatcher(Vertx vertx, Path outboxDir, List<ChannelSpec> channels, EventSink sink, Clock clock,
            DeliveryOptions options) {
        this.vertx = vertx;
        this.context = vertx.getOrCreateContext();
        this.sink = sink;
        this.options = options;
        try {
            this.outbox = new Outbox(outboxDir, options.doneIdsKept());
        } catch (IOException e) {
            throw new UncheckedIOException("cannot open the notice outbox " + outboxDir, e);
        }
        this.webClient = WebClient.create(vertx, new WebClientOptions().setFollowRedirects(false)
                .setUserAgent("watcher-notify"));
        try {
            for (ChannelSpec c : channels) {
                if (notifiers.containsKey(c.name())) {
                    throw new IllegalArgumentException("two channels are named '" + c.name() + "'");
                }
                Notifier n;
                if (c instanceof WebhookSpec w) {
                    n = new WebhookNotifier(webClient, w, options, clock);
                } else {
                    n = new MailNotifier(vertx, (MailSpec) c, options);
                }
                notifiers.put(c.name(), n);
            }
            long longest = options.timeout().toMillis();
            for (ChannelSpec c : channels) {
                Duration t = c instanceof WebhookSpec w ? w.timeout() : ((MailSpec) c).timeout();
                if (t != null && t.toMillis() > longest) {
                    longest = t.toMillis();
                }
            }
            // an attempt is bounded by its timeout plus the one-second outer bound; then recording it
            this.closeWaitMs = longest + 3000;
        } catch (RuntimeException e) {
            notifiers.values().forEach(Notifier::close);
            webClient.close();
            throw e;
        }
    }

    /**
     * Loads the notices left in the outbox by an earlier life (minus those already done) and resumes their
     * delivery. Completes once they are scheduled, not delivered; fails if the outbox cannot be read.
     */
    public Future<Void> start() {
        return vertx.executeBlocking(outbox::load).map(list -> {
            int resumed = 0;
            for (Notice n : list) {
                Delivery d;
                synchronized (lock) {
                    if (closed || pending.containsKey(n.id())) {
                        continue;
                    }
                    d = new Delivery(n, notifiers.get(n.channel()));
                    pending.put(n.id(), d);
                }
                resumed++;
                begin(d);
            }
            if (resumed > 0) {
                LOG.info("resuming {} pending notice(s) from {}", resumed, outbox.dir());
            }
            return null;
        });
    }

    /**
     * Takes a notice for delivery. Drops it (logged at debug) when its id is pending or already done. Writes
     * it to the outbox and forces it to disk before the first attempt: on the calling thread, or on a
     * worker when called on an event loop. A notice submitted after {@link #close()} is only written to the
     * outbox, for the next life. Never throws for delivery problems: they become timeline events.
     *
     * @param notice a notice whose {@code channel} names one of the channels; an unknown channel gives
     *               {@code gave-up} at once
     */
    public void submit(Notice notice) {
        Delivery d;
        boolean deliver;
        synchronized (lock) {
            if (pending.containsKey(notice.id()) || outbox.isDone(notice.id())) {
                LOG.debug("notice {} dropped: already pending or done", notice.id());
                return;
            }
            d = new Delivery(notice, notifiers.get(notice.channel()));
            deliver = !closed;
            if (deliver) {
                pending.put(notice.id(), d);
            }
        }
        if (Context.isOnEventLoopThread()) {
            vertx.executeBlocking(() -> {
                persist(d);
                return null;
            }).onComplete(ar -> {
                if (deliver) {
                    begin(d);
                }
            });
        } else {
            persist(d);
            if (deliver) {
                begin(d);
            }
        }
    }

    /**
     * Gives pending notices up to {@code bound} to go out on their normal schedule (when the watched job
     * ends). Completes when none is pending or the bound has passed, whichever comes first; never fails.
     * What is still pending then stays in the outbox for the next life.
     */
    public Future<Void> drain(Duration bound) {
        Promise<Void> p = Promise.promise();
        synchronized (lock) {
            if (pending.isEmpty() || closed) {
                return Future.succeededFuture();
            }
            drainers.add(p);
        }
        long timer = vertx.setTimer(Math.max(1, bound.toMillis()), t -> {
            int left;
            synchronized (lock) {
                drainers.remove(p);
                left = pending.size();
            }
            if (p.tryComplete()) {
                LOG.info("{} notice(s) still pending after {}; they stay in the outbox", left, bound);
            }
        });
        return p.future().onComplete(ar -> vertx.cancelTimer(timer));
    }

    /** How many notices are pending (written, not yet sent or given up). */
    public int pending() {
        synchronized (lock) {
            return pending.size();
        }
    }

    /**
     * Stops: no further attempt starts and scheduled retries are cancelled; attempts already in flight are
     * waited for (at most the longest per-attempt timeout plus a few seconds) so that a notice the receiver
     * took is recorded as done and not sent again by the next life; then connections are closed. Pending
     * notices stay in the outbox. Called on an event-loop thread it does not wait (an in-flight attempt's
     * outcome may then be lost, and the notice sent again later with the same id). Idempotent.
     */
    @Override
    public void close() {
        List<Promise<Void>> waiting;
        synchronized (lock) {
            if (closed) {
                return;
            }
            closed = true;
            for (Delivery d : pending.values()) {
                if (d.timer >= 0) {
                    vertx.cancelTimer(d.timer);
                    d.timer = -1;
                }
            }
            waiting = new ArrayList<>(drainers);
            drainers.clear();
        }
        waiting.forEach(Promise::tryComplete);
        if (!Context.isOnEventLoopThread()) {
            awaitQuiet();
        }
        notifiers.values().forEach(Notifier::close);
        webClient.close();
    }

    private void awaitQuiet() {
        long deadline = System.nanoTime() + closeWaitMs * 1_000_000L;
        synchronized (lock) {
            while (inFlight > 0 || completing > 0) {
                long left = (deadline - System.nanoTime()) / 1_000_000L;
                if (left <= 0) {
                    LOG.warn("closing with {} attempt(s) still in flight; their notices stay in the outbox", inFlight);
                    return;
                }
                try {
                    lock.wait(left);
                } catch (InterruptedException e) {
                    Thread.currentThread().interrupt();
                    return;
                }
            }
        }
    }

    /** Whether no sent or given-up notice is still being recorded in the outbox (tests). */
    boolean settled() {
        synchronized (lock) {
            return completing == 0;
        }
    }

    /** Whether the outbox holds a file for the id (tests). */
    boolean inOutbox(String id) {
        return outbox.holds(id);
    }

    private void persist(Delivery d) {
        String error = null;
        try {
            outbox.put(d.notice);
        } catch (IOException | RuntimeException e) {
            // deliver from memory anyway: a late notice beats a lost one
            error = "outbox write failed: " + e;
            LOG.error("notice {}: {}", d.notice.id(), error);
        }
        event(d.notice, QUEUED, 0, error);
    }

    private void begin(Delivery d) {
        context.runOnContext(v -> attempt(d));
    }

    private void attempt(Delivery d) {
        int attempt;
        synchronized (lock) {
            if (closed || pending.get(d.notice.id()) != d) {
                return;
            }
            d.timer = -1;
            attempt = ++d.attempts;
            inFlight++;
        }
        if (d.notifier == null) {
            settle(d, attempt, Outcome.giveUp("no channel named '" + d.notice.channel() + "'"));
            return;
        }
        Future<Outcome> f;
        try {
            f = d.notifier.send(d.notice, attempt);
        } catch (RuntimeException e) {
            f = Future.succeededFuture(Outcome.retry("attempt failed: " + e, null));
        }
        f.onComplete(ar -> settle(d, attempt, ar.succeeded() ? ar.result()
                : Outcome.retry("attempt failed: " + ar.cause(), null)));
    }

    private void settle(Delivery d, int attempt, Outcome o) {
        boolean stopping;
        synchronized (lock) {
            inFlight--;
            stopping = closed;
            // counted before the lock is released, so close() never sees a quiet moment in between
            if (!o.retryable() || (!stopping && attempt >= d.notifier.maxAttempts())) {
                completing++;
            }
            lock.notifyAll();
        }
        switch (o.result()) {
            case SENT -> finish(d, SENT, attempt, null);
            case GIVE_UP, DISABLE -> finish(d, GAVE_UP, attempt, o.error());
            default -> {
                if (stopping) {
                    // closing: the failure is recorded, the next attempt belongs to the next life
                    event(d.notice, FAILED, attempt, o.error());
                    return;
                }
                if (attempt >= d.notifier.maxAttempts()) {
                    finish(d, GAVE_UP, attempt, o.error() + " (no attempt left after " + attempt + ")");
                    return;
                }
                Duration delay = new Backoff(options.baseBackoff(),
                        max(options.baseBackoff(), d.notifier.maxBackoff()), options.jitter()).next(attempt, o);
                event(d.notice, FAILED, attempt, o.error());
                LOG.debug("notice {} attempt {} failed ({}); next in {}", d.notice.id(), attempt, o.error(), delay);
                synchronized (lock) {
                    if (!closed) {
                        d.timer = vertx.setTimer(Math.max(1, delay.toMillis()), t -> attempt(d));
                    }
                }
            }
        }
    }

    /** Records a sent or given-up notice; the caller has counted it in {@link #completing}. */
    private void finish(Delivery d, String state, int attempt, String error) {
        event(d.notice, state, attempt, error);
        if (GAVE_UP.equals(state)) {
            LOG.warn("notice {} for channel {} given up: {}", d.notice.id(), d.notice.channel(), error);
        }
        vertx.executeBlocking(() -> {
            outbox.complete(d.notice.id());
            return null;
        }).onComplete(ar -> {
            if (ar.failed()) {
                LOG.error("notice {}: cannot record it as done ({}); it may be sent again after a restart",
                        d.notice.id(), ar.cause().toString());
            }
            List<Promise<Void>> ready = List.of();
            synchronized (lock) {
                completing--;
                lock.notifyAll();
                pending.remove(d.notice.id(), d);
                if (pending.isEmpty() && !drainers.isEmpty()) {
                    ready = new ArrayList<>(drainers);
                    drainers.clear();
                }
            }
            ready.forEach(Promise::tryComplete);
        });
    }

    private void event(Notice n, String state, int attempt, String error) {
        Map<String, Object> f = new LinkedHashMap<>();
        f.put("channel", n.channel());
        f.put("notice_id", n.id());
        f.put("attempt", attempt);
        f.put("pattern", n.pattern());
        f.put("error", error);
        try {
            sink.append(new PendingEvent(n.run(), EventType.NOTICE, n.iter(), state, n.severity(), f));
        } catch (RuntimeException e) {
            // the timeline failing must not stall delivery
            LOG.warn("cannot journal notice event for {}: {}", n.id(), e.toString());
        }
    }

    private static Duration max(Duration a, Duration b) {
        return a.compareTo(b) >= 0 ? a : b;
    }
}
