package dev.watcher.detect;

import dev.watcher.detect.stats.RollingWindow;
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
import java.util.Locale;
import java.util.Map;
import java.util.function.Consumer;

/**
 * {@code inner-stall} (unsteady runs): the inner iterations no longer reduce the residuals within a step.
 * Per equation and finished step the drop is log10(peak) - log10(floor) (first minus last inner iteration);
 * over the last {@code steps} steps with at least two inner iterations, an equation stalls when the median
 * drop is below {@code min_drop_decades} while the median floor stays above {@code floor_level} (a step
 * that already ends below that level has nothing left to reduce).
 *
 * <p>Parameters ({@code inner-stall.}): {@code steps} (5), {@code min_drop_decades} (0.5), {@code
 * floor_level} (1e-5, the usual residual target), {@code resolve_drop_decades} (1.0: the median drop must
 * recover to this before the condition resolves), {@code clear_steps} (3), {@code jump_decades} (1.0, for
 * logs without step or inner fields).
 *
 * <p>Cost: nothing per record beyond the step splitting (which {@link Detectors#standard} shares with {@code
 * rising-peaks}); O(steps) per finished step and equation.
 */
final class InnerStallDetector implements Detector {

    private static final String REMEDY = "Inner iterations are not converging each time step: add inner iterations, "
            + "reduce the time step, or lower the relaxation factors of the stalled equations.";

    private final int window;
    private final double minDrop;
    private final double floorLevel;
    private final double resolveDrop;
    private final int clearSteps;
    private final TimeSteps steps;
    private final PerName<Eq> eqs;
    // equations in the order of their first usable step in the segment
    private final List<Eq> ordered = new ArrayList<>();
    private final double[] scratch;
    private List<String> openEquations = List.of();
    private int quiet;
    private int segmentSeen;

    /** One equation's drops (decades) and floors (log10) over the last steps. */
    private final class Eq {
        final String name;
        final RollingWindow drops = new RollingWindow(window);
        final RollingWindow floors = new RollingWindow(window);
        boolean listed;

        Eq(String name) {
            this.name = name;
        }
    }

    InnerStallDetector(DetectSettings s) {
        this(s, null);
    }

    /** With the run's shared step splitter, used when its jump threshold is this detector's. */
    InnerStallDetector(DetectSettings s, TimeSteps shared) {
        String p = Patterns.INNER_STALL + ".";
        this.window = Math.max(2, s.integer(p + "steps", 5));
        this.minDrop = s.number(p + "min_drop_decades", 0.5);
        this.floorLevel = Math.log10(s.number(p + "floor_level", 1e-5));
        this.resolveDrop = s.number(p + "resolve_drop_decades", 1.0);
        this.clearSteps = Math.max(1, s.integer(p + "clear_steps", 3));
        double jump = s.number(p + "jump_decades", 1.0);
        this.steps = shared != null && shared.jumpDecades() == jump ? shared : new TimeSteps(jump);
        this.eqs = new PerName<>(Eq::new);
        this.scratch = new double[window];
    }

    @Override
    public void observe(IterationRecord record, Consumer<Detection> out) {
        if (record.segment() != segmentSeen) {
            segment(record.segment(), record.iter(), out);
        }
        TimeSteps.Step step = steps.accept(record);
        if (step == null || step.records() < 2 || !steps.unsteady()) {
            return;
        }
        Samples peaks = step.peaks();
        Samples floors = step.floors();
        boolean aligned = peaks.names() == floors.names();
        List<Eq> slots = eqs.slots(peaks.names());
        for (int i = 0; i < peaks.size(); i++) {
            double pk = peaks.value(i);
            double fl = aligned ? floors.value(i) : floors.get(peaks.name(i), Double.NaN);
            if (pk > 0 && fl > 0 && pk < Double.POSITIVE_INFINITY && fl < Double.POSITIVE_INFINITY) {
                Eq e = slots.get(i);
                double lf = Math.log10(fl);
                e.drops.add(Math.log10(pk) - lf);
                e.floors.add(lf);
                if (!e.listed) {
                    e.listed = true;
                    ordered.add(e);
                }
            }
        }
        judge(step.lastIter(), out);
    }

