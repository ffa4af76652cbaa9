package dev.watcher.rules;

import java.time.Duration;
import java.time.Instant;
import java.util.List;

/**
 * A muting window: notices (and stop requests) about the listed patterns of the listed runs are held back
 * while it lasts. Conditions keep being tracked, so one still open when the window ends is notified then.
 *
 * @param patterns pattern ids; empty means every pattern
 * @param runs     run names or globs ({@code *}, {@code ?}); empty means every run
 * @param from     start (inclusive), or null for "from the start"
 * @param until    end (exclusive), or null for "no end"
 * @param lasting  alternatively a length counted from the moment the decider was made (the daemon's start),
 *                 or null
 */
public record Quiet(List<String> patterns, List<String> runs, Instant from, Instant until, Duration lasting) {

    public Quiet {
        patterns = patterns == null ? List.of() : List.copyOf(patterns);
        runs = runs == null ? List.of() : List.copyOf(runs);
    }

    /** True when this window holds back {@code pattern} of {@code run} at {@code now}. */
    public boolean mutes(String run, String pattern, Instant now, Instant start) {
        if (!patterns.isEmpty() && !patterns.contains(pattern)) {
            return false;
        }
        if (!runs.isEmpty() && runs.stream().noneMatch(g -> RunGlob.matches(g, run))) {
            return false;
        }
        if (from != null && now.isBefore(from)) {
            return false;
        }
        if (until != null && !now.isBefore(until)) {
            return false;
        }
        return lasting == null || now.isBefore(start.plus(lasting));
    }
}
