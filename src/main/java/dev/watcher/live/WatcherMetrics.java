package dev.watcher.live;

import dev.watcher.model.EventType;
import dev.watcher.model.Malformed;
import dev.watcher.model.Patterns;
import dev.watcher.model.TimelineEvent;
import io.micrometer.core.instrument.Counter;
import io.micrometer.core.instrument.FunctionCounter;
import io.micrometer.core.instrument.Gauge;
import io.micrometer.core.instrument.MeterRegistry;
import io.micrometer.core.instrument.Tags;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Objects;
import java.util.Set;
import java.util.concurrent.atomic.AtomicLong;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The watcher's meters in a Micrometer {@link MeterRegistry}, read from a {@link LiveSource} and from the
 * timeline. Names are lowercase and dotted (Micrometer's convention; Prometheus writes them in snake case
 * and adds {@code _total} to counters). Tags come from small bounded sets: run names, equation and monitor
 * names (capped per run), pattern ids, channel names and the timeline's closed state sets; never an
 * iteration number or a path.
 *
 * <table>
 * <caption>Meters</caption>
 * <tr><th>name</th><th>type</th><th>tags</th></tr>
 * <tr><td>watcher.residual</td><td>gauge</td><td>run, equation</td></tr>
 * <tr><td>watcher.monitor</td><td>gauge</td><td>run, monitor</td></tr>
 * <tr><td>watcher.iteration</td><td>gauge</td><td>run</td></tr>
 * <tr><td>watcher.conditions.open</td><td>gauge</td><td>run</td></tr>
 * <tr><td>watcher.series.dropped</td><td>gauge</td><td>run (residuals and monitors over the cap)</td></tr>
 * <tr><td>watcher.lines</td><td>counter</td><td>run</td></tr>
 * <tr><td>watcher.records</td><td>counter</td><td>run</td></tr>
 * <tr><td>watcher.malformed.lines</td><td>counter</td><td>run, kind</td></tr>
 * <tr><td>watcher.detections</td><td>counter</td><td>run, pattern (opened conditions)</td></tr>
 * <tr><td>watcher.notices</td><td>counter</td><td>run, channel, outcome</td></tr>
 * <tr><td>watcher.actions</td><td>counter</td><td>run, outcome</td></tr>
 * </table>
 *
 * <p>Common tags (the host) must be set on the registry before its first meter registers: call
 * {@link #commonTags} right after creating the registry, before it is given to Vert.x.
 *
 * <p>Thread-safe: {@link #refresh()} (the live server calls it on its timer and before each scrape) and
 * {@link #onEvent} (the journal's listener, on the appending thread) may run on any thread.
 */
public final class WatcherMetrics {

    /** Default cap on residual plus monitor series per run. */
    public static final int DEFAULT_SERIES_CAP = 64;

    private static final Logger LOG = LoggerFactory.getLogger(WatcherMetrics.class);
    private static final Set<String> NOTICE_STATES = Set.of("queued", "sent", "failed", "gave-up");
    private static final Set<String> ACTION_STATES = Set.of("would-stop", "requested", "signalled", "done",
            "refused", "failed");
    private static final String OTHER = "other";

    private final LiveSource source;
    private final MeterRegistry registry;
    private final int seriesCap;
    private final Map<String, RunMeters> runs = new HashMap<>();

    /**
     * Binds the meters of {@code source} into {@code registry}; meters appear as runs, equations and
     * monitors appear (at each {@link #refresh()}).
     *
     * @param seriesCap most residual plus monitor gauges per run; the rest are counted in
     *                  {@code watcher.series.dropped} and named once in the log
     */
    public WatcherMetrics(LiveSource source, MeterRegistry registry, int seriesCap) {
        this.source = Objects.requireNonNull(source, "source");
        this.registry = Objects.requireNonNull(registry, "registry");
        if (seriesCap < 1) {
            throw new IllegalArgumentException("series cap must be at least 1");
        }
        this.seriesCap = seriesCap;
    }

    /** Sets the {@code host} common tag; call before the registry's first meter registers. */
    public static void commonTags(MeterRegistry registry, String host) {
        registry.config().commonTags("host", host);
    }

    /** Reads the source and updates (and where new, registers) every meter. */
    public void refresh() {
        refresh(source.runs());
    }

    /** As {@link #refresh()}, with runs already read. */
    synchronized void refresh(List<RunStatus> statuses) {
        for (RunStatus s : statuses) {
            run(s.run()).update(s);
        }
    }

    /** Counts a timeline event: opened detections, notice outcomes, action outcomes. Never throws. */
    public synchronized void onEvent(TimelineEvent e) {
        if (e == null || e.type() == null || e.run() == null) {
            return;
        }
        RunMeters m = run(e.run());
        String state = e.state() == null ? "" : e.state();
        if (e.type() == EventType.DETECTION && "open".equals(state)) {
            String p = e.pattern();
            m.counter("watcher.detections", "Conditions opened, by pattern",
                    Tags.of("pattern", p != null && Patterns.isKnown(p) ? p : OTHER)).increment();
        } else if (e.type() == EventType.NOTICE) {
            Object ch = e.fields().get("channel");
            String channel = ch == null ? "unknown" : ch.toString();
            m.counter("watcher.notices", "Notice delivery outcomes, by channel",
                    Tags.of("channel", channel, "outcome", NOTICE_STATES.contains(state) ? state : OTHER))
                    .increment();
        } else if (e.type() == EventType.ACTION) {
            m.counter("watcher.actions", "Stop action outcomes",
                    Tags.of("outcome", ACTION_STATES.contains(state) ? state : OTHER)).increment();
        }
    }

    /** Residual and monitor series of {@code run} left out because of the cap (0 for an unknown run). */
    public synchronized int dropped(String run) {
        RunMeters m = runs.get(run);
        return m == null ? 0 : m.dropped.size();
    }

    private RunMeters run(String name) {
        return runs.computeIfAbsent(name, RunMeters::new);
    }

    /** A value a gauge reads: held strongly here so the gauge never reads NaN by collection. */
    private static final class Value {
        volatile double v = Double.NaN;
    }

    private final class RunMeters {
        final String run;
        final Tags tags;
        final Map<String, Value> residuals = new HashMap<>();
        final Map<String, Value> monitors = new HashMap<>();
        final java.util.Set<String> dropped = new java.util.HashSet<>();
        final Map<String, AtomicLong> malformed = new HashMap<>();
        final Map<String, Counter> counters = new HashMap<>();
        final AtomicLong lines = new AtomicLong();
        final AtomicLong records = new AtomicLong();
        final Value iteration = new Value();
        final Value open = new Value();
        boolean warned;

        RunMeters(String run) {
            this.run = run;
            this.tags = Tags.of("run", run);
            Gauge.builder("watcher.iteration", iteration, v -> v.v).tags(tags)
                    .description("Iteration of the run's last record").register(registry);
            Gauge.builder("watcher.conditions.open", open, v -> v.v).tags(tags)
                    .description("Conditions open now").register(registry);
            Gauge.builder("watcher.series.dropped", dropped, java.util.Set::size).tags(tags)
                    .description("Residual and monitor series not exported because of the per-run cap")
                    .register(registry);
            FunctionCounter.builder("watcher.lines", lines, AtomicLong::get).tags(tags)
                    .description("Log lines read").register(registry);
            FunctionCounter.builder("watcher.records", records, AtomicLong::get).tags(tags)
                    .description("Iteration records assembled").register(registry);
            for (Malformed k : Malformed.values()) {
                malformedCounter(k.id());
            }
        }

        AtomicLong malformedCounter(String kind) {
            return malformed.computeIfAbsent(kind, k -> {
                AtomicLong a = new AtomicLong();
                FunctionCounter.builder("watcher.malformed.lines", a, AtomicLong::get).tags(tags.and("kind", k))
                        .description("Malformed log lines, counted and skipped, by kind").register(registry);
                return a;
            });
        }

        Counter counter(String name, String description, Tags extra) {
            String key = name + extra;
            return counters.computeIfAbsent(key, k -> Counter.builder(name).tags(tags.and(extra))
                    .description(description).register(registry));
        }

        void update(RunStatus s) {
            iteration.v = s.lastIter();
            open.v = s.openConditions().size();
            lines.set(s.lines());
            records.set(s.records());
            s.malformed().forEach((kind, n) -> {
                // unknown kinds share one bounded tag value
                AtomicLong a = malformed.containsKey(kind) ? malformed.get(kind) : malformedCounter(OTHER);
                if (malformed.containsKey(kind)) {
                    a.set(n);
                } else {
                    a.accumulateAndGet(n, Math::max);
                }
            });
            s.residuals().forEach((eq, v) -> gauge(residuals, "watcher.residual", "equation",
                    "Latest residual of an equation", eq).v = v);
            s.monitors().forEach((mon, v) -> gauge(monitors, "watcher.monitor", "monitor",
                    "Latest value of a monitor", mon).v = v);
        }

        private Value gauge(Map<String, Value> group, String name, String tag, String description, String key) {
            Value held = group.get(key);
            if (held != null) {
                return held;
            }
            if (residuals.size() + monitors.size() >= seriesCap) {
                if (dropped.add(tag + ":" + key) && !warned) {
                    warned = true;
                    LOG.warn("run {}: more than {} residual and monitor series; {} {} and any further series are"
                            + " left out of the metrics and counted in watcher.series.dropped", run, seriesCap,
                            tag, key);
                }
                return new Value(); // updated and forgotten
            }
            Value v = new Value();
            Gauge.builder(name, v, x -> x.v).tags(tags.and(tag, key)).description(description).register(registry);
            group.put(key, v);
            return v;
        }
    }
}
