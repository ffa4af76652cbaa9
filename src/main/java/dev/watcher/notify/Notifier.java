package dev.watcher.notify;

import dev.watcher.model.Notice;
import io.vertx.core.Future;
import java.time.Duration;

/**
 * One channel that delivers notices (a webhook endpoint, a mail relay). Called by the {@link Dispatcher} on
 * its Vert.x context, one attempt at a time per notice; attempts of different notices may overlap.
 */
interface Notifier {

    /** The channel name notices address. */
    String name();

    /** Attempts before a notice is given up. */
    int maxAttempts();

    /** Cap of the backoff between two attempts. */
    Duration maxBackoff();

    /**
     * Makes one attempt. The future always succeeds with an {@link Outcome}, failures included; it completes
     * within the channel's per-attempt timeout.
     *
     * @param attempt 1 for the first attempt
     */
    Future<Outcome> send(Notice notice, int attempt);

    /** Releases connections; no attempt may follow. */
    Future<Void> close();
}
