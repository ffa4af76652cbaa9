package dev.watcher.detect;

import dev.watcher.detect.stats.MannKendall;
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
 * {@code stalled-oscillation}: residuals bounce around (or sit flat at) a level above the target with no
 * downward trend. Warning.
 *
 * <p>Method, per equation on log10 r over the last {@code window} records of the segment (METHODS.md
 * "Stalled oscillation"), every {@code eval_every} records:
 * <ol>
 * <li>level: the window's median is above log10 {@code target};</li>
 * <li>no trend: Mann–Kendall on block means of {@code block} records, with the Hamed–Rao variance
 *     correction, two-sided p at least {@code trend_alpha}; a significant trend whose Theil–Sen drift over
 *     the window is below {@code negligible_drift_decades} does not count (a plateau approached
 *     geometrically is significant but negligible);</li>
 * <li>flat, not merely "no significant trend": Sen's 95 % interval of the slope, times the window length,
 *     lies inside +/- {@code max_drift_decades} (an equivalence test);</li>
 * <li>amplitude: the robust spread p95 - p5 of log10 r; at least {@code min_amplitude_decades} (0.05:
 *     METHODS.md suggests about 0.1, but the period-2 limit cycle of an over-relaxed Picard iteration in the
 *     tests swings by 0.09) is an oscillation ({@code kind: oscillation}), below it a flat, noise-free plateau ({@code kind: plateau}).</li>
 * </ol>
 * The conditions must hold at {@code confirm} consecutive evaluations. Equations that stall at the same
 * evaluation form one condition (one event naming them). It resolves (hysteresis) when every one of its
 * equations has fallen {@code resolve_drop_decades} below the level it stalled at, or below the target,
 * judged on exponentially smoothed block means (weight 0.1, about 100 records), not on single values.
 * A cheap gate skips the statistics while the window's second half is clearly below its first half.
 *
 * <p>Parameters ({@code stalled-oscillation.}): {@code window} 400 records, {@code block} 10,
 * {@code eval_every} 200, {@code target} 1e-5, {@code trend_alpha} 0.05, {@code max_drift_decades} 0.3,
 * {@code min_amplitude_decades} 0.05, {@code negligible_drift_decades} 0.05, {@code confirm} 2, {@code resolve_drop_decades} 0.5. Cost: O(1) per
 * value; per evaluation O(window log window + (window/block)^2).
 */
final class StalledOscillationDetector implements Detector {

    private static final String P = Patterns.STALLED_OSCILLATION + ".";

    private final int window;
    private final int block;
    private final int evalEvery;
    private final double target;
    private final double trendAlpha;
    private final double maxDrift;
    private final double minAmplitude;
    private final double negligibleDrift;
    private final int confirm;
    private final double resolveDrop;
    private final PerName<Eq> eqs;
    private final List<Group> open = new ArrayList<>();
    private final double[] raw;
    private final double[] bx;
    private final double[] by;

    StalledOscillationDetector(DetectSettings s) {
        block = Math.max(1, s.integer(P + "block", 10));
        window = Math.max(4 * block, s.integer(P + "window", 400));
        evalEvery = Math.max(1, s.integer(P + "eval_every", 200));
        target = Math.log10(s.number(P + "target", 1e-5));
        trendAlpha = s.number(P + "trend_alpha", 0.05);
        maxDrift = s.number(P + "max_drift_decades", 0.3);
        minAmplitude = s.number(P + "min_amplitude_decades", 0.05);
        negligibleDrift = s.number(P + "negligible_drift_decades", 0.05);
        confirm = Math.max(1, s.integer(P + "confirm", 2));
        resolveDrop = s.number(P + "resolve_drop_decades", 0.5);
        eqs = new PerName<>(Eq::new);
        raw = new double[window];
        bx = new double[window / block + 1];
        by = new double[window / block + 1];
    }

