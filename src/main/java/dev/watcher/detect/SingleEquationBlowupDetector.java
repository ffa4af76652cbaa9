package dev.watcher.detect;

import dev.watcher.detect.stats.Cusum;
import dev.watcher.detect.stats.RobustScale;
import dev.watcher.detect.stats.RollingWindow;
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
import java.util.Map;
import java.util.function.Consumer;

/**
 * {@code single-equation-blowup}: one equation's residual starts rising fast while the others fall or stay
 * flat. Meant to fire early: well before the residual has grown 3 decades above its running minimum, and
 * before any NaN. Critical.
 *
 * <p>Method, per equation on log10 r (METHODS.md "Blow-up onset in one equation"):
 * <ol>
 * <li>cheap, every record: a one-sided CUSUM (Page 1954) on the first differences of log10 r standardized
 *     by a running mean absolute difference (floored at {@code min_scale}), and the rise of the smoothed
 *     log10 r (exponential smoothing, weight 0.1) above its running minimum since the segment's warm-up;</li>
 * <li>when both the CUSUM has signalled and the rise is at least {@code min_rise}, at most every
 *     {@code eval_every} records: the Theil–Sen slope over the last {@code window} values against the
 *     iteration must be at least {@code min_slope} with Sen's 95 % interval above 0;</li>
 * <li>confinement: fewer than {@code others_rising_fraction} of the other equations rise by the same test,
 *     and none of the rising ones is in the same family (two momentum components rising together are a
 *     family divergence, not a single equation). The equation's slope as a modified z-score among all
 *     equations' slopes is reported as evidence.</li>
 * </ol>
 * The first {@code warmup} records of each segment set no baseline, so start-up transients and the jump
 * after a restart are not taken for a blow-up. An open condition resolves (hysteresis) when the smoothed
 * residual is back within half of {@code min_rise} of the minimum it rose from, or, after a new segment,
 * when the equation falls significantly again (Sen's interval below 0).
 *
 * <p>Parameters ({@code single-equation-blowup.}): {@code window} 40, {@code min_slope} 0.005
 * decades/iteration, {@code min_rise} 0.7 decades, {@code warmup} 50 records, {@code cusum_k} 0.5,
 * {@code cusum_h} 5, {@code min_scale} 0.005 decades, {@code eval_every} 5 records,
 * {@code others_rising_fraction} 0.5. Cost: O(1) per value; O(window^2 log window) per evaluation, which
 * happens only while a residual rises persistently.
 */
final class SingleEquationBlowupDetector implements Detector {

    private static final String P = Patterns.SINGLE_EQUATION_BLOWUP + ".";
    private static final double SMOOTH = 0.1;
    private static final double SCALE_WEIGHT = 0.02;
    private static final int MIN_POINTS = 10;

    private final int window;
    private final double minSlope;
    private final double minRise;
    private final int warmup;
    private final double cusumK;
    private final double cusumH;
    private final double minScale;
    private final int evalEvery;
    private final double othersRisingFraction;
    private final PerName<Eq> eqs;
    private List<String> lastNames = List.of();
    private final double[] xs;
    private final double[] ys;

    SingleEquationBlowupDetector(DetectSettings s) {
        window = Math.max(MIN_POINTS, s.integer(P + "window", 40));
        minSlope = s.number(P + "min_slope", 0.005);
        minRise = s.number(P + "min_rise", 0.7);
        warmup = Math.max(1, s.integer(P + "warmup", 50));
        cusumK = s.number(P + "cusum_k", 0.5);
        cusumH = s.number(P + "cusum_h", 5);
        minScale = s.number(P + "min_scale", 0.005);
        evalEvery = Math.max(1, s.integer(P + "eval_every", 5));
        othersRisingFraction = s.number(P + "others_rising_fraction", 0.5);
        eqs = new PerName<>(Eq::new);
        xs = new double[window];
        ys = new double[window];
    }

    private final class Eq {
        final String name;
        final String family;
        final RollingWindow iters = new RollingWindow(window);
        final RollingWindow logs = new RollingWindow(window);
        final Cusum cusum = new Cusum(cusumK, cusumH, 0);
        long count;
        double last;
        double smooth;
        double scale;
        double minSmooth = Double.POSITIVE_INFINITY;
        double minRaw = Double.POSITIVE_INFINITY;
        long lastEval = Long.MIN_VALUE / 2;
        // the open condition
        boolean open;
        boolean segmentSinceOpen;
        double openFrom;

        Eq(String name) {
            this.name = name;
            this.family = EquationFamilies.familyOf(name);
        }

        void reset() {
            iters.clear();
            logs.clear();
            cusum.reset();
            count = 0;
            scale = 0;
            minSmooth = Double.POSITIVE_INFINITY;
            minRaw = Double.POSITIVE_INFINITY;
            lastEval = Long.MIN_VALUE / 2;
        }

        TheilSen fit() {
            int n = iters.copyTo(xs);
            logs.copyTo(ys);
            return TheilSen.fit(xs, ys, n, 0.95);
        }
    }

    @Override
    public void observe(IterationRecord r, Consumer<Detection> out) {
        Samples res = r.residuals();
        double[] v = res.values();
        lastNames = res.names();
        List<Eq> slots = eqs.slots(res.names());
        for (int i = 0; i < v.length; i++) {
            double y = Log10.of(v[i]);
            if (Double.isNaN(y)) {
                continue;
            }
            Eq e = slots.get(i);
            update(e, r.iter(), y);
            if (e.open) {
                checkResolved(e, r, out);
            } else if (e.count > warmup && e.cusum.signalled() && e.smooth - e.minSmooth >= minRise
                    && e.count - e.lastEval >= evalEvery && e.logs.size() >= MIN_POINTS) {
                e.lastEval = e.count;
                evaluate(e, slots, r, out);
            }
        }
    }

