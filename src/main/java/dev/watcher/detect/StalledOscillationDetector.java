package dev.watcher.detect;

import dev.watcher.detect.stats.MannKendall;
import dev.watcher.detect.stats.TheilSen;
import dev.watcher.model.Detection;
import dev.watcher.model.DetectionState;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.Patterns;
import dev.watcher.model.Samples;
import dev.watcher.model.Severity;
import java.util.ArrayList;
import java.util.Arrays;
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
 * evaluation form one condition (one event naming them).
 *
 * <p>Resolution, with hysteresis so that noise around a plateau cannot flap the condition: the condition
 * resolves when every one of its equations has either
 * <ul>
 * <li>reached the target clearly: the window's mean level (the mean of its block means of log10 r) at least
 *     {@code resolve_margin_decades} below it. The stall opens on a window median above the target, so a
 *     level hovering at the target sits inside the band between the two and neither opens nor resolves
 *     again; or</li>
 * <li>started falling again: its exponentially smoothed block means (weight 0.1 per block: a mean lag of
 *     about 90 records) {@code resolve_drop_decades} below the level it stalled at AND below their own value
 *     one window earlier. A fall of that size within one window is more than the {@code max_drift_decades} a
 *     stall may drift, so a residual that only creeps down (a stall in every practical sense) stays one open
 *     condition instead of resolving and reopening at each half decade.</li>
 * </ul>
 * Once resolved, an equation needs a fresh window and {@code confirm} evaluations to stall again (its raw
 * values are not kept while it is stalled).
 *
 * <p>Parameters ({@code stalled-oscillation.}): {@code window} 400 records, {@code block} 10,
 * {@code eval_every} 200, {@code target} 1e-5, {@code trend_alpha} 0.05, {@code max_drift_decades} 0.3,
 * {@code min_amplitude_decades} 0.05, {@code negligible_drift_decades} 0.05, {@code confirm} 2,
 * {@code resolve_drop_decades} 0.5, {@code resolve_margin_decades} 0.2 (about five standard deviations of
 * a 400-record window's mean level under the noise of the DetectBench model, AR(1) of lag-one correlation
 * 0.92 and 0.15 decades of scatter plus a sine of 0.08 decades: our choice, no published source).
 *
 * <p>Cost per record and equation O(1), free of allocation and of logarithms: a value goes into the
 * block's running product, kept as an integer sum of binary exponents and a product of mantissas (one
 * logarithm per block), and, unless the equation is stalled, into a ring of raw values. Per block, O(1) for
 * the block rings and O(open equations) for the resolution check. Evaluations come at the first block end at
 * or after every {@code eval_every} values (exactly every 200 values with the defaults); past a cheap
 * O(window / block) gate (not stalled, not clearly falling, above the target) one costs O(window log window
 * + (window / block)^2). The window's median and spread come from the order statistics of the raw values
 * (log10 is monotone: the log of an order statistic is the order statistic of the logs).
 */
final class StalledOscillationDetector implements Detector {