    private final class Eq {
        final String name;
        final RollingWindow logs = new RollingWindow(window);
        final RollingWindow means = new RollingWindow(window / block);
        final RollingWindow mids = new RollingWindow(window / block);
        long count;
        double sum;
        int inBlock;
        long blockStart;
        /** Exponentially smoothed block means (weight 0.1): the level that resolution is judged on. */
        double level10 = Double.NaN;
        int streak;
        boolean stalled;
        // evidence of the latest evaluation
        double level;
        double amplitude;
        double slope;
        double pTrend;
        double inflation;

        Eq(String name) {
            this.name = name;
        }

        void reset() {
            logs.clear();
            means.clear();
            mids.clear();
            count = 0;
            sum = 0;
            inBlock = 0;
            streak = 0;
            level10 = Double.NaN;
        }
    }

    private static final class Group {
        final List<Eq> members;
        final double[] level;

        Group(List<Eq> members) {
            this.members = members;
            this.level = new double[members.size()];
            for (int i = 0; i < level.length; i++) {
                level[i] = members.get(i).level;
            }
        }
    }

    @Override
    public void observe(IterationRecord r, Consumer<Detection> out) {
        Samples res = r.residuals();
        double[] v = res.values();
        List<Eq> slots = eqs.slots(res.names());
        List<Eq> newly = null;
        boolean blockDone = false;
        for (int i = 0; i < v.length; i++) {
            double y = Log10.of(v[i]);
            if (Double.isNaN(y)) {
                continue;
            }
            Eq e = slots.get(i);
            e.count++;
            e.logs.add(y);
            if (e.inBlock == 0) {
                e.blockStart = r.iter();
            }
            e.sum += y;
            if (++e.inBlock == block) {
                double mean = e.sum / block;
                e.means.add(mean);
                e.level10 = Double.isNaN(e.level10) ? mean : e.level10 + 0.1 * (mean - e.level10);
                e.mids.add(0.5 * (e.blockStart + r.iter()));
                e.sum = 0;
                e.inBlock = 0;
                blockDone = true;
            }
            if (e.logs.full() && e.count % evalEvery == 0 && !e.stalled) {
                if (evaluate(e)) {
                    if (++e.streak >= confirm) {
                        if (newly == null) {
                            newly = new ArrayList<>();
                        }
                        newly.add(e);
                    }
                } else {
                    e.streak = 0;
                }
            }
        }
        if (newly != null) {
            fire(newly, r, out);
        }
        if (blockDone && !open.isEmpty()) {
            checkResolved(r, out);
        }
    }

    /** The stall test of one equation's full window; records its evidence. */
    private boolean evaluate(Eq e) {
        int m = e.means.copyTo(by);
        // cheap gate: second half of the block means clearly below the first half means still converging
        double first = 0;
        double second = 0;
        int h = m / 2;
        for (int i = 0; i < h; i++) {
            first += by[i];
            second += by[m - h + i];
        }
        if ((first - second) / h > maxDrift) {
            return false;
        }
        if (e.level10 <= target) {
            return false;
        }
        e.level = e.level10;
        e.mids.copyTo(bx);
        TheilSen ts = TheilSen.fit(bx, by, m, 0.95);
        e.slope = ts.slope();
        double span = bx[m - 1] - bx[0] + block;
        if (!ts.within(maxDrift / span)) {
            return false;
        }
        MannKendall mk = MannKendall.hamedRao(by, m);
        e.pTrend = mk.pTwoSided();
        e.inflation = mk.varianceInflation();
        // a significant but negligible drift (a plateau approached geometrically) does not block
        if (mk.pTwoSided() < trendAlpha && Math.abs(ts.slope()) * span > negligibleDrift) {
            return false;
        }
        int n = e.logs.copyTo(raw);
        RobustScale rs = RobustScale.of(raw, n);
        e.level = rs.median();
        e.amplitude = rs.spread();
        return e.level > target;
    }

