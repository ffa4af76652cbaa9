package dev.watcher.daemon;

import dev.watcher.history.RunHistory;
import dev.watcher.history.Series;
import dev.watcher.live.LiveSource;
import dev.watcher.live.RunPlots;
import dev.watcher.live.RunStatus;
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
 */
final class LiveBridge implements LiveSource {

    private static final int EVENTS_KEPT = 500;

    private final List<String> order = new ArrayList<>();
    private final Map<String, RunStatus> status = new ConcurrentHashMap<>();
    private final Map<String, RunPlots> plots = new ConcurrentHashMap<>();
    private final Map<String, Deque<TimelineEvent>> events = new ConcurrentHashMap<>();

    LiveBridge(List<RunSpec> runs) {
        for (RunSpec r : runs) {
            order.add(r.name());
            status.put(r.name(), new RunStatus(r.name(), RunStatus.CATCHING_UP, -1, Map.of(), Map.of(), List.of(), 0,
                    0, Map.of()));
            events.put(r.name(), new ArrayDeque<>());
        }
    }

    /** A run's current state; called on the run's thread. */
    void publish(RunStatus s) {
        status.put(s.run(), s);
    }

    /** A run's history as plots; called on the run's thread. */
    void publish(RunHistory h) {
        plots.put(h.run(), new RunPlots(h.lastIter(), traces(h.residuals()), traces(h.monitors())));
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

    /** A status snapshot of a run's pipeline. */
    static RunStatus statusOf(RunPipeline p, String state) {
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
                p.counters().records(), bad);
    }
}
