package dev.watcher.daemon;

import dev.watcher.detect.DetectSettings;
import dev.watcher.detect.Detectors;
import dev.watcher.history.RunHistory;
import dev.watcher.history.Series;
import dev.watcher.live.LiveSource;
import dev.watcher.live.RunForecast;
import dev.watcher.live.RunPlots;
import dev.watcher.live.RunStatus;
import dev.watcher.model.Patterns;
import dev.watcher.model.TimelineEvent;
import java.util.ArrayDeque;
import java.util.ArrayList;
import java.util.Deque;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.concurrent.ConcurrentHashMap;

/**
 * The daemon's answer to the live view: each run publishes a status snapshot and a plots snapshot from its
 * own thread (after a poll, after a save); the live view reads the latest published ones from any thread.
 * The last events of each run are kept from the journal's listener, bounded.
 *
 * <p>Forecasts reach the live view as plain data ({@link RunForecast}): the run converts its detectors'
 * snapshots and its {@link WallForecast} at each save, the same maps it writes to the run state file
 * ({@link #forecastOf}), so the page and the report read one forecast.
 */
final class LiveBridge implements LiveSource {

    private static final int EVENTS_KEPT = 500;

    private final List<String> order = new ArrayList<>();
    private final Map<String, RunStatus> status = new ConcurrentHashMap<>();
    private final Map<String, RunPlots> plots = new ConcurrentHashMap<>();
    private final Map<String, Deque<TimelineEvent>> events = new ConcurrentHashMap<>();
    private final Map<String, Double> targets = new ConcurrentHashMap<>();

    LiveBridge(List<RunSpec> runs) {
        for (RunSpec r : runs) {
            order.add(r.name());
            status.put(r.name(), new RunStatus(r.name(), RunStatus.CATCHING_UP, -1, Map.of(), Map.of(), List.of(), 0,
                    0, Map.of(), RunForecast.NONE));
            events.put(r.name(), new ArrayDeque<>());
        }
    }

    /** A run's current state; called on the run's thread. */
    void publish(RunStatus s) {
        status.put(s.run(), s);
    }

    /**
     * The residual target a run's plot draws its level line at ({@link #residualTarget(DetectSettings)});
     * called once when the run starts, before its first history is published.
     */
    void residualTarget(String run, double target) {
        targets.put(run, target);
    }

    /** A run's history as plots; called on the run's thread. */
    void publish(RunHistory h) {
        plots.put(h.run(), new RunPlots(h.lastIter(), traces(h.residuals()), traces(h.monitors()),
                RunPlots.residualLevels(targets.getOrDefault(h.run(), Double.NaN))));
    }

    /**
     * The absolute residual target in force for a run's detectors ({@code converged.residual_target}, as the
     * user set it or its default), or NaN when the targets are relative ({@code converged.drop_orders} set):
     * then each equation's target depends on its own maximum and no one line stands for them. The standard
     * detectors are built once over {@code settings} so that the value is the one the detector reads, its
     * default included.
     */
    static double residualTarget(DetectSettings settings) {
        Detectors.standard(settings);
        Map<String, String> used = settings.used();
        double drop = number(used.get(Patterns.CONVERGED + ".drop_orders"));
        if (drop > 0) {
            return Double.NaN;
        }
        return number(used.get(Patterns.CONVERGED + ".residual_target"));
    }

    private static double number(String s) {
        if (s == null) {
            return Double.NaN;
        }
        try {
            return Double.parseDouble(s);
        } catch (NumberFormatException e) {
            return Double.NaN;
        }
    }

    private static List<RunPlots.Trace> traces(Map<String, Series> group) {
        List<RunPlots.Trace> out = new ArrayList<>();
        group.forEach((name, s) -> {
            int n = s.size();
            long[] x = new long[n];
            double[] mn = new double[n];
            double[] mx = new double[n];
            double[] la = new double[n];
            for (int i = 0; i < n; i++) {
                x[i] = s.x1(i);
                mn[i] = s.min(i);
                mx[i] = s.max(i);
                la[i] = s.last(i);
            }
            out.add(new RunPlots.Trace(name, x, mn, mx, la));
        });
        return out;
    }

    /** The journal's listener: keeps each run's last events. Any thread. */
    void onEvent(TimelineEvent e) {
        Deque<TimelineEvent> d = events.get(e.run());
        if (d == null) {
            return;
        }
        synchronized (d) {
            d.addLast(e);
            while (d.size() > EVENTS_KEPT) {
                d.removeFirst();
            }
        }
    }

    @Override
    public List<RunStatus> runs() {
        List<RunStatus> out = new ArrayList<>(order.size());
        for (String r : order) {
            out.add(status.get(r));
        }
        return out;
    }