    private void fire(List<Eq> members, IterationRecord r, Consumer<Detection> out) {
        Group g = new Group(List.copyOf(members));
        open.add(g);
        boolean oscillating = false;
        double maxLevel = Double.NEGATIVE_INFINITY;
        double maxAmp = 0;
        double maxSlope = 0;
        double minP = 1;
        List<String> names = new ArrayList<>();
        for (Eq e : members) {
            e.stalled = true;
            names.add(e.name);
            oscillating |= e.amplitude >= minAmplitude;
            maxLevel = Math.max(maxLevel, e.level);
            maxAmp = Math.max(maxAmp, e.amplitude);
            maxSlope = Math.abs(e.slope) > Math.abs(maxSlope) ? e.slope : maxSlope;
            minP = Math.min(minP, e.pTrend);
        }
        Map<String, Object> ev = new LinkedHashMap<>();
        ev.put("kind", oscillating ? "oscillation" : "plateau");
        ev.put("level", Log10.round(Math.pow(10, maxLevel)));
        ev.put("target", Log10.round(Math.pow(10, target)));
        ev.put("decades_above_target", Log10.round(maxLevel - target));
        ev.put("amplitude_decades", Log10.round(maxAmp));
        ev.put("slope_decades_per_iter", Log10.round(maxSlope));
        ev.put("p_trend_min", Log10.round(minP));
        ev.put("window", window);
        String what = String.join(", ", names);
        String summary = oscillating
                ? String.format(java.util.Locale.ROOT, "%s residual%s oscillating by %.2g decades around %s with no"
                        + " downward trend over %d iterations", what, names.size() > 1 ? "s" : "", maxAmp,
                        Log10.sci(Math.pow(10, maxLevel)), window)
                : String.format(java.util.Locale.ROOT, "%s residual%s flat at %s, %.2g decades above the target,"
                        + " for %d iterations", what, names.size() > 1 ? "s" : "", Log10.sci(Math.pow(10, maxLevel)),
                        maxLevel - target, window);
        String remedy = "Lower the relaxation factor of " + (names.size() > 1 ? "these equations" : what)
                + " (for example by a third) and watch whether the residuals start falling again"
                + (oscillating ? "." : "; a flat plateau can also mean the target is below what this mesh and"
                        + " precision can reach.");
        out.accept(new Detection(Patterns.STALLED_OSCILLATION, DetectionState.OPEN, Severity.WARNING, r.iter(), names,
                null, summary, remedy, ev));
    }

    private void checkResolved(IterationRecord r, Consumer<Detection> out) {
        for (int k = open.size() - 1; k >= 0; k--) {
            Group g = open.get(k);
            boolean all = true;
            for (int i = 0; i < g.members.size() && all; i++) {
                Eq e = g.members.get(i);
                double now = e.level10;
                all = !Double.isNaN(now) && (now <= g.level[i] - resolveDrop || now <= target);
            }
            if (all) {
                open.remove(k);
                List<String> names = new ArrayList<>();
                for (Eq e : g.members) {
                    e.stalled = false;
                    e.streak = 0;
                    names.add(e.name);
                }
                Map<String, Object> ev = new LinkedHashMap<>();
                ev.put("level", Log10.round(Math.pow(10, g.members.get(0).means.last())));
                out.accept(new Detection(Patterns.STALLED_OSCILLATION, DetectionState.RESOLVED, Severity.WARNING,
                        r.iter(), names, null, String.join(", ", names) + " falling again below the stalled level",
                        "", ev));
            }
        }
    }

    @Override
    public void segment(int segment, long iter, Consumer<Detection> out) {
        for (Eq e : eqs.all().values()) {
            e.reset();
        }
    }

    @Override
    public Map<String, Object> snapshot() {
        Map<String, Object> m = new LinkedHashMap<>();
        List<String> stalled = new ArrayList<>();
        for (Eq e : eqs.all().values()) {
            if (e.stalled) {
                stalled.add(e.name);
            }
        }
        m.put("stalled_equations", stalled);
        return m;
    }
}
