package dev.watcher.detect;

import dev.watcher.model.Detection;
import dev.watcher.model.DetectionState;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.Patterns;
import java.util.List;
import java.util.stream.Collectors;

/** Reading facts off a residual history (where it bottomed out, when it grew 3 decades) and off detections. */
final class DetectorTestSupport {
    private DetectorTestSupport() {
    }

    static double log(IterationRecord r, String eq) {
        return Math.log10(r.residuals().get(eq, Double.NaN));
    }

    /** Index of the record at which {@code eq} is at its minimum before it first exceeds that minimum by {@code rise}. */
    static int onset(List<IterationRecord> rs, String eq, double rise) {
        double min = Double.POSITIVE_INFINITY;
        int at = -1;
        for (int i = 0; i < rs.size(); i++) {
            double y = log(rs.get(i), eq);
            if (!Double.isFinite(y)) {
                continue; // an exact zero (no log of zero) or a missing value
            }
            if (y < min) {
                min = y;
                at = i;
            } else if (y >= min + rise) {
                return at;
            }
        }
        return -1;
    }

    /** Iteration at which {@code eq} first stands {@code rise} decades above its running minimum (or is not finite). */
    static long deadline(List<IterationRecord> rs, String eq, double rise) {
        double min = Double.POSITIVE_INFINITY;
        for (IterationRecord r : rs) {
            double v = r.residuals().get(eq, Double.NaN);
            if (!Double.isFinite(v)) {
                return r.iter();
            }
            if (v <= 0) {
                continue; // an exact zero has no log
            }
            double y = Math.log10(v);
            min = Math.min(min, y);
            if (y >= min + rise) {
                return r.iter();
            }
        }
        return Long.MAX_VALUE;
    }

    /** Iteration of the first record with any non-finite residual. */
    static long firstNonFinite(List<IterationRecord> rs) {
        for (IterationRecord r : rs) {
            for (double v : r.residuals().values()) {
                if (!Double.isFinite(v)) {
                    return r.iter();
                }
            }
        }
        return Long.MAX_VALUE;
    }

    static List<Detection> of(List<Detection> ds, String pattern, DetectionState state) {
        return ds.stream().filter(d -> d.pattern().equals(pattern) && d.state() == state).collect(Collectors.toList());
    }

    /** Patterns that are not alarms: level, settling and convergence events, which a healthy run raises. */
    private static final java.util.Set<String> NOT_ALARMS = java.util.Set.of(Patterns.RESIDUAL_LEVEL,
            Patterns.MONITOR_SETTLED, Patterns.MONITOR_PERIODIC, Patterns.CONVERGED);

    /** The alarms among the detections (everything but level, settling and convergence events). */
    static List<String> alarms(List<Detection> ds) {
        return ds.stream().filter(d -> !NOT_ALARMS.contains(d.pattern()))
                .map(d -> d.iter() + " " + d.pattern() + " " + d.state().id() + " " + d.equations() + " " + d.summary())
                .collect(Collectors.toList());
    }
}
