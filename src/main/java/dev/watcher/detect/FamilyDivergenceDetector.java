package dev.watcher.detect;

import dev.watcher.detect.stats.Holm;
import dev.watcher.detect.stats.MannKendall;
import dev.watcher.detect.stats.QuadraticFit;
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
 * {@code family-divergence}: most equations of one family (momentum, turbulence, volume fraction, energy,
 * continuity; per region; or every equation of the run when the names give no family, see
 * {@link EquationFamilies}) turn from falling to rising together. Critical.
 *
 * <p>Method (METHODS.md "A family diverging"): log10 r is averaged over blocks of {@code block} records
 * (block means are far less autocorrelated than single iterations); over the last {@code blocks} block
 * means (the window, {@code block * blocks} iterations) a two-phase split at the lowest block: the early
 * phase must fall (Theil–Sen slope below 0, at least 3 blocks) and the late phase must rise, judged by a
 * one-sided Mann–Kendall test (exact for up to 10 points, Hamed–Rao corrected above), with a Theil–Sen slope
 * of at least {@code min_late_slope} decades/iteration and a rise of at least {@code min_rise} decades
 * above the lowest block. A quadratic fit's curvature t-statistic is reported as evidence. An equation
 * that does not show this shape gets p = 1. The family fires when Holm's step-down correction at
 * family-wise level {@code alpha} rejects for more than half of its members (not Fisher's combination:
 * the equations are correlated). Flattening at round-off is not divergence: it has no late rise, and
 * levels below {@code floor} are ignored.
 *
 * <p>An open condition resolves (hysteresis) when more than half of its equations are back within half of
 * {@code min_rise} of the level they rose from, or, after a new segment, when more than half fall
 * significantly (Sen's interval of the block means below 0).
 *
 * <p>Parameters ({@code family-divergence.}): {@code block} 10 records, {@code blocks} 20,
 * {@code min_rise} 0.5 decades, {@code min_late_slope} 0.002 decades/iteration, {@code alpha} 0.01,
 * {@code floor} 1e-12, {@code warmup} 30 records per segment, {@code min_family_size} 2. Cost: O(1) per
 * value; O(blocks^2) per equation per block, only for equations whose latest block is at least
 * {@code min_rise} above the window's lowest.
 */
final class FamilyDivergenceDetector implements Detector {

    private static final String P = Patterns.FAMILY_DIVERGENCE + ".";
    private static final int MIN_EARLY = 3;
    private static final int MIN_LATE = 4;

    private final int block;
    private final int blocks;
    private final double minRise;
    private final double minLateSlope;
    private final double alpha;
    private final double floor;
    private final int warmup;
    private final int minFamilySize;
    private final Map<String, List<String>> declared;
    private final PerName<Eq> eqs;
    private List<String> familiesFor;
    private Map<String, List<String>> families = Map.of();
    private final List<Open> open = new ArrayList<>();
    private final double[] bx;
    private final double[] by;

    FamilyDivergenceDetector(DetectSettings s) {
        block = Math.max(1, s.integer(P + "block", 10));
        blocks = Math.max(MIN_EARLY + MIN_LATE, s.integer(P + "blocks", 20));
        minRise = s.number(P + "min_rise", 0.5);
        minLateSlope = s.number(P + "min_late_slope", 0.002);
        alpha = s.number(P + "alpha", 0.01);
        floor = Math.log10(s.number(P + "floor", 1e-12));
        warmup = Math.max(0, s.integer(P + "warmup", 30));
        minFamilySize = Math.max(1, s.integer(P + "min_family_size", 2));
        declared = s.families();
        eqs = new PerName<>(Eq::new);
        bx = new double[blocks];
        by = new double[blocks];
    }

    private final class Eq {
        final String name;
        final RollingWindow means = new RollingWindow(blocks);
        final RollingWindow ends = new RollingWindow(blocks);
        long count;
        double sum;
        int inBlock;
        double lastIter;
        // result of the latest evaluation
        double p = 1;
        double lateSlope;
        double rise;
        double lowest;
        double curvatureT;
        boolean fresh;

        Eq(String name) {
            this.name = name;
        }

        void reset() {
            means.clear();
            ends.clear();
            count = 0;
            sum = 0;
            inBlock = 0;
            fresh = false;
            p = 1;
        }

        double latest() {
            return means.last();
        }
    }

    private static final class Open {
        final String family;
        final List<String> equations;
        final double[] from;
        boolean segmentSince;

        Open(String family, List<String> equations, double[] from) {
            this.family = family;
            this.equations = equations;
            this.from = from;
        }
    }

    @Override
    public void observe(IterationRecord r, Consumer<Detection> out) {
        Samples res = r.residuals();
        if (res.names() != familiesFor) {
            familiesFor = res.names();
            families = EquationFamilies.of(res.names(), declared, minFamilySize);
        }
        double[] v = res.values();
        List<Eq> slots = eqs.slots(res.names());
        boolean blockDone = false;
        for (int i = 0; i < v.length; i++) {
            double y = Log10.of(v[i]);
            if (Double.isNaN(y)) {
                continue;
            }
            Eq e = slots.get(i);
            e.count++;
            if (e.count <= warmup) {
                continue;
            }
            e.sum += y;
            e.inBlock++;
            e.lastIter = r.iter();
            if (e.inBlock == block) {
                e.means.add(e.sum / block);
                e.ends.add(r.iter());
                e.sum = 0;
                e.inBlock = 0;
                e.fresh = true;
                blockDone = true;
            }
        }
        if (blockDone) {
            judge(r, out);
        }
    }

    private void judge(IterationRecord r, Consumer<Detection> out) {
        for (Map.Entry<String, List<String>> f : families.entrySet()) {
            if (isOpen(f.getKey())) {
                continue;
            }
            List<String> members = f.getValue();
            double[] p = new double[members.size()];
            int candidates = 0;
            for (int i = 0; i < p.length; i++) {
                Eq e = eqs.get(members.get(i));
                p[i] = 1;
                if (e != null) {
                    if (e.fresh) {
                        test(e);
                    }
                    p[i] = e.p;
                    if (e.p < 1) {
                        candidates++;
                    }
                }
            }
            if (2 * candidates <= members.size()) {
                continue;
            }
            boolean[] rejected = Holm.reject(p, p.length, alpha);
            List<String> rising = new ArrayList<>();
            for (int i = 0; i < p.length; i++) {
                if (rejected[i]) {
                    rising.add(members.get(i));
                }
            }
            if (2 * rising.size() > members.size()) {
                fire(f.getKey(), members, rising, p, r, out);
            }
        }
        for (int k = open.size() - 1; k >= 0; k--) {
            Open o = open.get(k);
            int back = 0;
            int falling = 0;
            for (int i = 0; i < o.equations.size(); i++) {
                Eq e = eqs.get(o.equations.get(i));
                if (e == null || e.means.size() == 0) {
                    continue;
                }
                if (e.latest() <= o.from[i] + minRise / 2) {
                    back++;
                } else if (o.segmentSince && e.means.size() >= MIN_EARLY + MIN_LATE) {
                    falling += fallingSignificantly(e) ? 1 : 0;
                }
            }
            if (2 * back > o.equations.size() || 2 * falling > o.equations.size()) {
                open.remove(k);
                Map<String, Object> ev = new LinkedHashMap<>();
                ev.put("recovered", back);
                ev.put("falling", falling);
                out.accept(new Detection(Patterns.FAMILY_DIVERGENCE, DetectionState.RESOLVED, Severity.CRITICAL,
                        r.iter(), o.equations, null, familyLabel(o.family) + " residuals "
                                + (2 * back > o.equations.size() ? "back near the level they rose from"
                                        : "falling again"), "", ev));
            }
        }
        for (Eq e : eqs.all().values()) {
            e.fresh = false;
        }
    }

    private boolean fallingSignificantly(Eq e) {
        int n = e.means.copyTo(by);
        e.ends.copyTo(bx);
        return TheilSen.fit(bx, by, n, 0.95).high() < 0;
    }

    private boolean isOpen(String family) {
        for (Open o : open) {
            if (o.family.equals(family)) {
                return true;
            }
        }
        return false;
    }

    /** The two-phase test of one equation; sets e.p (1 when the shape is not there) and the evidence. */
    private void test(Eq e) {
        e.p = 1;
        int n = e.means.size();
        if (n < MIN_EARLY + MIN_LATE) {
            return;
        }
        e.means.copyTo(by);
        int low = 0;
        for (int i = 1; i < n; i++) {
            if (by[i] < by[low]) {
                low = i;
            }
        }
        double last = by[n - 1];
        e.lowest = by[low];
        e.rise = last - by[low];
        // cheap gates first: enough rise, above round-off, a split with both phases present
        if (e.rise < minRise || last < floor || low < MIN_EARLY - 1 || n - low < MIN_LATE) {
            return;
        }
        e.ends.copyTo(bx);
        double early = TheilSen.fit(bx, by, low + 1, 0.95).slope();
        if (!(early < 0)) {
            return;
        }
        double[] lx = java.util.Arrays.copyOfRange(bx, low, n);
        double[] ly = java.util.Arrays.copyOfRange(by, low, n);
        TheilSen late = TheilSen.fit(lx, ly, ly.length, 0.95);
        e.lateSlope = late.slope();
        if (late.slope() < minLateSlope) {
            return;
        }
        MannKendall mk = ly.length <= MannKendall.EXACT_MAX_N ? MannKendall.of(ly, ly.length)
                : MannKendall.hamedRao(ly, ly.length);
        e.curvatureT = QuadraticFit.of(by, n).tC();
        e.p = mk.pIncreasing();
    }

    private void fire(String family, List<String> members, List<String> rising, double[] p, IterationRecord r,
            Consumer<Detection> out) {
        double[] from = new double[rising.size()];
        double maxSlope = 0;
        double maxRise = 0;
        double minSlope = Double.POSITIVE_INFINITY;
        double maxP = 0;
        double minCurv = Double.POSITIVE_INFINITY;
        for (int i = 0; i < rising.size(); i++) {
            Eq e = eqs.get(rising.get(i));
            from[i] = e.lowest;
            maxSlope = Math.max(maxSlope, e.lateSlope);
            minSlope = Math.min(minSlope, e.lateSlope);
            maxRise = Math.max(maxRise, e.rise);
            maxP = Math.max(maxP, e.p);
            minCurv = Math.min(minCurv, e.curvatureT);
        }
        open.add(new Open(family, List.copyOf(rising), from));
        Map<String, Object> ev = new LinkedHashMap<>();
        ev.put("family", family);
        ev.put("members", members.size());
        ev.put("rising", rising.size());
        ev.put("slope_decades_per_iter", Log10.round(maxSlope));
        ev.put("min_slope_decades_per_iter", Log10.round(minSlope));
        ev.put("rise_decades", Log10.round(maxRise));
        ev.put("p_max", Log10.round(maxP));
        ev.put("alpha", alpha);
        if (Double.isFinite(minCurv)) {
            ev.put("curvature_t_min", Log10.round(minCurv));
        }
        ev.put("window_iterations", (long) block * blocks);
        String summary = String.format(java.util.Locale.ROOT,
                "%s residuals (%d of %d: %s) turned from falling to rising, up to %.2g decades at %.3g"
                        + " decades/iteration", familyLabel(family), rising.size(), members.size(),
                String.join(", ", rising), maxRise, maxSlope);
        String remedy = "The discretisation is likely unstable for this flow: to debug, try first-order"
                + " interpolation (upwind) for these equations and lower their relaxation factors; first order is"
                + " a diagnostic, not a fix for momentum accuracy. Check the mesh quality and the time step or"
                + " pseudo-time step as well.";
        out.accept(new Detection(Patterns.FAMILY_DIVERGENCE, DetectionState.OPEN, Severity.CRITICAL, r.iter(),
                rising, null, summary, remedy, ev));
    }

    private static String familyLabel(String family) {
        return "all".equals(family) ? "Most of the run's" : family;
    }

    @Override
    public void segment(int segment, long iter, Consumer<Detection> out) {
        for (Eq e : eqs.all().values()) {
            e.reset();
        }
        for (Open o : open) {
            o.segmentSince = true;
        }
    }

    @Override
    public Map<String, Object> snapshot() {
        Map<String, Object> m = new LinkedHashMap<>();
        List<String> fams = new ArrayList<>();
        for (Open o : open) {
            fams.add(o.family);
        }
        m.put("open_families", fams);
        m.put("families", new ArrayList<>(families.keySet()));
        return m;
    }
}
