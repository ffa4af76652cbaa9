package dev.watcher.detect;

import dev.watcher.detect.stats.TheilSen;
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
 * {@code converged}: every residual at or below its target for {@code hold} consecutive samples (at least a whole
 * period of the slowest periodic monitor, so that residuals that dip below target once per cycle do not count)
 * AND every monitor settled or in a stable periodic state (judged as {@link MonitorSettledDetector} and
 * {@link MonitorPeriodicDetector} judge, with their parameters). Residuals at target while a monitor still
 * drifts is not converged: residual reduction alone is an unreliable proxy for the iterative error (Eca et
 * al. 2019; Kim et al. 1998). A run whose log has no monitors reaches at most a residuals-only verdict
 * (evidence {@code basis: residuals-only}, and the summary says the monitors are missing). The summary says
 * the run "meets the configured criteria": judgement stays with the engineer.
 *
 * <p>In unsteady runs (records with a step field or an inner counter) a residual sample is a step's last
 * inner iteration and a monitor sample likewise.
 *
 * <p>Forecasts, per equation: the iterations to reach the target from a Theil–Sen fit of log10 r against
 * the iteration since the last regime change (the segment's start, or the last rise of more than {@code
 * regime_jump_decades} between samples), within {@code forecast_window} samples (thinned evenly to at most 100 points), with Sen's 95 % interval;
 * "not converging" when the interval's upper slope bound is not below zero. Per monitor: the predicted final
 * value and remaining iterative error (geometric/Aitken estimate, {@link MonitorJudge#settled}).
 *
 * <p>Parameters ({@code converged.}): {@code residual_target} (1e-5 absolute, common practice), per equation
 * {@code residual_target.<equation>}; {@code drop_orders} (0 = off) and {@code drop_orders.<equation>}: when
 * set, the equation's target is its maximum since the run began divided by 10^drop_orders (for solvers that
 * print raw residuals); {@code hold} samples (10); {@code every} samples between monitor judgements (25);
 * {@code open_every} samples between the monitor judgements that keep an open verdict open (125: once open,
 * a monitor that starts to drift resolves it within {@code clear_checks} such judgements, while the
 * residuals are still checked at every sample; the judgements are the costly part of a long converged tail);
 * {@code resolve_decades} (0.5: a residual must rise this far above its target to count against an open
 * verdict); {@code clear_checks} (3); {@code forecast_window} (200); {@code forecast_every} (50: forecasts are computed on demand, at most once per that many samples); {@code
 * regime_jump_decades} (1.0). Monitor tolerances come from {@code monitor-settled.*} and {@code
 * monitor-periodic.*}; the relaxed monitor tolerance while open is {@code monitor-settled.resolve_factor} (2).
 *
 * <p>Cost per sample: O(equations) without hashing, allocation or logarithms (the per-equation state sits in
 * array slots found once per names list; a drop-orders target is recomputed only when the maximum grows; the
 * forecast window keeps raw values and logs are taken when a forecast is made). Every {@code every} samples
 * the residual test, O(equations); the monitor judgements, O(monitor window log window) each, run at those
 * samples only while the residuals hold their targets or the verdict is open. Forecasts, O({@value
 * #FORECAST_POINTS}^2) per equation, on demand and at most once per {@code forecast_every} samples.
 */
final class ConvergedDetector implements Detector {

    /** At most this many points enter a Theil–Sen forecast fit (the window is thinned evenly). */
    static final int FORECAST_POINTS = 100;

    /** One equation's forecast. {@code status}: reached, converging, not converging, unknown. */
    record Forecast(String status, double iterations, double low, double high, double slopeDecadesPerIter) {
    }

    private final DetectSettings settings;
    private final double defaultTarget;
    private final double dropOrders;
    private final int hold;
    private final int every;
    private final double resolveFactor;
    private final int clearChecks;
    private final int forecastWindow;
    private final int forecastEvery;
    private final double jumpFactor;
    private final double monitorResolveFactor;
    private final MonitorJudge judge;
    private final MonitorSeries monitors;
    private final TimeSteps steps = new TimeSteps(Double.POSITIVE_INFINITY);

    /** Per equation state, found by array slot for a record's names list; {@code order}: first-seen order. */
    private final PerName<Eq> eqs = new PerName<>(this::newEq);
    private final List<Eq> order = new ArrayList<>();
    private final Map<String, Map<String, Object>> monitorStates = new LinkedHashMap<>();
    private List<String> waitingFor = List.of();
    private double longestPeriod;
    private long samples;
    /** Samples left until the next every-th one (samples % every == 0). */
    private int untilCheck;
    private final int openEvery;
    /** While open: samples left until the monitors are judged again. */
    private int untilOpenCheck;
    private long forecastsAt = -1;
    private long lastIter;
    private boolean open;
    private boolean openResidualsOnly;
    private int failing;
    private int segmentSeen;

    /**
     * One equation: its latest value, its target (fixed, or from its running maximum when drop orders are
     * set, recomputed only when the maximum grows), how many samples in a row it has been at target, and the
     * raw values of the forecast window since the last regime change (logs are taken only when forecasting).
     */
    private final class Eq {
        final String name;
        final double drop;
        final double absolute;
        // the forecast window: a ring of raw values and their iterations, oldest at (head - size)
        final double[] values = new double[forecastWindow];
        final long[] iters = new long[forecastWindow];
        int head;
        int size;
        /** A value above this starts a new regime (the latest value times 10^regime_jump_decades). */
        double jumpAbove = Double.POSITIVE_INFINITY;
        double latest = Double.NaN;
        double runMax = Double.NaN;
        double target;
        /** The target times 10^resolve_decades: above this a residual counts against an open verdict. */
        double clearLimit;
        int atTarget;
        Forecast forecast;

        Eq(String name) {
            this.name = name;
            this.drop = settings.number(Patterns.CONVERGED + ".drop_orders." + name, dropOrders);
            this.absolute = settings.number(Patterns.CONVERGED + ".residual_target." + name, defaultTarget);
            setTarget(drop > 0 ? 0 : absolute);
        }

        void setTarget(double t) {
            target = t;
            clearLimit = t * resolveFactor;
        }

        void add(double v, long iter) {
            latest = v;
            if (!(v > 0 && v < Double.POSITIVE_INFINITY)) {
                atTarget = 0;
                clear();
                return;
            }
            if (drop > 0 && !(v <= runMax)) {
                runMax = v;
                setTarget(v * Math.pow(10, -drop));
            }
            atTarget = v <= target ? atTarget + 1 : 0;
            if (v > jumpAbove) {
                clear(); // a new regime: the earlier slope says nothing about the way ahead
            }
            values[head] = v;
            iters[head] = iter;
            if (++head == values.length) {
                head = 0;
            }
            if (size < values.length) {
                size++;
            }
            jumpAbove = v * jumpFactor;
        }

        void clear() {
            size = 0;
            jumpAbove = Double.POSITIVE_INFINITY;
        }

        /** log10 of the window's values, oldest first, thinned to at most FORECAST_POINTS. */
        double[] logs() {
            double[] y = thin(window(values));
            for (int i = 0; i < y.length; i++) {
                y[i] = Math.log10(y[i]); // the window holds positive finite values only
            }
            return y;
        }

        /** The window's iterations, oldest first, thinned alike. */
        double[] iterations() {
            double[] x = new double[size];
            for (int i = 0; i < size; i++) {
                x[i] = iters[at(i)];
            }
            return thin(x);
        }

        private double[] window(double[] ring) {
            double[] x = new double[size];
            for (int i = 0; i < size; i++) {
                x[i] = ring[at(i)];
            }
            return x;
        }

        /** Ring index of the i-th oldest value. */
        private int at(int i) {
            int k = head - size + i;
            return k < 0 ? k + values.length : k;
        }
    }

    ConvergedDetector(DetectSettings s) {
        String p = Patterns.CONVERGED + ".";
        this.settings = s;
        this.defaultTarget = s.number(p + "residual_target", 1e-5);
        this.dropOrders = s.number(p + "drop_orders", 0);
        this.hold = Math.max(1, s.integer(p + "hold", 10));
        this.every = Math.max(1, s.integer(p + "every", 25));
        this.openEvery = Math.max(1, s.integer(p + "open_every", 125));
        this.untilCheck = every;
        this.resolveFactor = Math.pow(10, s.number(p + "resolve_decades", 0.5));
        this.clearChecks = Math.max(1, s.integer(p + "clear_checks", 3));
        this.forecastWindow = Math.max(10, s.integer(p + "forecast_window", 200));
        this.forecastEvery = Math.max(1, s.integer(p + "forecast_every", 50));
        this.jumpFactor = Math.pow(10, s.number(p + "regime_jump_decades", 1.0));
        this.monitorResolveFactor = Math.max(1, s.number(Patterns.MONITOR_SETTLED + ".resolve_factor", 2));
        // per-equation targets are read now, so that the start-up check of the parameters knows them
        for (String k : s.overrides().keySet()) {
            if (k.startsWith(p + "residual_target.") || k.startsWith(p + "drop_orders.")) {
                s.number(k, Double.NaN);
            }
        }
        this.judge = new MonitorJudge(s);
        int window = Math.max(s.integer(Patterns.MONITOR_SETTLED + ".window", 1000),
                s.integer(Patterns.MONITOR_PERIODIC + ".window", 1024));
        this.monitors = new MonitorSeries(Math.max(64, window));
    }

    private Eq newEq(String name) {
        Eq e = new Eq(name);
        order.add(e);
        return e;
    }

    @Override
    public void observe(IterationRecord record, Consumer<Detection> out) {
        if (record.segment() != segmentSeen) {
            segment(record.segment(), record.iter(), out);
        }
        monitors.accept(record);
        if (record.hasStep() || record.hasInner()) {
            // unsteady: a sample is a time step's last inner iteration
            TimeSteps.Step step = steps.accept(record);
            if (step == null || step.floor().isEmpty()) {
                return;
            }
            long iter = step.lastIter();
            lastIter = iter;
            step.floor().forEach((name, v) -> {
                Eq e = eqs.get(name);
                (e == null ? eqs.all().computeIfAbsent(name, this::newEq) : e).add(v, iter);
            });
        } else {
            Samples res = record.residuals();
            if (res.isEmpty()) {
                return;
            }
            long iter = record.iter();
            lastIter = iter;
            List<Eq> slots = eqs.slots(res.names());
            double[] v = res.values();
            for (int i = 0; i < v.length; i++) {
                slots.get(i).add(v[i], iter);
            }
        }
        samples++;
        // every-th sample, counted down rather than by a division per record
        boolean check = --untilCheck == 0;
        if (check) {
            untilCheck = every;
        }
        if (open) {
            boolean judge = --untilOpenCheck <= 0;
            if (judge) {
                untilOpenCheck = openEvery;
            }
            checkOpen(judge, out);
        } else if (check) {
            checkClosed(out);
        }
    }

    /** The target of an equation: absolute, or orders of magnitude below its maximum when drop orders are set. */
    double targetOf(String eq) {
        Eq e = eqs.get(eq);
        if (e != null) {
            return e.target;
        }
        return settings.number(Patterns.CONVERGED + ".drop_orders." + eq, dropOrders) > 0 ? 0
                : settings.number(Patterns.CONVERGED + ".residual_target." + eq, defaultTarget);
    }

    private List<String> names() {
        List<String> names = new ArrayList<>(order.size());
        for (Eq e : order) {
            names.add(e.name);
        }
        return List.copyOf(names);
    }

    private boolean residualsHeld() {
        // with a periodic monitor, the residuals must stay at target over a whole period of it
        int need = Math.max(hold, (int) Math.ceil(longestPeriod));
        for (Eq e : order) {
            if (e.atTarget < need) {
                return false;
            }
        }
        return !order.isEmpty();
    }

    private boolean residualsClearlyAbove() {
        for (Eq e : order) {
            if (!(e.latest <= e.clearLimit)) {
                return true;
            }
        }
        return false;
    }

    /** Judges every monitor at the given tolerance scale; fills monitorStates; returns the monitors not ok. */
    private List<String> judgeMonitors(double scale) {
        List<String> notOk = new ArrayList<>();
        double longest = 0;
        for (String name : monitors.names()) {
            double[] x = monitors.values(name);
            MonitorJudge.Settling s = judge.settled(x, x.length, scale);
            Map<String, Object> st = new LinkedHashMap<>();
            if (s.settled()) {
                st.put("state", "settled");
                st.put("value", s.mean());
                st.put("half_width", s.halfWidth());
                st.put("tolerance", s.tolerance());
                st.put("predicted_final", s.predicted());
                st.put("remaining_error", s.remainingError());
            } else {
                MonitorJudge.Cycles c = judge.periodic(x, x.length, scale);
                if (c.stable()) {
                    longest = Math.max(longest, c.period());
                    st.put("state", "periodic");
                    st.put("value", c.cycleMean());
                    st.put("amplitude", c.amplitude());
                    st.put("period_iterations", c.period() * monitors.iterationsPerSample(name));
                    st.put("predicted_final", c.cycleMean());
                    st.put("remaining_error", 0.0);
                } else {
                    st.put("state", "not settled");
                    st.put("reason", s.reason());
                    st.put("predicted_final", s.predicted());
                    st.put("remaining_error", s.remainingError());
                    st.put("half_width", s.halfWidth());
                    notOk.add(name);
                }
            }
            monitorStates.put(name, st);
        }
        longestPeriod = longest;
        return notOk;
    }

    private void checkClosed(Consumer<Detection> out) {
        if (!residualsHeld()) {
            waitingFor = List.of();
            return;
        }
        List<String> notOk = judgeMonitors(1);
        waitingFor = notOk;
        if (!notOk.isEmpty() || !residualsHeld()) {
            return;
        }
        forecastsAt = -1;
        updateForecasts();
        open = true;
        untilOpenCheck = openEvery;
        openResidualsOnly = monitors.names().isEmpty();
        failing = 0;
        String summary = openResidualsOnly
                ? "residuals meet the configured criteria; the log has no monitors, so this is a residuals-only "
                        + "verdict: monitors are missing"
                : String.format(Locale.ROOT, "meets the configured criteria: %d residuals at target and %d monitors "
                        + "settled or periodic", order.size(), monitors.names().size());
        out.accept(new Detection(Patterns.CONVERGED, DetectionState.OPEN, Severity.INFO, lastIter, names(), null,
                summary, "", evidence()));
    }

    private void checkOpen(boolean check, Consumer<Detection> out) {
        boolean bad = residualsClearlyAbove();
        if (!bad && check && !openResidualsOnly) {
            bad = !judgeMonitors(monitorResolveFactor).isEmpty();
        } else if (!bad && !check) {
            return;
        }
        failing = bad ? failing + 1 : 0;
        if (failing >= clearChecks) {
            open = false;
            failing = 0;
            out.accept(new Detection(Patterns.CONVERGED, DetectionState.RESOLVED, Severity.INFO, lastIter,
                    names(), null, "no longer meets the configured criteria", "", evidence()));
        }
    }

    private Map<String, Object> evidence() {
        Map<String, Object> e = new LinkedHashMap<>();
        e.put("basis", monitors.names().isEmpty() ? "residuals-only" : "residuals-and-monitors");
        if (monitors.names().isEmpty()) {
            e.put("monitors", "missing");
        }
        for (Eq q : order) {
            String k = EvidenceNames.key(q.name);
            e.put(k + "_residual", EvidenceNames.round(q.latest));
            e.put(k + "_target", EvidenceNames.round(q.target));
            Forecast f = q.forecast;
            if (f != null) {
                e.put(k + "_forecast", f.status());
                if (Double.isFinite(f.iterations())) {
                    e.put(k + "_iterations_to_target", Math.round(f.iterations()));
                }
            }
        }
        monitorStates.forEach((name, st) -> {
            String k = EvidenceNames.key(name);
            st.forEach((key, v) -> e.put(k + "_" + key, v instanceof Double d ? EvidenceNames.round(d) : v));
        });
        return EvidenceNames.finite(e);
    }

    /**
     * Forecasts are computed on demand (snapshot, evidence), at most once per {@code forecast_every} samples:
     * the Theil–Sen fit is the most expensive statistic here.
     */
    private void updateForecasts() {
        if (forecastsAt >= 0 && samples - forecastsAt < forecastEvery) {
            return;
        }
        forecastsAt = samples;
        for (Eq e : order) {
            e.forecast = forecast(e);
        }
    }

    private Forecast forecast(Eq e) {
        double v = e.latest;
        double t = e.target;
        if (v > 0 && v <= t) {
            return new Forecast("reached", 0, 0, 0, Double.NaN);
        }
        if (e.size < 10 || !(t > 0)) {
            return new Forecast("unknown", Double.NaN, Double.NaN, Double.NaN, Double.NaN);
        }
        double[] y = e.logs();
        double[] x = e.iterations();
        TheilSen ts = TheilSen.fit(x, y, y.length, 0.95);
        if (!(ts.high() < 0)) {
            return new Forecast("not converging", Double.NaN, Double.NaN, Double.NaN, ts.slope());
        }
        double level = ts.intercept() + ts.slope() * x[x.length - 1];
        double gap = Math.log10(t) - level;
        if (gap >= 0) {
            return new Forecast("reached", 0, 0, 0, ts.slope());
        }
        return new Forecast("converging", gap / ts.slope(), gap / ts.low(), gap / ts.high(), ts.slope());
    }

    /** Every k-th value (k so that at most FORECAST_POINTS remain), always keeping the newest. */
    private static double[] thin(double[] v) {
        int k = (v.length + FORECAST_POINTS - 1) / FORECAST_POINTS;
        if (k <= 1) {
            return v;
        }
        int m = (v.length - 1) / k + 1;
        double[] t = new double[m];
        for (int i = 0; i < m; i++) {
            t[m - 1 - i] = v[v.length - 1 - i * k];
        }
        return t;
    }

    @Override
    public void segment(int segment, long iter, Consumer<Detection> out) {
        segmentSeen = segment;
        steps.reset();
        monitors.reset();
        for (Eq e : order) {
            e.clear();
            e.atTarget = 0;
        }
    }

    /**
     * {@code verdict} (converged, residuals-only, held back, not yet), {@code waiting_for} (monitors that hold
     * back a verdict), {@code equations} (per equation: residual, target, forecast status, iterations,
     * iterations_low, iterations_high, slope_decades_per_iteration) and {@code monitors} (per monitor: state,
     * value, predicted_final, remaining_error, ...).
     */
    @Override
    public Map<String, Object> snapshot() {
        updateForecasts();
        Map<String, Object> m = new LinkedHashMap<>();
        String verdict = open ? (openResidualsOnly ? "residuals-only" : "converged")
                : (!waitingFor.isEmpty() ? "held back" : "not yet");
        m.put("verdict", verdict);
        m.put("waiting_for", waitingFor);
        Map<String, Object> equations = new LinkedHashMap<>();
        for (Eq e : order) {
            Map<String, Object> f = new LinkedHashMap<>();
            f.put("residual", e.latest);
            f.put("target", e.target);
            Forecast fc = e.forecast;
            if (fc != null) {
                f.put("forecast", fc.status());
                f.put("iterations", fc.iterations());
                f.put("iterations_low", fc.low());
                f.put("iterations_high", fc.high());
                f.put("slope_decades_per_iteration", fc.slopeDecadesPerIter());
            }
            equations.put(e.name, f);
        }
        m.put("equations", equations);
        Map<String, Object> mons = new LinkedHashMap<>();
        monitorStates.forEach((k, v) -> mons.put(k, Map.copyOf(v)));
        m.put("monitors", mons);
        return EvidenceNames.finite(m);
    }

    /** The latest forecast of an equation, or null. */
    Forecast forecastOf(String eq) {
        updateForecasts();
        Eq e = eqs.get(eq);
        return e == null ? null : e.forecast;
    }
}
