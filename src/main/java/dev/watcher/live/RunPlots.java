package dev.watcher.live;

import java.math.BigDecimal;
import java.util.ArrayList;
import java.util.List;
import java.util.Objects;

/**
 * A snapshot of one run's bounded history for the live plots: one {@link Trace} per residual and per
 * monitor. The daemon builds it from its downsampled history (one trace per series, one point per bucket).
 *
 * @param lastIter       the iteration of the last record in the history
 * @param residuals      one trace per equation, in the log's order
 * @param monitors       one trace per monitor
 * @param residualLevels horizontal lines to read the residuals against (see {@link #residualLevels(double)})
 */
public record RunPlots(long lastIter, List<Trace> residuals, List<Trace> monitors, List<Level> residualLevels) {

    /**
     * A residual this high is a loose level of convergence for most steady cases: the first level line of the
     * residual plot (common practice, no published source).
     */
    public static final double LOOSE_RESIDUAL = 1e-3;

    public RunPlots {
        residuals = residuals == null ? List.of() : List.copyOf(residuals);
        monitors = monitors == null ? List.of() : List.copyOf(monitors);
        residualLevels = residualLevels == null ? List.of() : List.copyOf(residualLevels);
    }

    /** A horizontal line across a plot at {@code value}, with its label. */
    public record Level(double value, String label) {

        public Level {
            Objects.requireNonNull(label, "label");
            if (!(value > 0) || Double.isInfinite(value)) {
                throw new IllegalArgumentException("a level on a log axis must be positive and finite: " + value);
            }
        }
    }

    /**
     * The level lines of a residual plot: {@link #LOOSE_RESIDUAL} ({@code loose 1e-3}) and the run's residual
     * target ({@code target 1e-5}); one line labelled as the target when the two are the same. A target that
     * is not a positive finite number (none configured as an absolute value) draws no target line.
     */
    public static List<Level> residualLevels(double target) {
        List<Level> out = new ArrayList<>(2);
        boolean hasTarget = target > 0 && !Double.isInfinite(target);
        if (!hasTarget || target != LOOSE_RESIDUAL) {
            out.add(new Level(LOOSE_RESIDUAL, "loose " + sci(LOOSE_RESIDUAL)));
        }
        if (hasTarget) {
            out.add(new Level(target, "target " + sci(target)));
        }
        return out;
    }

    /** A short scientific form: {@code 1e-5}, {@code 2.5e-6}, {@code 1e+2}. */
    static String sci(double v) {
        BigDecimal b = BigDecimal.valueOf(v).round(new java.math.MathContext(3)).stripTrailingZeros();
        int exp = b.precision() - b.scale() - 1;
        String mant = b.movePointLeft(exp).stripTrailingZeros().toPlainString();
        return mant + "e" + (exp >= 0 ? "+" : "") + exp;
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
