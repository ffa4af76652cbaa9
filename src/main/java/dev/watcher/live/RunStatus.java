package dev.watcher.live;

import java.util.Collections;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Objects;

/**
 * The state of one run at the time it was read: what the live page shows in its card and what the metrics
 * expose. Maps keep the caller's order (equations in the log's order) and are copied.
 *
 * @param run            the run's name (never null)
 * @param state          {@link #CATCHING_UP}, {@link #FOLLOWING} or {@link #ENDED}
 * @param lastIter       the iteration of the last record, or -1 before the first
 * @param residuals      latest residual per equation (non-finite values allowed)
 * @param monitors       latest value per monitor
 * @param openConditions pattern ids of the conditions open now (e.g. {@code single-equation-blowup})
 * @param lines          lines read from the log so far (monotonic)
 * @param records        iteration records assembled so far (monotonic)
 * @param malformed      malformed lines so far by kind id ({@code bad-number}, ...), monotonic per kind
 * @param forecast       the forecasts of the run's last saved state ({@link RunForecast#NONE} before the first)
 */
public record RunStatus(String run, String state, long lastIter, Map<String, Double> residuals,
        Map<String, Double> monitors, List<String> openConditions, long lines, long records,
        Map<String, Long> malformed, RunForecast forecast) {

    /** Reading what the log already held when the watch started. */
    public static final String CATCHING_UP = "catching-up";
    /** Reading new lines as they are written. */
    public static final String FOLLOWING = "following";
    /** The run ended (the log was closed, the job finished or was stopped). */
    public static final String ENDED = "ended";

    public RunStatus {
        Objects.requireNonNull(run, "run");
        state = state == null ? FOLLOWING : state;
        residuals = copy(residuals);
        monitors = copy(monitors);
        openConditions = openConditions == null ? List.of() : List.copyOf(openConditions);
        malformed = copy(malformed);
        forecast = forecast == null ? RunForecast.NONE : forecast;
    }

    private static <V> Map<String, V> copy(Map<String, V> m) {
        return m == null || m.isEmpty() ? Map.of() : Collections.unmodifiableMap(new LinkedHashMap<>(m));
    }

    /** The sum of malformed lines over all kinds. */
    public long malformedLines() {
        long s = 0;
        for (long v : malformed.values()) {
            s += v;
        }
        return s;
    }
}
