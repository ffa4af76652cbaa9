package dev.watcher.tail;

import dev.watcher.model.Detection;
import dev.watcher.model.DetectionState;
import dev.watcher.model.Patterns;
import dev.watcher.model.Severity;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.util.Arrays;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Objects;
import java.util.Optional;

/**
 * The {@code log-silent} watchdog that stands beside a follower: it opens a warning when no record has come for
 * longer than {@code max(minSilence, medianFactor x median interval between records)}, and resolves it (once)
 * when records come back. Armed by the first record, so a queued job whose log does not exist yet never fires
 * it. Live only: it reads wall time from the injected clock, so replay does not use it.
 *
 * <p>The median is taken over the last {@value #WINDOW} intervals. Not thread-safe: call {@link #onRecord} and
 * {@link #check} from one thread (the follower's).
 */
public final class SilenceWatch {

    /** Five minutes: the least silence that counts. */
    public static final Duration DEFAULT_MIN_SILENCE = Duration.ofMinutes(5);
    /** Twenty times the median interval between records. */
    public static final double DEFAULT_MEDIAN_FACTOR = 20.0;

    static final int WINDOW = 64;

    private final Clock clock;
    private final Duration minSilence;
    private final double medianFactor;
    private final long[] intervalsMillis = new long[WINDOW];
    private int count;
    private int nextSlot;

    private Instant last;
    private long lastIter;
    private boolean open;
    private boolean resolvePending;
    private Instant openedSilenceStart;
    private Duration openedThreshold = Duration.ZERO;
    private Duration resolvedSilence = Duration.ZERO;

    public SilenceWatch(Clock clock, Duration minSilence, double medianFactor) {
        this.clock = Objects.requireNonNull(clock, "clock");
        this.minSilence = Objects.requireNonNull(minSilence, "minSilence");
        if (minSilence.isNegative() || minSilence.isZero()) {
            throw new IllegalArgumentException("minSilence must be positive, got " + minSilence);
        }
        if (!(medianFactor >= 0) || Double.isInfinite(medianFactor)) {
            throw new IllegalArgumentException("medianFactor must be a finite number >= 0, got " + medianFactor);
        }
        this.medianFactor = medianFactor;
    }

    /** With the defaults: 5 minutes and 20x the median interval. */
    public static SilenceWatch withDefaults(Clock clock) {
        return new SilenceWatch(clock, DEFAULT_MIN_SILENCE, DEFAULT_MEDIAN_FACTOR);
    }

    /** A record arrived now; the detections it leads to will carry the last iteration seen (0 until one is). */
    public void onRecord() {
        Instant now = clock.instant();
        if (last != null) {
            long ms = Math.max(0, Duration.between(last, now).toMillis());
            intervalsMillis[nextSlot] = ms;
            nextSlot = (nextSlot + 1) % WINDOW;
            count = Math.min(count + 1, WINDOW);
        }
        if (open) {
            open = false;
            resolvePending = true;
            resolvedSilence = Duration.between(openedSilenceStart, now);
        }
        last = now;
    }

    /** A record of iteration {@code iter} arrived now. */
    public void onRecord(long iter) {
        lastIter = iter;
        onRecord();
    }

    /** True once the first record has come. */
    public boolean armed() {
        return last != null;
    }

    /** The silence that counts now: {@code max(minSilence, medianFactor x median interval)}. */
    public Duration threshold() {
        long median = medianMillis();
        long scaled = (long) Math.min(Long.MAX_VALUE / 2.0, medianFactor * median);
        Duration d = Duration.ofMillis(scaled);
        return d.compareTo(minSilence) > 0 ? d : minSilence;
    }

    /**
     * Looks at the clock: an {@link DetectionState#OPEN} detection the first time the silence exceeds the
     * threshold, a {@link DetectionState#RESOLVED} one the first check after records came back, otherwise
     * empty. Call it every few seconds.
     */
    public Optional<Detection> check() {
        if (resolvePending) {
            resolvePending = false;
            Map<String, Object> ev = new LinkedHashMap<>();
            ev.put("silent_seconds", seconds(resolvedSilence));
            ev.put("threshold_seconds", seconds(openedThreshold));
            ev.put("median_interval_seconds", medianMillis() / 1000.0);
            return Optional.of(new Detection(Patterns.LOG_SILENT, DetectionState.RESOLVED, Severity.WARNING,
                    lastIter, List.of(), null,
                    "The log is being written again after " + human(resolvedSilence) + " of silence",
                    "", ev));
        }
        if (last == null || open) {
            return Optional.empty();
        }
        Instant now = clock.instant();
        Duration silent = Duration.between(last, now);
        Duration threshold = threshold();
        if (silent.compareTo(threshold) <= 0) {
            return Optional.empty();
        }
        open = true;
        openedSilenceStart = last;
        openedThreshold = threshold;
        Map<String, Object> ev = new LinkedHashMap<>();
        ev.put("silent_seconds", seconds(silent));
        ev.put("threshold_seconds", seconds(threshold));
        ev.put("median_interval_seconds", medianMillis() / 1000.0);
        return Optional.of(new Detection(Patterns.LOG_SILENT, DetectionState.OPEN, Severity.WARNING, lastIter,
                List.of(), null,
                "No new record for " + human(silent) + " (expected one within " + human(threshold) + ")",
                "Check that the job is still running and writing: queue state, a hung rank, a full disk or quota; "
                        + "a solver that buffers its output writes in bursts (run it line-buffered)",
                ev));
    }

    private long medianMillis() {
        if (count == 0) {
            return 0;
        }
        long[] s = Arrays.copyOf(intervalsMillis, count);
        Arrays.sort(s);
        return count % 2 == 1 ? s[count / 2] : (s[count / 2 - 1] + s[count / 2]) / 2;
    }

    private static double seconds(Duration d) {
        return d.toMillis() / 1000.0;
    }

    private static String human(Duration d) {
        long s = d.toSeconds();
        if (s < 120) {
            return s + " s";
        }
        if (s < 7200) {
            return (s / 60) + " min";
        }
        return String.format(java.util.Locale.ROOT, "%.1f h", s / 3600.0);
    }
}
