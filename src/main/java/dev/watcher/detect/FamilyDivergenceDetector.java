package dev.watcher.detect;

import dev.watcher.detect.stats.Holm;
import dev.watcher.detect.stats.QuadraticFit;
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
 * {@code family-divergence}: most equations of one family (momentum, turbulence, volume fraction, energy,
 * continuity; per region; or every equation of the run when the names give no family, see
 * {@link EquationFamilies}; declared families replace the trade names) turn from falling to rising
 * together. Critical.
 *
 * <p>Method (METHODS.md "A family diverging"), per equation on log10 r with a {@link RiseTracker}: a
 * two-phase split at the running minimum. When some member is a candidate (CUSUM signalled and the smoothed
 * level {@code min_rise} above its minimum), at most every {@code eval_every} records, each member gets a
 * p-value: the one-sided Mann–Kendall test (exact up to 10 points, Hamed–Rao corrected above) of its late
 * phase, the values since its minimum, provided that phase rises by at least half of {@code min_rise}
 * with a Theil–Sen slope of at least {@code min_slope} decades/iteration and the level is above
 * {@code floor}; otherwise p = 1. The family fires when Holm's step-down correction at family-wise level
 * {@code alpha} rejects for more than half of its members (Holm, not Fisher's combination: the equations
 * are correlated). Flattening at round-off is not divergence: it has no late rise, and levels below
 * {@code floor} are ignored. The evidence reports how far the members fell before turning
 * ({@code fall_decades}) and the curvature t-statistic of a quadratic fit of the window.
 *
 * <p>An open condition resolves (hysteresis) when more than half of its equations are back within half of
 * {@code min_rise} of the level they rose from, or, after a new segment, when more than half fall
 * significantly (Sen's interval of the window's slope below 0).
 *
 * <p>Parameters ({@code family-divergence.}): {@code window} 60 records, {@code min_rise} 0.5 decades,
 * {@code min_slope} 0.002 decades/iteration, {@code alpha} 0.01, {@code floor} 1e-12, {@code warmup} 50
 * records per segment, {@code cusum_k} 0.5, {@code cusum_h} 5, {@code min_scale} 0.005 decades, {@code rise_noise} 4 (standard deviations of the level's wandering
 * added to {@code min_rise}), {@code baseline_window} 400 records (the minimum a rise is measured from is
 * the lowest smoothed level over this many records),
 * {@code eval_every} 3 records, {@code min_family_size} 2, {@code recovered_margin} 0.3 decades and
 * {@code max_required} 2 decades (the rise that counts is also at least {@code recovered_margin} above the
 * highest rise the equation came back from on its own in this segment, capped at {@code max_required}: the
 * excursions of a noisy plateau, or the jumps of an unsteady run's time steps, set the bar). Cost: O(1) per value; the tests run only while a
 * member rises persistently.
 */
final class FamilyDivergenceDetector implements Detector {

    private static final String P = Patterns.FAMILY_DIVERGENCE + ".";

    private final double floor;
    private final int minFamilySize;
    private final Map<String, List<String>> declared;
    private final PerName<RiseTracker> eqs;
    private List<String> familiesFor;
    private Map<String, List<String>> families = Map.of();
    private final Map<String, Long> lastEval = new LinkedHashMap<>();
    private final List<Open> open = new ArrayList<>();
    private final double[] xs;
    private final double[] ys;
    private long records;
    private final ResidualLogs logs;
    private final RiseTracker.Params rp;

    FamilyDivergenceDetector(DetectSettings s) {
        this(s, new ResidualLogs());
    }

    FamilyDivergenceDetector(DetectSettings s, ResidualLogs logs) {
        this.logs = logs;
        rp = RiseTracker.Params.read(s, P, 0.002, 400);
        logs.rises.reserve(rp);
        floor = Math.log10(s.number(P + "floor", 1e-12));
        minFamilySize = Math.max(1, s.integer(P + "min_family_size", 2));
        declared = s.families();
        eqs = new PerName<>(n -> new RiseTracker(logs.rises.of(n, rp), rp));
        xs = new double[rp.window()];
        ys = new double[rp.window()];
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
        records++;
        Samples res = r.residuals();
        if (res.names() != familiesFor) {
            familiesFor = res.names();
            families = EquationFamilies.of(res.names(), declared, minFamilySize);
        }
        int n = res.size();
        double[] ys = logs.of(res);
        long stamp = logs.stamp();
        List<RiseTracker> slots = eqs.slots(res.names());
        boolean anyCandidate = false;
        for (int i = 0; i < n; i++) {
            double y = ys[i];
            if (Double.isNaN(y)) {
                continue;
            }
            RiseTracker t = slots.get(i);
            t.add(stamp, r.iter(), y);
            anyCandidate |= t.candidate(rp.minRise());
        }
        if (anyCandidate) {
            judge(r, out);
        }
        if (!open.isEmpty()) {
            checkResolved(r, out);
        }
    }

    private void judge(IterationRecord r, Consumer<Detection> out) {
        for (Map.Entry<String, List<String>> f : families.entrySet()) {
            String family = f.getKey();
            List<String> members = f.getValue();
            if (isOpen(family) || records - lastEval.getOrDefault(family, Long.MIN_VALUE / 2) < rp.evalEvery()) {
                continue;
            }
            boolean candidate = false;
            for (String m : members) {
                RiseTracker t = eqs.get(m);
                candidate |= t != null && t.candidate(rp.minRise());
            }
            if (!candidate) {
                continue;
            }
            lastEval.put(family, records);
            double[] p = new double[members.size()];
            double[] slope = new double[members.size()];
            int shaped = 0;
            for (int i = 0; i < p.length; i++) {
                p[i] = 1;
                RiseTracker t = eqs.get(members.get(i));
                if (t == null || !t.warm() || t.rise() < t.required(rp.minRise()) / 2 || t.last() < floor) {
                    continue;
                }
                RiseTracker.Late late = t.late(xs, ys);
                if (late == null || late.fit().slope() < rp.minSlope()) {
                    continue;
                }
                p[i] = late.trend().pIncreasing();
                slope[i] = late.fit().slope();
                shaped++;
            }
            if (2 * shaped <= members.size()) {
                continue;
            }
            boolean[] rejected = Holm.reject(p, p.length, rp.alpha());
            List<String> rising = new ArrayList<>();
            List<Integer> idx = new ArrayList<>();
            for (int i = 0; i < p.length; i++) {
                if (rejected[i]) {
                    rising.add(members.get(i));
                    idx.add(i);
                }
            }
            if (2 * rising.size() > members.size()) {
                fire(family, members, rising, idx, p, slope, r, out);
            }
        }
    }

    private boolean isOpen(String family) {
        for (Open o : open) {
            if (o.family.equals(family)) {
                return true;
            }
        }
        return false;
    }

    private void fire(String family, List<String> members, List<String> rising, List<Integer> idx, double[] p,
            double[] slope, IterationRecord r, Consumer<Detection> out) {
        double[] from = new double[rising.size()];
        double maxSlope = 0;
        double minSlopeSeen = Double.POSITIVE_INFINITY;
        double maxRise = 0;
        double maxP = 0;
        double minFall = Double.POSITIVE_INFINITY;
        for (int k = 0; k < rising.size(); k++) {
            RiseTracker t = eqs.get(rising.get(k));
            int i = idx.get(k);
            from[k] = t.minSmooth();
            maxSlope = Math.max(maxSlope, slope[i]);
            minSlopeSeen = Math.min(minSlopeSeen, slope[i]);
            maxRise = Math.max(maxRise, t.rise());
            maxP = Math.max(maxP, p[i]);
            minFall = Math.min(minFall, t.fall(ys));
        }
        RiseTracker first = eqs.get(rising.get(0));
        int n = first.size();
        first.window(xs, ys);
        double curvatureT = QuadraticFit.of(ys, n).tC();
        open.add(new Open(family, List.copyOf(rising), from));
        Map<String, Object> ev = new LinkedHashMap<>();
        ev.put("family", family);
        ev.put("members", members.size());
        ev.put("rising", rising.size());
        ev.put("slope_decades_per_iter", Log10.round(maxSlope));
        ev.put("min_slope_decades_per_iter", Log10.round(minSlopeSeen));
        ev.put("rise_decades", Log10.round(maxRise));
        ev.put("fall_decades", Log10.round(minFall));
        ev.put("p_max", Log10.round(maxP));
        ev.put("alpha", rp.alpha());
        if (Double.isFinite(curvatureT)) {
            ev.put("curvature_t", Log10.round(curvatureT));
        }
        String summary = String.format(Locale.ROOT,
                "%s residuals (%d of %d: %s) %s rising, up to %.2g decades above their minimum at %.3g"
                        + " decades/iteration", familyLabel(family), rising.size(), members.size(),
                String.join(", ", rising), minFall > 0 ? "turned from falling to" : "are", maxRise, maxSlope);
        String remedy = "The discretisation is likely unstable here: to debug, try first-order interpolation"
                + " (upwind) for these equations and lower their relaxation factors; first order is a diagnostic,"
                + " not a fix for momentum accuracy. Check mesh quality and the (pseudo) time step too.";
        out.accept(new Detection(Patterns.FAMILY_DIVERGENCE, DetectionState.OPEN, Severity.CRITICAL, r.iter(),
                rising, null, summary, remedy, ev));
    }

    private void checkResolved(IterationRecord r, Consumer<Detection> out) {
        for (int k = open.size() - 1; k >= 0; k--) {
            Open o = open.get(k);
            int back = 0;
            int falling = 0;
            for (int i = 0; i < o.equations.size(); i++) {
                RiseTracker t = eqs.get(o.equations.get(i));
                if (t == null || !t.warm()) {
                    continue;
                }
                if (t.smooth() <= o.from[i] + rp.minRise() / 2) {
                    back++;
                } else if (o.segmentSince && records % rp.evalEvery() == 0) {
                    falling += t.window(xs, ys).high() < 0 ? 1 : 0;
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
                                        : "falling again after the restart"), "", ev));
            }
        }
    }

    private static String familyLabel(String family) {
        return "all".equals(family) ? "Most of the run's" : family;
    }

    @Override
    public void segment(int segment, long iter, Consumer<Detection> out) {
        for (RiseTracker t : eqs.all().values()) {
            t.reset();
        }
        for (Open o : open) {
            o.segmentSince = true;
        }
    }

    @Override
    public Map<String, Object> snapshot() {
        List<String> fams = new ArrayList<>();
        for (Open o : open) {
            fams.add(o.family);
        }
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("open_families", fams);
        m.put("families", new ArrayList<>(families.keySet()));
        return m;
    }
}
