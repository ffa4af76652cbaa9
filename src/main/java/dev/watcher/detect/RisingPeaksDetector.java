package dev.watcher.detect;

import dev.watcher.detect.stats.QuadraticFit;
import dev.watcher.detect.stats.RollingWindow;
import dev.watcher.detect.stats.Periodogram;
import dev.watcher.detect.stats.SeasonalKendall;
import dev.watcher.model.Detection;
import dev.watcher.model.DetectionState;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.Patterns;
import dev.watcher.model.Samples;
import dev.watcher.model.Severity;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.function.Consumer;

/**
 * {@code rising-peaks} (unsteady runs): the residual at the first inner iteration of each time step (the
 * step's peak) climbs step after step. The run is split into steps by {@link TimeSteps}; per equation the
 * log10 peaks of the last {@code steps} steps are tested for an upward trend with the Mann–Kendall test
 * (exact for ten steps or fewer), and the Theil–Sen slope must exceed a floor so that a statistically
 * certain but negligible rise does not alarm. Periodic flows make the peaks periodic: when the detrended
 * peaks show an autocorrelation peak at a lag P, the test compares whole periods (the seasonal Kendall test
 * with period P, each step against the same phase of other periods), so a pattern that only repeats is not
 * called rising. Before two whole periods are on record no period can show, and the rising half of a slow
 * oscillation looks like a trend; and a period that shows may be a faster one than the oscillation that
 * climbs. So a climb must also lead above the peaks seen before it started: the latest peak must exceed by
 * {@code above_seen_decades} the highest peak of the kept history ({@code history_steps}) before the lowest
 * peak of the judged steps. A periodic component brings the peaks back to levels already seen; the peaks of
 * a time step that is too large keep climbing past them. The first climb of a segment that starts from rest
 * (peaks climbing from the first steps to a level never seen before) cannot be told from the start of a
 * blow-up by the peaks alone: it may open, and resolves when the climb stops.
 *
 * <p>Parameters ({@code rising-peaks.}): {@code steps} judged (20, kept within 10..30), {@code min_steps}
 * before judging (10), {@code alpha} one-sided (0.01), {@code min_slope_decades_per_step} (0.02), {@code
 * min_rise_decades} over the judged steps (0.3), {@code period_acf} autocorrelation that makes a lag a period
 * (0.4), {@code history_steps} kept for the period check and the levels seen (256), {@code above_seen_decades}
 * (0.3, a factor of two), {@code min_level} below which peaks are round-off and never called rising (1e-10),
 * {@code min_end_slope_ratio} below which a levelling-off climb is not called rising (0.5), {@code
 * jump_decades} for splitting logs without step or inner fields (1.0), {@code resolve_alpha} (0.1) and {@code
 * clear_steps} (3): the condition resolves after that many consecutive steps in which no named equation still
 * rises even at the relaxed level (p below resolve_alpha with half the slope floor).
 *
 * <p>Cost: nothing per record beyond the step splitting (which {@link Detectors#standard} shares with {@code
 * inner-stall}). Per finished step and equation: the Mann–Kendall statistic, O(steps^2), or O(n^2 / P) over
 * the whole periods compared; the Sen slope only when the p-value is small; and the period search over the
 * kept history (O(history_steps) per lag examined, stopping at the first period) every {@value
 * #PERIOD_EVERY} steps while the history fills, every history_steps / 8 steps once it is full.
 */
final class RisingPeaksDetector implements Detector {

    private static final String REMEDY = "The time step is too large or there are too few inner iterations per step: "
            + "reduce the time step or add inner iterations.";
    private static final int PERIOD_EVERY = 8;

    private final int window;
    private final int minSteps;
    private final double alpha;
    private final double minSlope;
    private final double minRise;
    private final double periodAcf;
    private final double resolveAlpha;
    private final int clearSteps;
    private final TimeSteps steps;
    private final int historySteps;
    private final double aboveSeen;
    private final double minLevel;
    private final double minEndRatio;
    private final PerName<Eq> eqs;
    // equations in the order of their first peak in the segment, and in the order of their first judgement
    private final List<Eq> ordered = new ArrayList<>();
    private final List<Eq> judged = new ArrayList<>();
    private final double[] recentBuf;
    private final double[] historyBuf;
    private final double[] tailBuf;
    private final double[] detrendBuf;
    private List<String> openEquations = List.of();
    private int quiet;
    private int segmentSeen;

