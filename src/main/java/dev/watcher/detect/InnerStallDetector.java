package dev.watcher.detect;

import dev.watcher.detect.stats.RollingWindow;
import dev.watcher.model.Detection;
import dev.watcher.model.DetectionState;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.Patterns;
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
    private final Map<String, RollingWindow> drops = new LinkedHashMap<>();
    private final Map<String, RollingWindow> floors = new LinkedHashMap<>();
    private List<String> openEquations = List.of();
    private int quiet;
    private int segmentSeen;

    InnerStallDetector(DetectSettings s) {
        String p = Patterns.INNER_STALL + ".";
        this.window = Math.max(2, s.integer(p + "steps", 5));
        this.minDrop = s.number(p + "min_drop_decades", 0.5);
        this.floorLevel = Math.log10(s.number(p + "floor_level", 1e-5));
        this.resolveDrop = s.number(p + "resolve_drop_decades", 1.0);
        this.clearSteps = Math.max(1, s.integer(p + "clear_steps", 3));
        this.steps = new TimeSteps(s.number(p + "jump_decades", 1.0));
    }

    @Override
    public void observe(IterationRecord record, Consumer<Detection> out) {
        if (record.segment() != segmentSeen) {
            segment(record.segment(), record.iter(), out);
        }
        TimeSteps.Step step = steps.accept(record);
        if (step == null || !steps.unsteady() || step.records() < 2) {
            return;
        }
        step.peak().forEach((eq, pk) -> {
            Double fl = step.floor().get(eq);
            if (fl != null && pk > 0 && fl > 0 && Double.isFinite(pk) && Double.isFinite(fl)) {
                drops.computeIfAbsent(eq, k -> new RollingWindow(window)).add(Math.log10(pk) - Math.log10(fl));
                floors.computeIfAbsent(eq, k -> new RollingWindow(window)).add(Math.log10(fl));
            }
        });
        judge(step.lastIter(), out);
    }

    private void judge(long iter, Consumer<Detection> out) {
        List<String> stalled = new ArrayList<>();
        List<String> relaxed = new ArrayList<>();
        String worst = null;
        double worstDrop = Double.POSITIVE_INFINITY;
        for (String eq : drops.keySet()) {
            RollingWindow d = drops.get(eq);
            if (d.size() < window) {
                continue;
            }
            double md = median(d.toArray());
            double mf = median(floors.get(eq).toArray());
            if (md < minDrop && mf > floorLevel) {
                stalled.add(eq);
                if (md < worstDrop) {
                    worstDrop = md;
                    worst = eq;
                }
            }
            if (md < resolveDrop && mf > floorLevel) {
                relaxed.add(eq);
            }
        }
        if (openEquations.isEmpty()) {
            if (!stalled.isEmpty()) {
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
        for (String eq : openEquations) {
            still |= relaxed.contains(eq);
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

    private Map<String, Object> evidence(String eq) {
        Map<String, Object> e = new LinkedHashMap<>();
        RollingWindow d = drops.get(eq);
        RollingWindow f = floors.get(eq);
        e.put("equation", eq);
        if (d == null || d.size() == 0) {
            return EvidenceNames.finite(e);
        }
        e.put("median_drop_decades", EvidenceNames.round(median(d.toArray())));
        e.put("first_drop_decades", EvidenceNames.round(d.get(0)));
        e.put("last_drop_decades", EvidenceNames.round(d.last()));
        e.put("median_floor", EvidenceNames.round(Math.pow(10, median(f.toArray()))));
        e.put("floor_rise_decades", EvidenceNames.round(f.last() - f.get(0)));
        e.put("steps", d.size());
        e.put("step_basis", steps.basis());
        return EvidenceNames.finite(e);
    }

    private static double median(double[] v) {
        double[] c = v.clone();
        Arrays.sort(c);
        int n = c.length;
        return (n & 1) == 1 ? c[n / 2] : 0.5 * (c[n / 2 - 1] + c[n / 2]);
    }

    @Override
    public void segment(int segment, long iter, Consumer<Detection> out) {
        segmentSeen = segment;
        steps.reset();
        drops.clear();
        floors.clear();
    }

    /** {@code open_equations} and per equation the median drop (decades) over the judged steps. */
    @Override
    public Map<String, Object> snapshot() {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("open_equations", openEquations);
        Map<String, Object> eq = new LinkedHashMap<>();
        drops.forEach((k, d) -> eq.put(k, Map.of("median_drop_decades", median(d.toArray()))));
        m.put("equations", eq);
        return EvidenceNames.finite(m);
    }
}
