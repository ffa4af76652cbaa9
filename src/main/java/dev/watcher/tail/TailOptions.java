package dev.watcher.tail;

import java.time.Duration;
import java.util.Objects;

/**
 * How the tail stage reads.
 *
 * @param maxLineBytes longest line kept, in bytes; longer lines are cut to this and counted
 * @param minPoll      the poll interval while the file grows
 * @param maxPoll      the longest interval the follower backs off to while the file is idle
 */
public record TailOptions(int maxLineBytes, Duration minPoll, Duration maxPoll) {

    /** 256 KiB lines, 500 ms while growing, backing off to 4 s while idle. */
    public static final TailOptions DEFAULTS =
            new TailOptions(256 * 1024, Duration.ofMillis(500), Duration.ofSeconds(4));

    public TailOptions {
        Objects.requireNonNull(minPoll, "minPoll");
        Objects.requireNonNull(maxPoll, "maxPoll");
        if (maxLineBytes < 16) {
            throw new IllegalArgumentException("maxLineBytes must be at least 16, got " + maxLineBytes);
        }
        if (minPoll.isNegative() || minPoll.isZero()) {
            throw new IllegalArgumentException("minPoll must be positive, got " + minPoll);
        }
        if (maxPoll.compareTo(minPoll) < 0) {
            throw new IllegalArgumentException("maxPoll " + maxPoll + " is shorter than minPoll " + minPoll);
        }
    }

    public TailOptions withMaxLineBytes(int n) {
        return new TailOptions(n, minPoll, maxPoll);
    }

    public TailOptions withPoll(Duration min, Duration max) {
        return new TailOptions(maxLineBytes, min, max);
    }
}
