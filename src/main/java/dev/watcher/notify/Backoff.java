package dev.watcher.notify;

import java.time.Duration;
import java.time.Instant;
import java.time.ZonedDateTime;
import java.time.format.DateTimeFormatter;
import java.time.format.DateTimeParseException;
import java.util.function.DoubleSupplier;

/**
 * When to try again: exponential backoff with "equal jitter" (half the step fixed, half random), capped; a
 * receiver that asks to slow down (429, 502, 503, 504) gets a step four times longer; a Retry-After from the
 * receiver is a floor, honoured even above the cap. Pure: the caller passes the time and the random source.
 */
final class Backoff {

    private final Duration base;
    private final Duration cap;
    private final DoubleSupplier random;

    Backoff(Duration base, Duration cap, DoubleSupplier random) {
        if (base.isNegative() || base.isZero() || cap.compareTo(base) < 0) {
            throw new IllegalArgumentException("backoff needs 0 < base <= cap, got " + base + " and " + cap);
        }
        this.base = base;
        this.cap = cap;
        this.random = random;
    }

    /**
     * The delay before the next attempt.
     *
     * @param attemptsMade attempts made so far (1 after the first)
     * @param outcome      the last attempt's outcome (its kind and Retry-After)
     */
    Duration next(int attemptsMade, Outcome outcome) {
        int exponent = Math.max(0, attemptsMade - 1);
        if (outcome.result() == Outcome.Result.SLOW_DOWN) {
            exponent += 2;
        }
        long capMs = cap.toMillis();
        long stepMs = base.toMillis();
        for (int i = 0; i < exponent && stepMs < capMs; i++) {
            stepMs *= 2;
        }
        stepMs = Math.min(stepMs, capMs);
        long half = stepMs / 2;
        long delayMs = half + (long) Math.floor(random.getAsDouble() * (stepMs - half));
        Duration delay = Duration.ofMillis(delayMs);
        Duration wish = outcome.retryAfter();
        if (wish != null && wish.compareTo(delay) > 0) {
            delay = wish;
        }
        return delay;
    }

    /**
     * Parses an HTTP Retry-After value (RFC 9110 section 10.2.3): either delay-seconds or an HTTP date
     * (IMF-fixdate, which RFC 1123 date parsing accepts). A date in the past gives zero.
     *
     * @return the wait, or null when the header is absent or malformed
     */
    static Duration retryAfter(String header, Instant now) {
        if (header == null || header.isBlank()) {
            return null;
        }
        String v = header.strip();
        if (v.chars().allMatch(Character::isDigit)) {
            try {
                return Duration.ofSeconds(Long.parseLong(v));
            } catch (NumberFormatException e) {
                return null;
            }
        }
        try {
            Instant at = ZonedDateTime.parse(v, DateTimeFormatter.RFC_1123_DATE_TIME).toInstant();
            Duration d = Duration.between(now, at);
            return d.isNegative() ? Duration.ZERO : d;
        } catch (DateTimeParseException e) {
            return null;
        }
    }
}
