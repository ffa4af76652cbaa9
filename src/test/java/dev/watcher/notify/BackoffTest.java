package dev.watcher.notify;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;

import java.time.Duration;
import java.time.Instant;
import org.junit.jupiter.api.Test;

class BackoffTest {

    private static final Outcome FAIL = Outcome.retry("HTTP 500", null);

    @Test
    void doublesPerAttemptWithinTheJitterBandAndStopsAtTheCap() {
        Backoff low = new Backoff(Duration.ofMillis(100), Duration.ofMillis(1000), () -> 0.0);
        Backoff high = new Backoff(Duration.ofMillis(100), Duration.ofMillis(1000), () -> 1.0);
        // equal jitter: the delay lies in [step/2, step], step = base * 2^(attempt-1), capped
        assertEquals(Duration.ofMillis(50), low.next(1, FAIL));
        assertEquals(Duration.ofMillis(100), high.next(1, FAIL));
        assertEquals(Duration.ofMillis(200), low.next(3, FAIL));
        assertEquals(Duration.ofMillis(400), high.next(3, FAIL));
        assertEquals(Duration.ofMillis(500), low.next(30, FAIL));
        assertEquals(Duration.ofMillis(1000), high.next(30, FAIL));
    }

    @Test
    void slowDownStepsFourTimesLonger() {
        Backoff b = new Backoff(Duration.ofMillis(100), Duration.ofSeconds(60), () -> 1.0);
        assertEquals(Duration.ofMillis(400), b.next(1, Outcome.slowDown("HTTP 429", null)));
        assertEquals(Duration.ofMillis(800), b.next(2, Outcome.slowDown("HTTP 429", null)));
    }

    @Test
    void retryAfterIsAFloorEvenAboveTheCap() {
        Backoff b = new Backoff(Duration.ofMillis(100), Duration.ofSeconds(1), () -> 0.5);
        assertEquals(Duration.ofSeconds(120), b.next(1, Outcome.slowDown("HTTP 429", Duration.ofSeconds(120))));
        // a shorter wish than the backoff does not shorten it
        assertEquals(Duration.ofMillis(75), b.next(1, Outcome.retry("HTTP 503", Duration.ZERO)));
    }

    @Test
    void parsesRetryAfterInBothFormsOfRfc9110() {
        // the two examples of RFC 9110 section 10.2.3: "Retry-After: Fri, 31 Dec 1999 23:59:59 GMT" and "120"
        Instant now = Instant.parse("1999-12-31T23:57:59Z");
        assertEquals(Duration.ofSeconds(120), Backoff.retryAfter("120", now));
        assertEquals(Duration.ofSeconds(120), Backoff.retryAfter("Fri, 31 Dec 1999 23:59:59 GMT", now));
        assertEquals(Duration.ZERO, Backoff.retryAfter("Fri, 31 Dec 1999 23:59:59 GMT",
                Instant.parse("2000-01-01T00:00:00Z")));
        assertNull(Backoff.retryAfter("soon", now));
        assertNull(Backoff.retryAfter(null, now));
    }

    @Test
    void refusesACapBelowTheBase() {
        assertThrows(IllegalArgumentException.class,
                () -> new Backoff(Duration.ofSeconds(2), Duration.ofSeconds(1), () -> 0.5));
    }
}
