package dev.watcher.detect;

import dev.watcher.model.Detection;
import dev.watcher.model.DetectionState;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.Patterns;
import dev.watcher.model.Samples;
import dev.watcher.model.Severity;
import java.util.ArrayList;
import java.util.Iterator;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.function.Consumer;

/**
 * {@code non-finite}: a residual or monitor became NaN or infinite (overflow fields such as {@code *******}
 * reach us as +Infinity from the parser). Critical. Fires at the first such value.
 *
 * <p>Residuals that turn non-finite in the same record form one condition (one event naming them all,
 * since a solver usually breaks down in every equation at once); each monitor is its own condition.
 * A condition resolves only when every name in it has shown finite values again for
 * {@code non-finite.resolve_after} consecutive records in which it appears (default 50), e.g. after a
 * restart from a snapshot; otherwise it stays open. Names that are absent from a record are not judged.
 */
final class NonFiniteDetector implements Detector {

    static final String RESOLVE_AFTER = Patterns.NON_FINITE + ".resolve_after";

    private final int resolveAfter;
    private final PerName<Series> residuals = new PerName<>(Series::new);
    private final PerName<Series> monitors = new PerName<>(Series::new);
    private final List<Group> open = new ArrayList<>();
    private long records;

    NonFiniteDetector(DetectSettings settings) {
        resolveAfter = Math.max(1, settings.integer(RESOLVE_AFTER, 50));
    }

    private static final class Series {
        final String name;
        boolean bad;
        int finiteRun;
        double lastFinite = Double.NaN;

        Series(String name) {
            this.name = name;
        }
    }

    private record Group(List<Series> members, boolean monitor) {
    }

    @Override
    public void observe(IterationRecord r, Consumer<Detection> out) {
        records++;
        List<Series> fresh = scan(r.residuals(), residuals);
        if (!fresh.isEmpty()) {
            open(r, fresh, false, out);
        }
        List<Series> freshMonitors = scan(r.monitors(), monitors);
        for (Series s : freshMonitors) {
            open(r, List.of(s), true, out);
        }
        if (!open.isEmpty()) {
            for (Iterator<Group> it = open.iterator(); it.hasNext();) {
                Group g = it.next();
                boolean cleared = true;
                for (Series s : g.members) {
                    cleared &= !s.bad && s.finiteRun >= resolveAfter;
                }
                if (cleared) {
                    it.remove();
                    resolve(r, g, out);
                }
            }
        }
    }

    /** Updates the states; returns the series that just turned non-finite while not already in a condition. */
    private List<Series> scan(Samples samples, PerName<Series> states) {
        List<Series> fresh = List.of();
        double[] v = samples.values();
        List<Series> slots = states.slots(samples.names());
        for (int i = 0; i < v.length; i++) {
            double x = v[i];
            Series s = slots.get(i);
            if (Double.isFinite(x)) {
                s.lastFinite = x;
                if (s.bad) {
                    s.bad = false;
                    s.finiteRun = 0;
                }
                if (s.finiteRun < Integer.MAX_VALUE) {
                    s.finiteRun++;
                }
                continue;
            }
            s.finiteRun = 0;
            if (!s.bad && !inOpenGroup(s)) {
                if (fresh.isEmpty()) {
                    fresh = new ArrayList<>();
                }
                fresh.add(s);
            }
            s.bad = true;
        }
        return fresh;
    }

    private boolean inOpenGroup(Series s) {
        for (Group g : open) {
            if (g.members.contains(s)) {
                return true;
            }
        }
        return false;
    }

    private void open(IterationRecord r, List<Series> members, boolean monitor, Consumer<Detection> out) {
        Group g = new Group(List.copyOf(members), monitor);
        open.add(g);
        Map<String, Object> ev = new LinkedHashMap<>();
        Series first = members.get(0);
        double bad = monitor ? r.monitors().get(first.name, Double.NaN) : r.residuals().get(first.name, Double.NaN);
        ev.put("value", Double.isNaN(bad) ? "NaN" : bad > 0 ? "Infinity" : "-Infinity");
        ev.put("count", members.size());
        if (Double.isFinite(first.lastFinite)) {
            ev.put("last_finite", Log10.round(first.lastFinite));
        }
        ev.put("records_seen", records);
        String what = monitor ? "monitor " + first.name : names(members) + (members.size() == 1 ? " residual"
                : " residuals");
        String summary = what + " became " + ev.get("value") + " at iteration " + r.iter()
                + ": the solution has broken down";
        String remedy = "Stop the run and restart from the last good snapshot with lower relaxation factors or a"
                + " smaller time step; look for the equation that rose first before the breakdown.";
        out.accept(new Detection(Patterns.NON_FINITE, DetectionState.OPEN, Severity.CRITICAL, r.iter(),
                monitor ? List.of() : names(members, true), monitor ? first.name : null, summary, remedy, ev));
    }

    private void resolve(IterationRecord r, Group g, Consumer<Detection> out) {
        Map<String, Object> ev = new LinkedHashMap<>();
        ev.put("finite_records", resolveAfter);
        String what = g.monitor ? "monitor " + g.members.get(0).name : names(g.members);
        out.accept(new Detection(Patterns.NON_FINITE, DetectionState.RESOLVED, Severity.CRITICAL, r.iter(),
                g.monitor ? List.of() : names(g.members, true), g.monitor ? g.members.get(0).name : null,
                what + " finite again for " + resolveAfter + " records", "", ev));
    }

    private static List<String> names(List<Series> members, boolean asList) {
        List<String> n = new ArrayList<>(members.size());
        for (Series s : members) {
            n.add(s.name);
        }
        return n;
    }

    private static String names(List<Series> members) {
        return String.join(", ", names(members, true));
    }

    @Override
    public Map<String, Object> snapshot() {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("open_conditions", open.size());
        return m;
    }
}
