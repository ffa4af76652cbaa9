package dev.watcher.notify;

import java.time.Duration;
import java.util.concurrent.ThreadLocalRandom;
import java.util.function.DoubleSupplier;

/**
 * Timing and bookkeeping of delivery. Production uses {@link #defaults()}; tests shorten the delays so that
 * no test waits for real minutes.
 *
 * @param baseBackoff        delay after the first failed attempt (doubled per further attempt)
 * @param maxBackoff         cap of the backoff when a channel does not set one
 * @param timeout            per-attempt bound when a channel does not set one
 * @param maxAttempts        attempts when a channel does not set them
 * @param doneIdsKept        how many delivered or given-up notice ids are remembered across restarts
 * @param jitter             uniform random numbers in [0, 1) for the backoff jitter
 */
record DeliveryOptions(Duration baseBackoff, Duration maxBackoff, Duration timeout, int maxAttempts,
        int doneIdsKept, DoubleSupplier jitter) {

    static DeliveryOptions defaults() {
        return new DeliveryOptions(Duration.ofSeconds(2), Duration.ofMinutes(10), Duration.ofSeconds(10), 12,
                10_000, () -> ThreadLocalRandom.current().nextDouble());
    }

    DeliveryOptions withBaseBackoff(Duration d) {
        return new DeliveryOptions(d, maxBackoff, timeout, maxAttempts, doneIdsKept, jitter);
    }

    DeliveryOptions withMaxBackoff(Duration d) {
        return new DeliveryOptions(baseBackoff, d, timeout, maxAttempts, doneIdsKept, jitter);
    }

    DeliveryOptions withTimeout(Duration d) {
        return new DeliveryOptions(baseBackoff, maxBackoff, d, maxAttempts, doneIdsKept, jitter);
    }

    DeliveryOptions withMaxAttempts(int n) {
        return new DeliveryOptions(baseBackoff, maxBackoff, timeout, n, doneIdsKept, jitter);
    }

    DeliveryOptions withDoneIdsKept(int n) {
        return new DeliveryOptions(baseBackoff, maxBackoff, timeout, maxAttempts, n, jitter);
    }
}
