package dev.watcher.live;

import dev.watcher.history.RunHistory;
import dev.watcher.history.Series;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.Malformed;
import dev.watcher.model.TimelineEvent;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;

/**
 * A {@link LiveSource} fed by hand the way the daemon feeds its own: records as a parser hands them over
 * (kept in the real bounded {@link RunHistory}), lines read, malformed lines, open conditions, timeline
 * events, the forecasts of the last save and the residual target. Thread-safe by one lock, like the daemon's per-run snapshot.
 */
final class RecordedRuns implements LiveSource {

    private final Map<String, Run> runs = new LinkedHashMap<>();

    private static final class Run {
        final RunHistory history;
        String state = RunStatus.CATCHING_UP;
        IterationRecord last;
        long lines;
        long records;
        final Map<String, Long> malformed = new LinkedHashMap<>();
        final List<String> open = new ArrayList<>();
        final List<TimelineEvent> events = new ArrayList<>();
        RunForecast forecast = RunForecast.NONE;
        double target = Double.NaN;

        Run(String name) {
            history = new RunHistory(name, Path.of("unused"));
        }
    }

    private Run run(String name) {
        return runs.computeIfAbsent(name, Run::new);
    }

    /** One record read from {@code linesUsed} log lines. */
    synchronized void record(String name, IterationRecord r, long linesUsed) {
        Run run = run(name);
        run.history.observe(r);
        run.last = r;
        run.records++;
        run.lines += linesUsed;
    }

    synchronized void malformed(String name, Malformed kind) {
        Run run = run(name);
        run.lines++;
        run.malformed.merge(kind.id(), 1L, Long::sum);
    }

    synchronized void state(String name, String state) {
        run(name).state = state;
    }

    synchronized void open(String name, String pattern) {
        run(name).open.add(pattern);
    }

    /** The forecasts of the run's latest save, as the daemon hands them over. */
    synchronized void forecast(String name, RunForecast f) {
        run(name).forecast = f;
    }

    /** The residual target the run's plot draws its level line at. */
    synchronized void residualTarget(String name, double target) {
        run(name).target = target;
    }

    synchronized void event(TimelineEvent e) {
        run(e.run()).events.add(e);
    }

    @Override
    public synchronized List<RunStatus> runs() {
        List<RunStatus> out = new ArrayList<>();
        runs.forEach((name, r) -> out.add(new RunStatus(name, r.state, r.last == null ? -1 : r.last.iter(),
                r.last == null ? Map.of() : r.last.residuals().toMap(),
                r.last == null ? Map.of() : r.last.monitors().toMap(), r.open, r.lines, r.records, r.malformed,
                r.forecast)));
        return out;
    }

    @Override
    public synchronized List<TimelineEvent> recentEvents(String name, int max) {
        Run r = runs.get(name);
        if (r == null) {
            return List.of();
        }
        return List.copyOf(r.events.subList(Math.max(0, r.events.size() - max), r.events.size()));
    }

    @Override
    public synchronized Optional<RunPlots> plots(String name) {
        Run r = runs.get(name);
        if (r == null) {
            return Optional.empty();
        }
        return Optional.of(new RunPlots(r.history.lastIter(), traces(r.history.residuals()),
                traces(r.history.monitors()), RunPlots.residualLevels(r.target)));
    }

    /** The conversion the daemon makes from its history: one point per bucket at the bucket's last iteration. */
    static List<RunPlots.Trace> traces(Map<String, Series> group) {
        List<RunPlots.Trace> out = new ArrayList<>();
        group.forEach((name, s) -> {
            int n = s.size();
            long[] x = new long[n];
            double[] min = new double[n];
            double[] max = new double[n];
            double[] last = new double[n];
            for (int i = 0; i < n; i++) {
                x[i] = s.x1(i);
                min[i] = s.min(i);
                max[i] = s.max(i);
                last[i] = s.last(i);
            }
            out.add(new RunPlots.Trace(name, x, min, max, last));
        });
        return out;
    }
}