    @Override
    public List<TimelineEvent> recentEvents(String run, int max) {
        Deque<TimelineEvent> d = events.get(run);
        if (d == null) {
            return List.of();
        }
        synchronized (d) {
            List<TimelineEvent> all = new ArrayList<>(d);
            return List.copyOf(all.subList(Math.max(0, all.size() - max), all.size()));
        }
    }

    @Override
    public Optional<RunPlots> plots(String run) {
        return Optional.ofNullable(plots.get(run));
    }

    /**
     * The forecasts for the live view from what a save writes to the run state file: {@code snapshot} as
     * {@link Daemon#snapshot} gives it (by detector class name) and {@code wall} as
     * {@link WallForecast#forecast} gives it (empty while the rate is not known). Nothing is recomputed.
     *
     * <p>Equations come from the {@code converged} judge's {@code equations} (status, target, iterations with
     * their interval) joined with the wall forecast's seconds of the same equation. Monitors come from the
     * {@code monitor-settled} judgement, then the {@code converged} judge's own (which also knows periodic
     * monitors) where it has one, as the report merges them.
     */
    static RunForecast forecastOf(Map<String, Object> snapshot, Map<String, Object> wall) {
        Map<?, ?> conv = map(snapshot.get("ConvergedDetector"));
        Map<?, ?> wallEqs = map(wall.get("equations"));
        List<RunForecast.Equation> eqs = new ArrayList<>();
        map(conv.get("equations")).forEach((name, v) -> {
            Map<?, ?> f = map(v);
            Map<?, ?> w = map(wallEqs.get(name));
            Object status = f.get("forecast");
            eqs.add(new RunForecast.Equation(name.toString(), status == null ? RunForecast.UNKNOWN
                    : status.toString(), num(f.get("target")), num(f.get("iterations")), num(f.get("iterations_low")),
                    num(f.get("iterations_high")), num(w.get("seconds")), num(w.get("seconds_low")),
                    num(w.get("seconds_high"))));
        });
        Map<String, Map<?, ?>> byMonitor = new LinkedHashMap<>();
        map(map(snapshot.get("MonitorSettledDetector")).get("monitors"))
                .forEach((k, v) -> byMonitor.put(k.toString(), map(v)));
        map(conv.get("monitors")).forEach((k, v) -> byMonitor.put(k.toString(), map(v)));
        List<RunForecast.Monitor> mons = new ArrayList<>();
        byMonitor.forEach((name, m) -> mons.add(new RunForecast.Monitor(name,
                m.get("state") == null ? "" : m.get("state").toString(),
                num(m.containsKey("value") ? m.get("value") : m.get("mean")), num(m.get("predicted_final")),
                num(m.get("remaining_error")))));
        List<String> waiting = new ArrayList<>();
        if (conv.get("waiting_for") instanceof List<?> l) {
            l.forEach(x -> waiting.add(String.valueOf(x)));
        }
        Object verdict = conv.get("verdict");
        return new RunForecast(num(wall.get("iterations_per_second")), num(wall.get("rate_seconds")),
                verdict == null ? "" : verdict.toString(), waiting, eqs, mons);
    }

    private static Map<?, ?> map(Object o) {
        return o instanceof Map<?, ?> m ? m : Map.of();
    }

    private static double num(Object o) {
        return o instanceof Number n ? n.doubleValue() : Double.NaN;
    }

    /** A status snapshot of a run's pipeline with the forecasts of its last save. */
    static RunStatus statusOf(RunPipeline p, String state, RunForecast forecast) {
        Map<String, Double> res = new LinkedHashMap<>();
        Map<String, Double> mon = new LinkedHashMap<>();
        var last = p.last();
        if (last != null) {
            for (int i = 0; i < last.residuals().size(); i++) {
                res.put(last.residuals().name(i), last.residuals().value(i));
            }
            for (int i = 0; i < last.monitors().size(); i++) {
                mon.put(last.monitors().name(i), last.monitors().value(i));
            }
        }
        Map<String, Long> bad = new LinkedHashMap<>();
        for (dev.watcher.model.Malformed m : dev.watcher.model.Malformed.values()) {
            long n = p.counters().malformed(m);
            if (n > 0) {
                bad.put(m.id(), n);
            }
        }
        List<String> open = new ArrayList<>();
        for (String c : p.decider().openConditions()) {
            int bar = c.indexOf('|');
            String pattern = bar < 0 ? c : c.substring(0, bar);
            if (!open.contains(pattern)) {
                open.add(pattern);
            }
        }
        return new RunStatus(p.run(), state, last == null ? -1 : last.iter(), res, mon, open, p.counters().lines(),
                p.counters().records(), bad, forecast);
    }
}
