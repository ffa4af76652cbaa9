package dev.watcher.daemon;

import dev.watcher.detect.DetectSettings;
import dev.watcher.detect.Detector;
import dev.watcher.detect.Detectors;
import dev.watcher.live.RunForecast;
import dev.watcher.model.IterationRecord;
import java.time.Duration;
import java.time.Instant;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * For the live view's tests (package {@code live}, which must not see the daemon's classes from its main
 * code): what a watched run hands the live view, made by the daemon's own code. The detectors' snapshots as a
 * save takes them, the wall forecast of a live run written at a pace the caller gives, and their conversion
 * by {@link LiveBridge}.
 */
public final class LiveFeeds {

    /** What a run's save holds: the detectors' snapshots (by class name) and the wall forecast. */
    public record Saved(Map<String, Object> snapshot, Map<String, Object> wall) {

        /** The live view's forecasts of this save, as the run publishes them. */
        public RunForecast forecast() {
            return LiveBridge.forecastOf(snapshot, wall);
        }
    }

    private LiveFeeds() {
    }

    /**
     * The standard detectors over {@code records}, and a wall forecast as if the log had been written at
     * {@code iterationsPerSecond} for the two minutes before the save (observed every two seconds, as the daemon
     * saves). A pace of 0 leaves the wall forecast empty (the rate not known yet).
     */
    public static Saved save(List<IterationRecord> records, DetectSettings settings, double iterationsPerSecond) {
        List<Detector> ds = Detectors.standard(settings);
        for (IterationRecord r : records) {
            for (Detector d : ds) {
                d.observe(r, x -> { });
            }
        }
        Map<String, Object> snap = new LinkedHashMap<>();
        for (Detector d : ds) {
            Map<String, Object> s = d.snapshot();
            if (!s.isEmpty()) {
                snap.put(d.getClass().getSimpleName(), s);
            }
        }
        WallForecast w = new WallForecast();
        if (iterationsPerSecond > 0) {
            long last = records.get(records.size() - 1).iter();
            Instant end = Instant.parse("2026-03-02T21:00:00Z");
            for (int s = 120; s >= 0; s -= 2) {
                w.observe(end.minus(Duration.ofSeconds(s)), last - Math.round(s * iterationsPerSecond));
            }
        }
        return new Saved(snap, w.forecast(snap.get("ConvergedDetector")));
    }

    /** The residual target a run's plot draws its level line at, for these settings. */
    public static double residualTarget(DetectSettings settings) {
        return LiveBridge.residualTarget(settings);
    }
}