    /** The per-equation state: recent and longer peaks (log10), the cached period and the latest test. */
    private final class Eq {
        final String name;
        final RollingWindow peaks = new RollingWindow(window);
        final RollingWindow history = new RollingWindow(historySteps);
        boolean listed;
        int period = 1;
        int periodCalls;
        SeasonalKendall lastTest;

        Eq(String name) {
            this.name = name;
        }

        void clear() {
            peaks.clear();
            history.clear();
            listed = false;
            period = 1;
            periodCalls = 0;
        }
    }

    RisingPeaksDetector(DetectSettings s) {
        this(s, null);
    }

    /** With the run's shared step splitter, used when its jump threshold is this detector's. */
    RisingPeaksDetector(DetectSettings s, TimeSteps shared) {
        String p = Patterns.RISING_PEAKS + ".";
        this.window = Math.max(10, Math.min(30, s.integer(p + "steps", 20)));
        this.minSteps = Math.max(5, Math.min(window, s.integer(p + "min_steps", 10)));
        this.alpha = s.number(p + "alpha", 0.01);
        this.minSlope = s.number(p + "min_slope_decades_per_step", 0.02);
        this.minRise = s.number(p + "min_rise_decades", 0.3);
        this.periodAcf = s.number(p + "period_acf", 0.4);
        this.resolveAlpha = s.number(p + "resolve_alpha", 0.1);
        this.clearSteps = Math.max(1, s.integer(p + "clear_steps", 3));
        double jump = jumpDecades(s);
        this.steps = shared != null && shared.jumpDecades() == jump ? shared : new TimeSteps(jump);
        this.historySteps = Math.max(2 * window, s.integer(p + "history_steps", 256));
        this.aboveSeen = s.number(p + "above_seen_decades", 0.3);
        this.minLevel = Math.log10(s.number(p + "min_level", 1e-10));
        this.minEndRatio = s.number(p + "min_end_slope_ratio", 0.5);
        this.eqs = new PerName<>(Eq::new);
        this.recentBuf = new double[window];
        this.historyBuf = new double[historySteps];
        this.tailBuf = new double[historySteps];
        this.detrendBuf = new double[historySteps];
    }

    /** {@code rising-peaks.jump_decades}: the jump that splits logs without step or inner fields into steps. */
    static double jumpDecades(DetectSettings s) {
        return s.number(Patterns.RISING_PEAKS + ".jump_decades", 1.0);
    }

    @Override
    public void observe(IterationRecord record, Consumer<Detection> out) {
        if (record.segment() != segmentSeen) {
            segment(record.segment(), record.iter(), out);
        }
        TimeSteps.Step step = steps.accept(record);
        if (step == null || !steps.unsteady()) {
            return;
        }
        Samples peaks = step.peaks();
        List<Eq> slots = eqs.slots(peaks.names());
        for (int i = 0; i < peaks.size(); i++) {
            double v = peaks.value(i);
            if (v > 0 && v < Double.POSITIVE_INFINITY) {
                Eq e = slots.get(i);
                double l = Math.log10(v);
                e.peaks.add(l);
                e.history.add(l);
                if (!e.listed) {
                    e.listed = true;
                    ordered.add(e);
                }
            }
        }
        judge(step, out);
    }

