package dev.watcher.live;

import java.util.List;
import java.util.Objects;

/**
 * A snapshot of one run's bounded history for the live plots: one {@link Trace} per residual and per
 * monitor. The daemon builds it from its downsampled history (one trace per series, one point per bucket).
 *
 * @param lastIter  the iteration of the last record in the history
 * @param residuals one trace per equation, in the log's order
 * @param monitors  one trace per monitor
 */
public record RunPlots(long lastIter, List<Trace> residuals, List<Trace> monitors) {

    public RunPlots {
        residuals = residuals == null ? List.of() : List.copyOf(residuals);
        monitors = monitors == null ? List.of() : List.copyOf(monitors);
    }

    /**
     * One downsampled series: point {@code i} covers iterations up to {@code x[i]} and holds their minimum,
     * maximum and last value. The arrays have the same length and are copied.
     */
    public record Trace(String name, long[] x, double[] min, double[] max, double[] last) {

        public Trace {
            Objects.requireNonNull(name, "name");
            x = x.clone();
            min = min.clone();
            max = max.clone();
            last = last.clone();
            if (min.length != x.length || max.length != x.length || last.length != x.length) {
                throw new IllegalArgumentException("trace " + name + ": columns of different lengths");
            }
        }

        public int size() {
            return x.length;
        }
    }
}
