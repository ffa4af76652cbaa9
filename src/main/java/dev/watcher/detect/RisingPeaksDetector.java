package dev.watcher.detect;

import dev.watcher.detect.stats.Periodogram;
import dev.watcher.detect.stats.QuadraticFit;
import dev.watcher.detect.stats.RollingWindow;
import dev.watcher.detect.stats.SeasonalKendall;
import dev.watcher.model.Detection;
import dev.watcher.model.DetectionState;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.Patterns;
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
 * called rising.
 *
 * <p>Parameters ({@code rising-peaks.}): {@code steps} judged (20, kept within 10..30), {@code min_steps}
 * before judging (10), {@code alpha} one-sided (0.01), {@code min_slope_decades_per_step} (0.02), {@code
 * min_rise_decades} over the judged steps (0.3), {@code period_acf} autocorrelation that makes a lag a period
 * (0.4), {@code history_steps} kept for the period check (256), {@code min_level} below which peaks are round-off and never called rising (1e-10),
 * {@code min_end_slope_ratio} below which a levelling-off climb is not called rising (0.5), {@code jump_decades} for splitting logs without step or inner fields (1.0), {@code resolve_alpha}
 * (0.1) and {@code clear_steps} (3): the condition resolves after that many consecutive steps in which no
 * named equation still rises even at the relaxed level (p below resolve_alpha with half the slope floor).
 */
final class RisingPeaksDetector implements Detector {

    private static final String REMEDY = "The time step is too large or there are too few inner iterations per step: "
            + "reduce the time step or add inner iterations.";

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
    private final double minLevel;
    private final double minEndRatio;
    private final Map<String, RollingWindow> peaks = new LinkedHashMap<>();
    private final Map<String, RollingWindow> history = new LinkedHashMap<>();
    private final Map<String, int[]> periods = new LinkedHashMap<>();
    private static final int PERIOD_EVERY = 8;
    private final Map<String, SeasonalKendall> lastTest = new LinkedHashMap<>();
    private List<String> openEquations = List.of();
    private int quiet;
    private int segmentSeen;

    RisingPeaksDetector(DetectSettings s) {
        String p = Patterns.RISING_PEAKS + ".";
        this.window = Math.max(10, Math.min(30, s.integer(p + "steps", 20)));
        this.minSteps = Math.max(5, Math.min(window, s.integer(p + "min_steps", 10)));
        this.alpha = s.number(p + "alpha", 0.01);
        this.minSlope = s.number(p + "min_slope_decades_per_step", 0.02);
        this.minRise = s.number(p + "min_rise_decades", 0.3);
        this.periodAcf = s.number(p + "period_acf", 0.4);
        this.resolveAlpha = s.number(p + "resolve_alpha", 0.1);
        this.clearSteps = Math.max(1, s.integer(p + "clear_steps", 3));
        this.steps = new TimeSteps(s.number(p + "jump_decades", 1.0));
        this.historySteps = Math.max(2 * window, s.integer(p + "history_steps", 256));
        this.minLevel = Math.log10(s.number(p + "min_level", 1e-10));
        this.minEndRatio = s.number(p + "min_end_slope_ratio", 0.5);
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
        step.peak().forEach((eq, v) -> {
            if (v > 0 && Double.isFinite(v)) {
                peaks.computeIfAbsent(eq, k -> new RollingWindow(window)).add(Math.log10(v));
                history.computeIfAbsent(eq, k -> new RollingWindow(historySteps)).add(Math.log10(v));
            }
        });
        judge(step, out);
    }

    private void judge(TimeSteps.Step step, Consumer<Detection> out) {
        List<String> rising = new ArrayList<>();
        List<String> relaxed = new ArrayList<>();
        SeasonalKendall worst = null;
        String worstEq = null;
        for (Map.Entry<String, RollingWindow> e : peaks.entrySet()) {
            RollingWindow w = e.getValue();
            if (w.size() < minSteps) {
                continue;
            }
            SeasonalKendall t = test(e.getKey(), w, history.get(e.getKey()));
            lastTest.put(e.getKey(), t);
            int n = t.n();
            boolean up = t.pIncreasing() < alpha && t.slope() >= minSlope && t.slope() * (n - 1) >= minRise
                    && w.last() > minLevel && !saturating(t, w);
            if (up) {
                rising.add(e.getKey());
                if (worst == null || t.slope() > worst.slope()) {
                    worst = t;
                    worstEq = e.getKey();
                }
            }
            if (t.pIncreasing() < resolveAlpha && t.slope() >= minSlope / 2) {
                relaxed.add(e.getKey());
            }
        }
        long iter = step.lastIter();
        if (openEquations.isEmpty()) {
            if (!rising.isEmpty()) {
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
        for (String eq : openEquations) {
            still |= relaxed.contains(eq);
        }
        quiet = still ? 0 : quiet + 1;
        if (quiet >= clearSteps) {
            SeasonalKendall t = lastTest.get(openEquations.get(0));
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
     * seen), the test compares whole periods: the seasonal Kendall test over the last whole periods (at most eight). Otherwise the last
     * {@code steps} peaks are tested, with a period taken from their own autocorrelation when one shows.
     */
    private SeasonalKendall test(String eq, RollingWindow recent, RollingWindow longer) {
        double[] h = longer.toArray();
        if (h.length > recent.size()) {
            // the period of the long history is re-estimated every PERIOD_EVERY steps (O(n^2/2) each time)
            int[] cached = periods.computeIfAbsent(eq, k -> new int[] {1, 0});
            if (cached[1]++ % PERIOD_EVERY == 0) {
                cached[0] = period(h, h.length, h.length / 2);
            }
            int period = cached[0];
            if (period >= 2 && 2 * period <= h.length) {
                int k = Math.min(8, h.length / period);
                int n = k * period;
                double[] y = java.util.Arrays.copyOfRange(h, h.length - n, h.length);
                return SeasonalKendall.of(y, n, period);
            }
        }
        double[] y = recent.toArray();
        return SeasonalKendall.of(y, y.length, period(y, y.length, y.length / 3));
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
        double[] y = w.toArray();
        QuadraticFit q = QuadraticFit.of(y, y.length);
        return q.slopeEnd() < minEndRatio * t.slope();
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
        double[] d = new double[n];
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
        steps.reset();
        peaks.clear();
        history.clear();
        periods.clear();
    }

    /** {@code step_basis}, {@code steps_seen}, {@code open_equations}, and per equation the latest slope and p-value. */
    @Override
    public Map<String, Object> snapshot() {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("step_basis", steps.basis());
        m.put("steps_seen", steps.count());
        m.put("open_equations", openEquations);
        Map<String, Object> eq = new LinkedHashMap<>();
        lastTest.forEach((k, t) -> eq.put(k, Map.of("slope_decades_per_step", t.slope(), "p_value", t.pIncreasing(),
                "period_steps", t.period())));
        m.put("equations", eq);
        return EvidenceNames.finite(m);
    }
}