    private void judge(TimeSteps.Step step, Consumer<Detection> out) {
        List<String> rising = null;
        List<String> relaxed = null;
        SeasonalKendall worst = null;
        String worstEq = null;
        for (Eq e : ordered) {
            RollingWindow w = e.peaks;
            if (w.size() < minSteps) {
                continue;
            }
            SeasonalKendall t = test(e);
            if (e.lastTest == null) {
                judged.add(e);
            }
            e.lastTest = t;
            int n = t.n();
            boolean up = t.pIncreasing() < alpha && t.slope() >= minSlope && t.slope() * (n - 1) >= minRise
                    && w.last() > minLevel && !saturating(t, w) && !withinSeen(e);
            if (up) {
                if (rising == null) {
                    rising = new ArrayList<>();
                }
                rising.add(e.name);
                if (worst == null || t.slope() > worst.slope()) {
                    worst = t;
                    worstEq = e.name;
                }
            }
            if (t.pIncreasing() < resolveAlpha && t.slope() >= minSlope / 2) {
                if (relaxed == null) {
                    relaxed = new ArrayList<>();
                }
                relaxed.add(e.name);
            }
        }
        long iter = step.lastIter();
        if (openEquations.isEmpty()) {
            if (rising != null) {
                openEquations = List.copyOf(rising);
                quiet = 0;
                out.accept(new Detection(Patterns.RISING_PEAKS, DetectionState.OPEN, Severity.WARNING, iter,
                        openEquations, null,
                        String.format(Locale.ROOT,
                                "residual peaks at the start of each time step climb in %s: %.3g decades per step"
                                        + " over the last %d steps",
                                String.join(", ", openEquations), worst.slope(), worst.n()),
                        REMEDY, evidence(worstEq, worst)));
            }
            return;
        }
        boolean still = false;
        if (relaxed != null) {
            for (String eq : openEquations) {
                still |= relaxed.contains(eq);
            }
        }
        quiet = still ? 0 : quiet + 1;
        if (quiet >= clearSteps) {
            Eq first = eqs.get(openEquations.get(0));
            SeasonalKendall t = first == null ? null : completed(first);
            out.accept(new Detection(Patterns.RISING_PEAKS, DetectionState.RESOLVED, Severity.WARNING, iter,
                    openEquations, null, "residual peaks no longer climb from step to step", REMEDY,
                    t == null ? Map.of() : evidence(openEquations.get(0), t)));
            openEquations = List.of();
            quiet = 0;
        }
    }

    /**
     * The trend test of one equation's peaks. When the longer history shows a period P (the first peak of
     * the autocorrelation of the detrended log peaks above {@code period_acf}, with at least two whole periods
     * seen), the test compares whole periods: the seasonal Kendall test over the last whole periods (at most
     * eight). Otherwise the last {@code steps} peaks are tested, with a period taken from their own
     * autocorrelation when one shows. The Sen slope, the costly part, is taken only when the p-value is below
     * {@code alpha} or {@code resolve_alpha} (otherwise neither decision reads it; it is NaN until asked for,
     * see {@link #completed}).
     */
    private SeasonalKendall test(Eq e) {
        RollingWindow recent = e.peaks;
        RollingWindow longer = e.history;
        double[] y;
        int n;
        int period;
        if (longer.size() > recent.size()) {
            double[] h = historyBuf;
            int hn = longer.copyTo(h);
            // the period of the long history is re-estimated every PERIOD_EVERY steps while the history fills,
            // then every history_steps / 8 steps (a period is a slow property of the flow)
            int every = longer.full() ? Math.max(PERIOD_EVERY, historySteps / 8) : PERIOD_EVERY;
            if (e.periodCalls++ % every == 0) {
                e.period = period(h, hn, hn / 2);
            }
            period = e.period;
            if (period >= 2 && 2 * period <= hn) {
                int k = Math.min(8, hn / period);
                n = k * period;
                y = tailBuf;
                System.arraycopy(h, hn - n, y, 0, n);
                return slopeIfNeeded(SeasonalKendall.test(y, n, period), y);
            }
        }
        y = recentBuf;
        n = recent.copyTo(y);
        period = period(y, n, n / 3);
        return slopeIfNeeded(SeasonalKendall.test(y, n, period), y);
    }

    private SeasonalKendall slopeIfNeeded(SeasonalKendall t, double[] y) {
        if (t.pIncreasing() < alpha || t.pIncreasing() < resolveAlpha) {
            return t.withSlope(SeasonalKendall.slope(y, t.n(), t.period()));
        }
        return t;
    }

    /**
     * The equation's latest test with its slope (taken now when it was skipped): the test covered the last
     * {@code n} peaks of the kept history, which have not changed since, unless a segment started.
     */
    private SeasonalKendall completed(Eq e) {
        SeasonalKendall t = e.lastTest;
        if (t != null && Double.isNaN(t.slope()) && e.history.size() >= t.n()) {
            RollingWindow h = e.history;
            double[] y = tailBuf;
            int from = h.size() - t.n();
            for (int i = 0; i < t.n(); i++) {
                y[i] = h.get(from + i);
            }
            t = t.withSlope(SeasonalKendall.slope(y, t.n(), t.period()));
            e.lastTest = t;
        }
        return t;
    }

