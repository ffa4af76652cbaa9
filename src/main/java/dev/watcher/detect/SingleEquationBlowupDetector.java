package dev.watcher.detect;

import dev.watcher.detect.stats.RobustScale;
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
 * {@code single-equation-blowup}: one equation's residual starts rising fast while the others fall or stay
 * flat. Meant to fire early: well before the residual has grown 3 decades above its running minimum, and
 * before any NaN. Critical.
 *
 * <p>Method, per equation on log10 r (METHODS.md "Blow-up onset in one equation"), see {@link RiseTracker}:
 * a CUSUM on standardized differences and a rise of the smoothed level of at least {@code min_rise} decades
 * above its minimum since the warm-up (cheap, every record) select a candidate; then, at most every
 * {@code eval_every} records, the late phase (the values since the minimum) must rise: Theil–Sen slope at
 * least {@code min_slope} decades/iteration with Sen's 95 % interval above 0, and a one-sided Mann–Kendall
 * p-value (exact up to 10 points, Hamed–Rao above) below {@code alpha}. Confinement: fewer than
 * {@code others_rising_fraction} of the other equations rise (for them a signalled CUSUM with a quarter of
 * the rise, or a significant late rise of half of it, suffices), and no rising one shares the equation's
 * family (two momentum components rising together are a
 * {@code family-divergence}). The slope's modified z-score among all equations' window slopes is
 * reported as evidence.
 *
 * <p>Resolves (hysteresis) when the smoothed residual is back within half of {@code min_rise} of the
 * minimum it rose from, or, after a new segment, when the equation falls significantly (Sen's interval
 * of the window's slope below 0).
 *
 * <p>Parameters ({@code single-equation-blowup.}): {@code window} 60 records, {@code min_slope} 0.003
 * decades/iteration, {@code min_rise} 0.5 decades, {@code alpha} 0.01, {@code warmup} 50 records per
 * segment, {@code cusum_k} 0.5, {@code cusum_h} 5, {@code min_scale} 0.005 decades, {@code rise_noise} 4 (standard deviations of the level's wandering
 * added to {@code min_rise}), {@code baseline_window} 300 records (the minimum a rise is measured from is
 * the lowest smoothed level over this many records), {@code eval_every} 3
 * records, {@code others_rising_fraction} 0.25, {@code recovered_margin} 0.3 decades and
 * {@code max_required} 2 decades (the rise that counts is also at least {@code recovered_margin} above the
 * highest rise the equation came back from on its own in this segment, capped at {@code max_required}: the
 * excursions of a noisy plateau, or the jumps of an unsteady run's time steps, set the bar). Cost: O(1) per value; O(window^2 log window) per evaluation,
 * which happens only while a residual rises persistently.
 */
final class SingleEquationBlowupDetector implements Detector {

    private static final String P = Patterns.SINGLE_EQUATION_BLOWUP + ".";

    private final double othersRisingFraction;
    private final PerName<Eq> eqs;
    private final double[] xs;
    private final double[] ys;
    private final ResidualLogs logs;
    private final RiseTracker.Params rp;

    SingleEquationBlowupDetector(DetectSettings s) {
        this(s, new ResidualLogs());
    }

    SingleEquationBlowupDetector(DetectSettings s, ResidualLogs logs) {
        this.logs = logs;
        rp = RiseTracker.Params.read(s, P, 0.003, 300);
        logs.rises.reserve(rp);
        othersRisingFraction = s.number(P + "others_rising_fraction", 0.25);
        eqs = new PerName<>(n -> new Eq(logs.rises.of(n, rp)));
        xs = new double[rp.window()];
        ys = new double[rp.window()];
    }

    private final class Eq {
        final RiseTracker t;
        boolean open;
        boolean segmentSinceOpen;
        double openFrom;

        Eq(RiseTracker.Core core) {
            t = new RiseTracker(core, rp);
        }
    }

    @Override
    public void observe(IterationRecord r, Consumer<Detection> out) {
        Samples res = r.residuals();
        int n = res.size();
        double[] y = logs.of(res);
        long stamp = logs.stamp();
        List<Eq> slots = eqs.slots(res.names());
        // update every equation first, so the confinement test sees this record for all of them
        for (int i = 0; i < n; i++) {
            if (!Double.isNaN(y[i])) {
                slots.get(i).t.add(stamp, r.iter(), y[i]);
            }
        }
        for (int i = 0; i < n; i++) {
            if (Double.isNaN(y[i])) {
                continue;
            }
            Eq e = slots.get(i);
            if (e.open) {
                checkResolved(e, r, out);
            } else if (e.t.candidate(rp.minRise()) && e.t.count() - e.t.lastEval >= rp.evalEvery()) {
                e.t.lastEval = e.t.count();
                evaluate(e, slots, r, out);
            }
        }
    }

    private RiseTracker.Late risingLate(RiseTracker t, double share) {
        if (!t.warm() || t.rise() < share * t.required(rp.minRise())) {
            return null;
        }
        RiseTracker.Late l = t.late(xs, ys);
        if (l == null || l.fit().slope() < rp.minSlope() || !(l.fit().low() > 0) || l.trend().pIncreasing() >= rp.alpha()) {
            return null;
        }
        return l;
    }

    private void evaluate(Eq e, List<Eq> slots, IterationRecord r, Consumer<Detection> out) {
        RiseTracker.Late late = risingLate(e.t, 1);
        if (late == null) {
            return;
        }
        int others = 0;
        int othersRising = 0;
        boolean familyMateRising = false;
        List<Double> slopes = new ArrayList<>();
        slopes.add(late.fit().slope());
        for (Eq o : slots) {
            if (o == e || o.t.size() < RiseTracker.MIN_LATE) {
                continue;
            }
            others++;
            slopes.add(o.t.window(xs, ys).slope());
            boolean mate = e.t.family != null && e.t.family.equals(o.t.family);
            // another equation climbing too (a signalled CUSUM and a quarter of the rise, or a significant
            // late rise of half of it): the residuals are not rising alone
            boolean climbing = o.t.warm() && o.t.cusumSignalled() && o.t.rise() >= 0.25 * o.t.required(rp.minRise());
            if (climbing || risingLate(o.t, 0.5) != null) {
                othersRising++;
                familyMateRising |= mate;
            }
        }
        if (familyMateRising || (others > 0 && othersRising >= othersRisingFraction * others)) {
            // not confined to this equation: look again only after a quarter window
            e.t.lastEval = e.t.count() + rp.window() / 4;
            return;
        }
        double[] sl = slopes.stream().mapToDouble(Double::doubleValue).toArray();
        double outlierZ = RobustScale.of(sl, sl.length).modifiedZ(late.fit().slope());
        e.open = true;
        e.segmentSinceOpen = false;
        e.openFrom = e.t.minSmooth();
        TheilSen f = late.fit();
        double rise = e.t.rise();
        Map<String, Object> ev = new LinkedHashMap<>();
        ev.put("slope_decades_per_iter", Log10.round(f.slope()));
        ev.put("slope_low", Log10.round(f.low()));
        ev.put("slope_high", Log10.round(f.high()));
        ev.put("rise_decades", Log10.round(rise));
        ev.put("residual", Log10.round(Math.pow(10, e.t.last())));
        ev.put("baseline", Log10.round(Math.pow(10, e.t.minSmooth())));
        ev.put("p_trend", Log10.round(late.trend().pIncreasing()));
        ev.put("rising_points", f.n());
        ev.put("cusum", Log10.round(e.t.cusum()));
        ev.put("others", others);
        ev.put("others_rising", othersRising);
        if (Double.isFinite(outlierZ)) {
            ev.put("slope_modified_z", Log10.round(outlierZ));
        }
        String summary = String.format(Locale.ROOT,
                "%s residual rising %.3g decades/iteration, %.2g decades above its minimum, while %s", e.t.name,
                f.slope(), rise, others == 0 ? "no other equation is reported"
                        : othersRising == 0 ? "the others fall or stay flat" : "most others fall or stay flat");
        String remedy = "Look for a local mesh trouble spot: poor cell quality or resolution where " + e.t.name
                + " peaks (inspect the cells with the largest " + e.t.name + " residual or correction), and the"
                + " boundary conditions that feed it.";
        out.accept(new Detection(Patterns.SINGLE_EQUATION_BLOWUP, DetectionState.OPEN, Severity.CRITICAL, r.iter(),
                List.of(e.t.name), null, summary, remedy, ev));
    }

    private void checkResolved(Eq e, IterationRecord r, Consumer<Detection> out) {
        boolean recovered = e.t.warm() && e.t.smooth() <= e.openFrom + rp.minRise() / 2;
        String why = "back near the level it rose from";
        if (!recovered && e.segmentSinceOpen && e.t.warm() && e.t.count() - e.t.lastEval >= rp.evalEvery()) {
            e.t.lastEval = e.t.count();
            recovered = e.t.window(xs, ys).high() < 0;
            why = "falling again after the restart";
        }
        if (!recovered) {
            return;
        }
        e.open = false;
        Map<String, Object> ev = new LinkedHashMap<>();
        ev.put("residual", Log10.round(Math.pow(10, e.t.last())));
        out.accept(new Detection(Patterns.SINGLE_EQUATION_BLOWUP, DetectionState.RESOLVED, Severity.CRITICAL,
                r.iter(), List.of(e.t.name), null, e.t.name + " residual " + why, "", ev));
    }

    @Override
    public void segment(int segment, long iter, Consumer<Detection> out) {
        for (Eq e : eqs.all().values()) {
            e.t.reset();
            if (e.open) {
                e.segmentSinceOpen = true;
            }
        }
    }

    @Override
    public Map<String, Object> snapshot() {
        List<String> open = new ArrayList<>();
        for (Eq e : eqs.all().values()) {
            if (e.open) {
                open.add(e.t.name);
            }
        }
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("open_equations", open);
        return m;
    }
}
