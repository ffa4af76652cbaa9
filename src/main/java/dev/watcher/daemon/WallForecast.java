package dev.watcher.daemon;

import java.math.BigDecimal;
import java.math.MathContext;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayDeque;
import java.util.Deque;
import java.util.LinkedHashMap;
import java.util.Map;

/**
 * Wall-time forecasts of a live run: the iteration rate observed over a recent window, and the convergence
 * forecasts of the {@code converged} judge (in iterations) turned into seconds with it.
 *
 * <p>The rate counts the log's iteration counter, not records, because the forecasts count iterations (a log
 * that prints every tenth iteration advances ten per record). It is measured over the last {@code window}
 * of time (two minutes by default): the oldest observation kept is the newest one at least that old, so a
 * slowdown shows within a window and a run that halted shows the halt's pace once it writes again. An
 * iteration counter that goes back (a restart from a snapshot) starts the window again: its jump is not the
 * solver's pace. Until the observations span {@code minSpan} (5 s) with the counter advancing, the rate is
 * not known and there is no forecast.
 *
 * <p>The caller observes only once the run has caught up with its log, so the history read at full speed
 * does not count. Time comes in as an argument: this class reads no clock. Not thread-safe: one run's
 * thread owns it. Memory is bounded: at most {@value #MAX_POINTS} observations are kept.
 */
final class WallForecast {

    /** The window over which the rate is measured when none is given. */
    static final Duration WINDOW = Duration.ofMinutes(2);
    /** The shortest span of observations that gives a rate when none is given. */
    static final Duration MIN_SPAN = Duration.ofSeconds(5);
    /** The most observations kept (the run saves at most every two seconds: a two-minute window holds ~60). */
    static final int MAX_POINTS = 512;

    private static final MathContext FOUR = new MathContext(4);

    private record Point(Instant at, long iter) {
    }

    private final Duration window;
    private final Duration minSpan;
    private final Deque<Point> points = new ArrayDeque<>();

    WallForecast() {
        this(WINDOW, MIN_SPAN);
    }

    /**
     * @param window  how far back the rate looks (at least this much once the run has been followed that long)
     * @param minSpan the shortest span of observations that gives a rate
     */
    WallForecast(Duration window, Duration minSpan) {
        if (window.isNegative() || window.isZero() || minSpan.isNegative() || minSpan.compareTo(window) > 0) {
            throw new IllegalArgumentException("need 0 <= minSpan <= window, window > 0: " + minSpan + ", " + window);
        }
        this.window = window;
        this.minSpan = minSpan;
    }

    /**
     * One observation: the run's last iteration at {@code now}. Times must not go back; an earlier time is
     * ignored (a clock stepped backwards says nothing about the pace).
     */
    void observe(Instant now, long iter) {
        Point last = points.peekLast();
        if (last != null && now.isBefore(last.at())) {
            return;
        }
        if (last != null && iter < last.iter()) {
            points.clear(); // the counter went back: a restart, whose jump is not the pace
        }
        points.addLast(new Point(now, iter));
        Instant start = now.minus(window);
        // drop the oldest while the next one is itself at least a window old: the span stays >= window
        while (points.size() > 2 && !second().at().isAfter(start)) {
            points.removeFirst();
        }
        while (points.size() > MAX_POINTS) {
            points.removeFirst();
        }
    }

    private Point second() {
        var it = points.iterator();
        it.next();
        return it.next();
    }

    /** Seconds between the oldest and newest observation the rate is measured over; 0 without two. */
    double spanSeconds() {
        if (points.size() < 2) {
            return 0;
        }
        return Duration.between(points.peekFirst().at(), points.peekLast().at()).toMillis() / 1000.0;
    }

    /**
     * Iterations per second over the window, rounded to 4 significant digits; NaN while not known (fewer
     * than two observations, a span shorter than {@code minSpan}, or the counter has not advanced).
     */
    double rate() {
        if (points.size() < 2) {
            return Double.NaN;
        }
        Point a = points.peekFirst();
        Point b = points.peekLast();
        long ms = Duration.between(a.at(), b.at()).toMillis();
        long its = b.iter() - a.iter();
        if (ms <= 0 || ms < minSpan.toMillis() || its <= 0) {
            return Double.NaN;
        }
        return new BigDecimal(its * 1000.0 / ms).round(FOUR).doubleValue();
    }

    /**
     * The wall-time forecast for the state file, from the {@code converged} judge's snapshot (its {@code
     * equations}: per equation {@code forecast}, {@code iterations}, {@code iterations_low}, {@code
     * iterations_high}); empty while the rate is not known or without such a snapshot.
     *
     * <p>{@code iterations_per_second} (as {@link #rate()}), {@code rate_seconds} (the span it was measured
     * over) and {@code equations}: per equation its {@code forecast} status as the judge gave it, and for a
     * forecast in iterations {@code seconds}, {@code seconds_low}, {@code seconds_high} = the iterations (low,
     * high) divided by the rate as written, rounded to whole seconds. An equation "not converging" or
     * "unknown" is carried with its status and no seconds. The range is the fit's interval only: it does not
     * include how the rate may change.
     */
    Map<String, Object> forecast(Object convergedSnapshot) {
        double rate = rate();
        if (Double.isNaN(rate) || !(convergedSnapshot instanceof Map<?, ?> c)
                || !(c.get("equations") instanceof Map<?, ?> eqs)) {
            return Map.of();
        }
        Map<String, Object> out = new LinkedHashMap<>();
        out.put("iterations_per_second", rate);
        out.put("rate_seconds", spanSeconds());
        Map<String, Object> per = new LinkedHashMap<>();
        for (Map.Entry<?, ?> e : eqs.entrySet()) {
            if (!(e.getValue() instanceof Map<?, ?> f) || f.get("forecast") == null) {
                continue; // no forecast yet for this equation
            }
            Map<String, Object> w = new LinkedHashMap<>();
            w.put("forecast", f.get("forecast").toString());
            for (String k : new String[] {"iterations", "iterations_low", "iterations_high"}) {
                if (f.get(k) instanceof Number n && Double.isFinite(n.doubleValue()) && n.doubleValue() >= 0) {
                    w.put(k.replace("iterations", "seconds"), Math.round(n.doubleValue() / rate));
                }
            }
            per.put(e.getKey().toString(), w);
        }
        out.put("equations", per);
        return out;
    }
}