    private static final String P = Patterns.STALLED_OSCILLATION + ".";
    private static final double LOG10_2 = 0.30102999566398120;
    /** Mantissa products are renormalised above this (2^64), so long blocks cannot overflow. */
    private static final double RENORMALISE = 0x1p64;

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
    private final double resolveMargin;
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
        resolveMargin = s.number(P + "resolve_margin_decades", 0.2);
        eqs = new PerName<>(Eq::new);
        raw = new double[window];
        bx = new double[window / block + 1];
        by = new double[window / block + 1];
    }

    private final class Eq {
        final String name;
        /**
         * The raw (positive, finite) values of the window, in ring order: only their order statistics are
         * used (logs are taken of those alone), so the ring needs no oldest-first view.
         */
        final double[] values = new double[window];
        int head;
        boolean full;
        // the last window / block blocks, one ring index for the three: block means of log10 r, block
        // midpoints (iterations), and the smoothed level after each block (its oldest: the level one window ago)
        final double[] means = new double[window / block];
        final double[] mids = new double[window / block];
        final double[] levels = new double[window / block];
        int blockHead;
        int blocks;
        long count;
        long nextEval = evalEvery;
        // the block in progress: log2 of the product of its values = exponents + log2(mantissas)
        long exponents;
        double mantissas = 1;
        int inBlock;
        long blockStart;
        /** Exponentially smoothed block means (weight 0.1): the level a renewed fall is judged on. */
        double level10 = Double.NaN;
        /** Sum of the window's block means (recomputed exactly each time the ring wraps). */
        double meanSum;
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
            head = 0;
            full = false;
            blockHead = 0;
            blocks = 0;
            meanSum = 0;
            count = 0;
            nextEval = evalEvery;
            exponents = 0;
            mantissas = 1;
            inBlock = 0;
            streak = 0;
            level10 = Double.NaN;
        }

        /** Adds a positive finite value; true when it completed a block. */
        boolean add(double v, long iter) {
            if (!stalled) { // the raw values serve the stall test only
                values[head] = v;
                if (++head == values.length) {
                    head = 0;
                    full = true;
                }
            }
            if (inBlock == 0) {
                blockStart = iter;
            }
            long bits = Double.doubleToRawLongBits(v);
            int e = (int) (bits >>> 52); // the sign bit is 0: v > 0
            if (e == 0) { // subnormal: scale into the normal range first
                bits = Double.doubleToRawLongBits(v * 0x1p54);
                e = (int) (bits >>> 52) - 54;
            }
            exponents += e - 1023;
            mantissas *= Double.longBitsToDouble((bits & 0x000fffffffffffffL) | 0x3ff0000000000000L);
            if (mantissas >= RENORMALISE) {
                mantissas *= 0x1p-64;
                exponents += 64;
            }
            if (++inBlock < block) {
                return false;
            }
            endBlock(iter);
            return true;
        }

        /** Closes the block in progress (kept apart so that the per-value path stays small enough to inline). */
        private void endBlock(long iter) {
            count += block;
            double mean = (exponents * LOG10_2 + Math.log10(mantissas)) / block;
            level10 = Double.isNaN(level10) ? mean : level10 + 0.1 * (mean - level10);
            int k = blockHead;
            meanSum += mean - (blocks == means.length ? means[k] : 0);
            means[k] = mean;
            mids[k] = 0.5 * (blockStart + iter);
            levels[k] = level10;
            if (blocks < means.length) {
                blocks++;
            }
            if (++blockHead == means.length) {
                blockHead = 0;
                meanSum = 0; // once per wrap, the exact sum: the running one cannot drift
                for (double x : means) {
                    meanSum += x;
                }
            }
            exponents = 0;
            mantissas = 1;
            inBlock = 0;
        }

        /** True when this equation no longer counts as stalled at {@code stalledAt} (see the class comment). */
        boolean cleared(double stalledAt) {
            double now = level10;
            if (Double.isNaN(now)) {
                return false;
            }
            return belowTarget() || now <= stalledAt - resolveDrop && now <= levels[oldest()] - resolveDrop;
        }

        /** Ring index of the oldest block. */
        int oldest() {
            return blocks < means.length ? 0 : blockHead;
        }

        /** Copies a block ring oldest first into {@code dst}; returns the count. */
        int copy(double[] ring, double[] dst) {
            int from = oldest();
            int first = Math.min(blocks, ring.length - from);
            System.arraycopy(ring, from, dst, 0, first);
            System.arraycopy(ring, 0, dst, first, blocks - first);
            return blocks;
        }

        /** The window's mean level (mean of its block means) clearly below the target. */
        boolean belowTarget() {
            return blocks > 0 && meanSum / blocks <= target - resolveMargin;
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
        long iter = r.iter();
        for (int i = 0; i < v.length; i++) {
            double x = v[i];
            if (!(x > 0 && x < Double.POSITIVE_INFINITY)) {
                continue; // no log of zero, negative, NaN or infinite values
            }
            Eq e = slots.get(i);
            if (!e.add(x, iter)) {
                continue;
            }
            blockDone = true;
            if (e.count >= e.nextEval) {
                while (e.nextEval <= e.count) {
                    e.nextEval += evalEvery;
                }
                if (e.full && !e.stalled) {
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
        int m = e.copy(e.means, by);
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
        e.copy(e.mids, bx);
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
        // median and p95 - p5 of log10 r (type-7 quantiles, as RobustScale) from the sorted raw values
        int n = window;
        System.arraycopy(e.values, 0, raw, 0, n);
        Arrays.sort(raw, 0, n);
        e.level = (n & 1) == 1 ? Math.log10(raw[n / 2])
                : 0.5 * (Math.log10(raw[n / 2 - 1]) + Math.log10(raw[n / 2]));
        e.amplitude = logQuantile(raw, n, 0.95) - logQuantile(raw, n, 0.05);
        return e.level > target;
    }

    /** The p-quantile of the logs of sorted positive values (type 7: linear between order statistics). */
    private static double logQuantile(double[] sorted, int n, double p) {
        double hpos = (n - 1) * p;
        int lo = (int) Math.floor(hpos);
        int hi = Math.min(lo + 1, n - 1);
        double a = Math.log10(sorted[lo]);
        return a + (hpos - lo) * (Math.log10(sorted[hi]) - a);
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
            boolean atTarget = true;
            for (int i = 0; i < g.members.size() && all; i++) {
                Eq e = g.members.get(i);
                all = e.cleared(g.level[i]);
                atTarget &= e.belowTarget();
            }
            if (all) {
                open.remove(k);
                List<String> names = new ArrayList<>();
                double level = Double.NEGATIVE_INFINITY;
                for (Eq e : g.members) {
                    e.stalled = false;
                    e.streak = 0;
                    e.head = 0; // a fresh window of raw values for the next stall test
                    e.full = false;
                    names.add(e.name);
                    level = Math.max(level, atTarget ? e.meanSum / e.blocks : e.level10);
                }
                Map<String, Object> ev = new LinkedHashMap<>();
                ev.put("level", Log10.round(Math.pow(10, level)));
                ev.put("target", Log10.round(Math.pow(10, target)));
                ev.put("reason", atTarget ? "below target" : "falling again");
                String what = String.join(", ", names);
                out.accept(new Detection(Patterns.STALLED_OSCILLATION, DetectionState.RESOLVED, Severity.WARNING,
                        r.iter(), names, null, atTarget ? what + " now clearly below the target"
                                : what + " falling again below the stalled level", "", ev));
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