    /**
     * A climb that is levelling off (the fitted slope at the window's end below {@code min_end_slope_ratio}
     * times the Sen slope, from a quadratic least-squares fit) is a transient settling into a new level or
     * cycle, such as a flow developing its oscillation, not the unbounded growth of an unstable time step,
     * which rises steadily on a log scale. Only applied when no period is known.
     */
    private boolean saturating(SeasonalKendall t, RollingWindow w) {
        if (t.period() > 1) {
            return false;
        }
        double[] y = recentBuf;
        int n = w.copyTo(y);
        QuadraticFit q = QuadraticFit.of(y, n);
        return q.slopeEnd() < minEndRatio * t.slope();
    }

    /**
     * A climb that does not lead above the peaks seen before it is what a periodic component of the peaks
     * explains: true when the latest peak is below the highest peak kept from before the judged steps' lowest
     * one plus {@code above_seen_decades}. Applied whatever period was found: a short period (even a spurious
     * one, such as the alternation of a decaying start-up mode) says nothing of a slower oscillation, and a
     * steady climb past the recent steps satisfies it anyway once it has risen {@code min_rise_decades}.
     * O(history_steps), and only for a climb that passes every other test.
     */
    private boolean withinSeen(Eq e) {
        RollingWindow w = e.peaks;
        RollingWindow h = e.history;
        int lowest = 0;
        for (int j = 1; j < w.size(); j++) {
            if (w.get(j) <= w.get(lowest)) {
                lowest = j;
            }
        }
        // the window is the newest part of the history
        int before = h.size() - w.size() + lowest;
        double seen = Double.NEGATIVE_INFINITY;
        for (int j = 0; j < before; j++) {
            seen = Math.max(seen, h.get(j));
        }
        return w.last() < seen + aboveSeen;
    }

    /** The period in steps of the detrended peaks (first autocorrelation peak above period_acf), or 1. */
    private int period(double[] y, int n, int maxLag) {
        // detrend by least squares (O(n)); the autocorrelation of what is left shows a repeating pattern
        double mt = (n - 1) / 2.0;
        double my = 0;
        for (int i = 0; i < n; i++) {
            my += y[i];
        }
        my /= n;
        double sxy = 0;
        double sxx = 0;
        for (int i = 0; i < n; i++) {
            sxy += (i - mt) * (y[i] - my);
            sxx += (i - mt) * (i - mt);
        }
        double slope = sxx > 0 ? sxy / sxx : 0;
        double[] d = detrendBuf;
        for (int i = 0; i < n; i++) {
            d[i] = y[i] - slope * (i - mt);
        }
        int lag = Periodogram.firstAutocorrelationPeak(d, n, 2, maxLag, periodAcf);
        return lag < 2 ? 1 : lag;
    }

    private Map<String, Object> evidence(String eq, SeasonalKendall t) {
        // steps = values compared; with a period, whole periods of it
        Map<String, Object> e = new LinkedHashMap<>();
        e.put("equation", eq);
        e.put("slope_decades_per_step", EvidenceNames.round(t.slope()));
        e.put("rise_decades", EvidenceNames.round(t.slope() * (t.n() - 1)));
        e.put("steps", t.n());
        e.put("mann_kendall_s", t.s());
        e.put("p_value", EvidenceNames.round(t.pIncreasing()));
        e.put("test", t.exact() ? "exact" : "normal");
        e.put("period_steps", t.period());
        e.put("step_basis", steps.basis());
        return EvidenceNames.finite(e);
    }

    @Override
    public void segment(int segment, long iter, Consumer<Detection> out) {
        segmentSeen = segment;
        steps.segment(segment);
        for (Eq e : eqs.all().values()) {
            completed(e); // the snapshot keeps the latest test of each equation
            e.clear();
        }
        ordered.clear();
    }

    /** {@code step_basis}, {@code steps_seen}, {@code open_equations}, and per equation the latest slope and p-value. */
    @Override
    public Map<String, Object> snapshot() {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("step_basis", steps.basis());
        m.put("steps_seen", steps.count());
        m.put("open_equations", openEquations);
        Map<String, Object> eq = new LinkedHashMap<>();
        for (Eq e : judged) {
            SeasonalKendall t = completed(e);
            eq.put(e.name, Map.of("slope_decades_per_step", t.slope(), "p_value", t.pIncreasing(),
                    "period_steps", t.period()));
        }
        m.put("equations", eq);
        return EvidenceNames.finite(m);
    }
}
