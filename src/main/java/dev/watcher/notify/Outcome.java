package dev.watcher.notify;

import java.time.Duration;

/**
 * The outcome of one delivery attempt, as a value: a notifier never fails its future, it says what happened.
 *
 * @param result     what the dispatcher does next
 * @param error      what went wrong, safe to log (URLs redacted, no secrets); null when sent
 * @param retryAfter the receiver's wish for the next attempt (Retry-After), or null
 */
record Outcome(Result result, String error, Duration retryAfter) {

    /** What the dispatcher does after an attempt. */
    enum Result {
        /** Delivered: record the id as done, remove from the outbox. */
        SENT,
        /** Failed, worth another attempt after the backoff. */
        RETRY,
        /** Failed because the receiver is overloaded (429, 502, 503, 504): back off harder. */
        SLOW_DOWN,
        /** Failed for good (a permanent SMTP reply, say): give up now. */
        GIVE_UP,
        /** The endpoint is gone (410): give up now, and the channel takes no further notices. */
        DISABLE
    }

    static Outcome sent() {
        return new Outcome(Result.SENT, null, null);
    }

    static Outcome retry(String error, Duration retryAfter) {
        return new Outcome(Result.RETRY, error, retryAfter);
    }

    static Outcome slowDown(String error, Duration retryAfter) {
        return new Outcome(Result.SLOW_DOWN, error, retryAfter);
    }

    static Outcome giveUp(String error) {
        return new Outcome(Result.GIVE_UP, error, null);
    }

    static Outcome disable(String error) {
        return new Outcome(Result.DISABLE, error, null);
    }

    boolean retryable() {
        return result == Result.RETRY || result == Result.SLOW_DOWN;
    }
}
