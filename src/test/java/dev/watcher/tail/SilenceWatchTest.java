package dev.watcher.tail;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.model.Detection;
import dev.watcher.model.DetectionState;
import dev.watcher.model.Patterns;
import dev.watcher.model.Severity;
import dev.watcher.testing.MutableClock;
import java.time.Duration;
import java.time.Instant;
import java.util.Optional;
import java.util.SplittableRandom;
import org.apache.commons.math3.stat.descriptive.rank.Median;
import org.junit.jupiter.api.Test;

class SilenceWatchTest {

    private final MutableClock clock = new MutableClock(Instant.parse("2026-03-01T08:00:00Z"));

    private void recordsEvery(SilenceWatch w, Duration d, int n) {
        for (int i = 0; i < n; i++) {
            clock.advance(d);
            w.onRecord(i + 1);
        }
    }

    @Test
    void staysQuietBeforeTheFirstRecordEvenForHours() {
        SilenceWatch w = SilenceWatch.withDefaults(clock);
        clock.advance(Duration.ofHours(6));
        assertEquals(Optional.empty(), w.check());
        assertTrue(!w.armed());
    }

    @Test
    void opensAfterTheMinimumSilenceWhenRecordsAreFrequent() {
        SilenceWatch w = new SilenceWatch(clock, Duration.ofMinutes(5), 20);
        recordsEvery(w, Duration.ofSeconds(1), 30);
        // 20 x 1 s = 20 s is below the 5 min floor, so the floor counts
        clock.advance(Duration.ofMinutes(5));
        assertEquals(Optional.empty(), w.check(), "exactly the threshold is not yet longer than it");
        clock.advance(Duration.ofSeconds(1));
        Detection d = w.check().orElseThrow();
        assertEquals(Patterns.LOG_SILENT, d.pattern());
        assertEquals(DetectionState.OPEN, d.state());
        assertEquals(Severity.WARNING, d.severity());
        assertEquals(30, d.iter());
        assertEquals(301.0, d.evidence().get("silent_seconds"));
        assertEquals(300.0, d.evidence().get("threshold_seconds"));
        assertEquals(1.0, d.evidence().get("median_interval_seconds"));
        assertTrue(d.summary().contains("5 min"), d.summary());
    }

    @Test
    void usesTheMedianFactorWhenRecordsAreSlow() {
        SilenceWatch w = new SilenceWatch(clock, Duration.ofMinutes(5), 20);
        recordsEvery(w, Duration.ofSeconds(60), 10);
        assertEquals(Duration.ofMinutes(20), w.threshold());
        clock.advance(Duration.ofMinutes(19));
        assertEquals(Optional.empty(), w.check());
        clock.advance(Duration.ofMinutes(2));
        Detection d = w.check().orElseThrow();
        assertEquals(1260.0, d.evidence().get("silent_seconds"));
        assertEquals(1200.0, d.evidence().get("threshold_seconds"));
        assertEquals(60.0, d.evidence().get("median_interval_seconds"));
    }

    @Test
    void opensOnlyOnceForOneSilence() {
        SilenceWatch w = SilenceWatch.withDefaults(clock);
        recordsEvery(w, Duration.ofSeconds(2), 5);
        clock.advance(Duration.ofMinutes(6));
        assertTrue(w.check().isPresent());
        clock.advance(Duration.ofMinutes(30));
        assertEquals(Optional.empty(), w.check());
    }

    @Test
    void resolvesOnceWhenRecordsComeBack() {
        SilenceWatch w = SilenceWatch.withDefaults(clock);
        recordsEvery(w, Duration.ofSeconds(2), 5);
        clock.advance(Duration.ofMinutes(6));
        assertEquals(DetectionState.OPEN, w.check().orElseThrow().state());
        clock.advance(Duration.ofMinutes(4));
        w.onRecord(6);
        Detection r = w.check().orElseThrow();
        assertEquals(DetectionState.RESOLVED, r.state());
        assertEquals(Patterns.LOG_SILENT, r.pattern());
        assertEquals(6, r.iter());
        assertEquals(600.0, r.evidence().get("silent_seconds"));
        assertEquals(300.0, r.evidence().get("threshold_seconds"));
        assertEquals(Optional.empty(), w.check());
        w.onRecord(7);
        assertEquals(Optional.empty(), w.check(), "no second resolve without a new open");
    }

    @Test
    void aRecordBeforeTheThresholdOpensNothing() {
        SilenceWatch w = SilenceWatch.withDefaults(clock);
        recordsEvery(w, Duration.ofSeconds(2), 5);
        clock.advance(Duration.ofMinutes(4));
        assertEquals(Optional.empty(), w.check());
        w.onRecord(6);
        clock.advance(Duration.ofMinutes(4));
        assertEquals(Optional.empty(), w.check());
    }

    @Test
    void medianIntervalMatchesCommonsMathOverTheLastWindow() {
        // reference: org.apache.commons.math3 Median (the 50th percentile, mean of the two middle values for even n)
        SplittableRandom rnd = new SplittableRandom(7);
        SilenceWatch w = new SilenceWatch(clock, Duration.ofSeconds(1), 3);
        w.onRecord();
        int n = 150;
        double[] secs = new double[n];
        for (int i = 0; i < n; i++) {
            secs[i] = 2 * rnd.nextInt(1, 400);
            clock.advance(Duration.ofSeconds((long) secs[i]));
            w.onRecord();
        }
        double[] window = java.util.Arrays.copyOfRange(secs, n - SilenceWatch.WINDOW, n);
        double median = new Median().evaluate(window);
        assertEquals(Duration.ofMillis((long) (3 * median * 1000)), w.threshold());
        clock.advance(Duration.ofSeconds((long) (3 * median) + 1));
        Detection d = w.check().orElseThrow();
        assertEquals(median, (double) d.evidence().get("median_interval_seconds"), 1e-9);
    }

    @Test
    void oneLongPauseDoesNotMoveTheMedianMuch() {
        SilenceWatch w = new SilenceWatch(clock, Duration.ofSeconds(10), 20);
        recordsEvery(w, Duration.ofSeconds(3), 20);
        clock.advance(Duration.ofMinutes(30));
        w.check();
        w.onRecord();
        w.check();
        recordsEvery(w, Duration.ofSeconds(3), 3);
        assertEquals(Duration.ofSeconds(60), w.threshold());
    }
}