    private void judge(long iter, Consumer<Detection> out) {
        List<String> stalled = null;
        List<String> relaxed = null;
        String worst = null;
        double worstDrop = Double.POSITIVE_INFINITY;
        for (Eq e : ordered) {
            if (e.drops.size() < window) {
                continue;
            }
            double md = median(e.drops);
            double mf = median(e.floors);
            if (md < minDrop && mf > floorLevel) {
                if (stalled == null) {
                    stalled = new ArrayList<>();
                }
                stalled.add(e.name);
                if (md < worstDrop) {
                    worstDrop = md;
                    worst = e.name;
                }
            }
            if (md < resolveDrop && mf > floorLevel) {
                if (relaxed == null) {
                    relaxed = new ArrayList<>();
                }
                relaxed.add(e.name);
            }
        }
        if (openEquations.isEmpty()) {
            if (stalled != null) {
                openEquations = List.copyOf(stalled);
                quiet = 0;
                out.accept(new Detection(Patterns.INNER_STALL, DetectionState.OPEN, Severity.WARNING, iter,
                        openEquations, null,
                        String.format(Locale.ROOT,
                                "inner iterations no longer reduce %s within a time step: median drop %.2g decades"
                                        + " over the last %d steps",
                                String.join(", ", openEquations), worstDrop, window),
                        REMEDY, evidence(worst)));
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
            out.accept(new Detection(Patterns.INNER_STALL, DetectionState.RESOLVED, Severity.WARNING, iter,
                    openEquations, null, "inner iterations reduce the residuals again within each step", REMEDY,
                    evidence(openEquations.get(0))));
            openEquations = List.of();
            quiet = 0;
        }
    }

    private Map<String, Object> evidence(String name) {
        Map<String, Object> e = new LinkedHashMap<>();
        Eq q = eqs.get(name);
        e.put("equation", name);
        if (q == null || q.drops.size() == 0) {
            return EvidenceNames.finite(e);
        }
        RollingWindow d = q.drops;
        RollingWindow f = q.floors;
        e.put("median_drop_decades", EvidenceNames.round(median(d)));
        e.put("first_drop_decades", EvidenceNames.round(d.get(0)));
        e.put("last_drop_decades", EvidenceNames.round(d.last()));
        e.put("median_floor", EvidenceNames.round(Math.pow(10, median(f))));
        e.put("floor_rise_decades", EvidenceNames.round(f.last() - f.get(0)));
        e.put("steps", d.size());
        e.put("step_basis", steps.basis());
        return EvidenceNames.finite(e);
    }

    /** The median of a window's values (sorted in a scratch copy). */
    private double median(RollingWindow w) {
        double[] c = scratch;
        int n = w.copyTo(c);
        Arrays.sort(c, 0, n);
        return (n & 1) == 1 ? c[n / 2] : 0.5 * (c[n / 2 - 1] + c[n / 2]);
    }

    @Override
    public void segment(int segment, long iter, Consumer<Detection> out) {
        segmentSeen = segment;
        steps.segment(segment);
        for (Eq e : ordered) {
            e.drops.clear();
            e.floors.clear();
            e.listed = false;
        }
        ordered.clear();
    }

    /** {@code open_equations} and per equation the median drop (decades) over the judged steps. */
    @Override
    public Map<String, Object> snapshot() {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("open_equations", openEquations);
        Map<String, Object> eq = new LinkedHashMap<>();
        for (Eq e : ordered) {
            eq.put(e.name, Map.of("median_drop_decades", median(e.drops)));
        }
        m.put("equations", eq);
        return EvidenceNames.finite(m);
    }
}
