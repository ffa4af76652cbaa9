package dev.watcher.live;

import java.util.List;
import java.util.Objects;

/**
 * A run's forecasts at its last saved state, for the live page's forecast table: per equation whether and
 * when its residual reaches its target (in iterations, and in wall time when the live run's iteration rate
 * is known), per monitor the value it is heading for and the iterative error still left. The daemon builds
 * it from its detectors' snapshots and its wall-time forecast; this package only shows it. A value that is
 * not known is NaN.
 *
 * @param iterationsPerSecond the iteration rate observed in the live run, NaN while not known
 * @param rateSeconds         the span of time the rate was measured over, NaN while not known
 * @param verdict             the convergence judge's verdict at that state ({@code not yet}, {@code held back},
 *                            {@code converged}, {@code residuals-only}), empty before the first
 * @param waitingFor          monitors that hold a verdict back
 * @param equations           one row per equation, in the log's order
 * @param monitors            one row per monitor
 */
public record RunForecast(double iterationsPerSecond, double rateSeconds, String verdict, List<String> waitingFor,
        List<Equation> equations, List<Monitor> monitors) {

    /** Nothing forecast yet. */
    public static final RunForecast NONE = new RunForecast(Double.NaN, Double.NaN, "", List.of(), List.of(),
            List.of());

    /** The residual reaches its target within the fit's horizon, or is there already. */
    public static final String REACHED = "reached";
    /** The residual falls: {@link Equation#iterations()} says how soon it reaches the target. */
    public static final String CONVERGING = "converging";
    /** The fit's slope is not surely negative: no time to target can be given. */
    public static final String NOT_CONVERGING = "not converging";
    /** Too few samples since the last regime change to fit. */
    public static final String UNKNOWN = "unknown";

    public RunForecast {
        verdict = verdict == null ? "" : verdict;
        waitingFor = waitingFor == null ? List.of() : List.copyOf(waitingFor);
        equations = equations == null ? List.of() : List.copyOf(equations);
        monitors = monitors == null ? List.of() : List.copyOf(monitors);
    }

    /** Whether there is anything to show. */
    public boolean isEmpty() {
        return equations.isEmpty() && monitors.isEmpty() && verdict.isEmpty();
    }

    /**
     * One equation's forecast.
     *
     * @param name           the equation
     * @param status         {@link #REACHED}, {@link #CONVERGING}, {@link #NOT_CONVERGING} or {@link #UNKNOWN}
     *                       (the judge's word, carried as it is)
     * @param target         the residual target in force for this equation
     * @param iterations     iterations to the target (0 when reached), NaN when not given
     * @param iterationsLow  the interval's lower end, NaN when not given
     * @param iterationsHigh the interval's upper end, NaN when not given
     * @param seconds        wall seconds to the target at the observed rate, NaN without a rate
     * @param secondsLow     the interval's lower end in seconds, NaN without a rate
     * @param secondsHigh    the interval's upper end in seconds, NaN without a rate
     */
    public record Equation(String name, String status, double target, double iterations, double iterationsLow,
            double iterationsHigh, double seconds, double secondsLow, double secondsHigh) {

        public Equation {
            Objects.requireNonNull(name, "name");
            status = status == null ? UNKNOWN : status;
        }
    }

    /**
     * One monitor's forecast.
     *
     * @param name           the monitor
     * @param state          its state as judged ({@code settled}, {@code periodic}, {@code not settled}, or the
     *                       reason it is not settled)
     * @param value          the judged value (mean of the settled part, or cycle mean), NaN when not given
     * @param predictedFinal the value it is heading for, NaN when not given
     * @param remainingError the iterative error still left: the predicted final value minus the latest value,
     *                       in the monitor's units (0 when no geometric approach shows), NaN when not given
     */
    public record Monitor(String name, String state, double value, double predictedFinal, double remainingError) {

        public Monitor {
            Objects.requireNonNull(name, "name");
            state = state == null ? "" : state;
        }
    }
}