    private void update(Eq e, long iter, double y) {
        e.count++;
        if (e.count == 1) {
            e.smooth = y;
        } else {
            double d = y - e.last;
            double z = d / Math.max(e.scale, minScale);
            e.cusum.add(z);
            e.scale = e.count == 2 ? Math.abs(d) : e.scale + SCALE_WEIGHT * (Math.abs(d) - e.scale);
            e.smooth += SMOOTH * (y - e.smooth);
        }
        e.last = y;
        e.iters.add(iter);
        e.logs.add(y);
        if (e.count > warmup) {
            e.minSmooth = Math.min(e.minSmooth, e.smooth);
            e.minRaw = Math.min(e.minRaw, y);
        }
    }

    private boolean rising(TheilSen t) {
        return t.slope() >= minSlope && t.low() > 0;
    }

    private void evaluate(Eq e, List<Eq> slots, IterationRecord r, Consumer<Detection> out) {
        TheilSen t = e.fit();
        if (!rising(t)) {
            return;
        }
        int others = 0;
        int othersRising = 0;
        boolean familyMateRising = false;
        List<Double> slopes = new ArrayList<>();
        slopes.add(t.slope());
        for (Eq o : slots) {
            if (o == e || o.logs.size() < MIN_POINTS) {
                continue;
            }
            others++;
            TheilSen ot = o.fit();
            slopes.add(ot.slope());
            if (rising(ot)) {
                othersRising++;
                if (e.family != null && e.family.equals(o.family)) {
                    familyMateRising = true;
                }
            }
        }
        if (familyMateRising || (others > 0 && othersRising >= othersRisingFraction * others)) {
            return;
        }
        double[] sl = slopes.stream().mapToDouble(Double::doubleValue).toArray();
        double outlierZ = RobustScale.of(sl, sl.length).modifiedZ(t.slope());
        e.open = true;
        e.segmentSinceOpen = false;
        e.openFrom = e.minSmooth;
        Map<String, Object> ev = new LinkedHashMap<>();
        ev.put("slope_decades_per_iter", Log10.round(t.slope()));
        ev.put("slope_low", Log10.round(t.low()));
        ev.put("slope_high", Log10.round(t.high()));
        ev.put("rise_decades", Log10.round(e.last - e.minRaw));
        ev.put("residual", Log10.round(Math.pow(10, e.last)));
        ev.put("running_min", Log10.round(Math.pow(10, e.minRaw)));
        ev.put("cusum", Log10.round(e.cusum.value()));
        ev.put("others", others);
        ev.put("others_rising", othersRising);
        if (Double.isFinite(outlierZ)) {
            ev.put("slope_modified_z", Log10.round(outlierZ));
        }
        ev.put("window", e.logs.size());
        String summary = String.format(java.util.Locale.ROOT,
                "%s residual rising %.3g decades/iteration, %.2g decades above its minimum, while %s",
                e.name, t.slope(), e.last - e.minRaw, others == 0 ? "no other equation is reported"
                        : othersRising == 0 ? "the others fall or stay flat" : "most others fall or stay flat");
        String remedy = "Look for a local mesh trouble spot: poor cell quality or resolution where " + e.name
                + " peaks (inspect the cells with the largest " + e.name + " residual); check the boundary"
                + " conditions that feed it.";
        out.accept(new Detection(Patterns.SINGLE_EQUATION_BLOWUP, DetectionState.OPEN, Severity.CRITICAL, r.iter(),
                List.of(e.name), null, summary, remedy, ev));
    }

    private void checkResolved(Eq e, IterationRecord r, Consumer<Detection> out) {
        boolean recovered = e.smooth <= e.openFrom + minRise / 2;
        String why = "back near the level it rose from";
        if (!recovered && e.segmentSinceOpen && e.count > warmup && e.count - e.lastEval >= evalEvery
                && e.logs.size() >= MIN_POINTS) {
            e.lastEval = e.count;
            TheilSen t = e.fit();
            recovered = t.high() < 0;
            why = "falling again after the restart";
        }
        if (!recovered) {
            return;
        }
        e.open = false;
        Map<String, Object> ev = new LinkedHashMap<>();
        ev.put("residual", Log10.round(Math.pow(10, e.last)));
        out.accept(new Detection(Patterns.SINGLE_EQUATION_BLOWUP, DetectionState.RESOLVED, Severity.CRITICAL,
                r.iter(), List.of(e.name), null, e.name + " residual " + why, "", ev));
    }

    @Override
    public void segment(int segment, long iter, Consumer<Detection> out) {
        for (Eq e : eqs.all().values()) {
            e.reset();
            if (e.open) {
                e.segmentSinceOpen = true;
            }
        }
    }

    @Override
    public Map<String, Object> snapshot() {
        Map<String, Object> m = new LinkedHashMap<>();
        List<String> open = new ArrayList<>();
        for (Eq e : eqs.all().values()) {
            if (e.open) {
                open.add(e.name);
            }
        }
        m.put("open_equations", open);
        m.put("equations", lastNames.size());
        return m;
    }
}
