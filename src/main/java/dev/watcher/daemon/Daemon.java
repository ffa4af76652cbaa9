package dev.watcher.daemon;

import dev.watcher.detect.Detector;
import dev.watcher.journal.Journal;
import dev.watcher.journal.StateDir;
import dev.watcher.live.LiveServer;
import dev.watcher.live.WatcherMetrics;
import io.micrometer.prometheusmetrics.PrometheusConfig;
import io.micrometer.prometheusmetrics.PrometheusMeterRegistry;
import dev.watcher.model.ChannelSpec;
import dev.watcher.model.Malformed;
import dev.watcher.model.Notice;
import dev.watcher.model.PendingEvent;
import dev.watcher.model.StopRequest;
import dev.watcher.notify.Dispatcher;
import dev.watcher.tail.TailNotice;
import io.vertx.core.DeploymentOptions;
import io.vertx.core.Future;
import io.vertx.core.ThreadingModel;
import io.vertx.core.Vertx;
import io.vertx.core.VertxOptions;
import io.vertx.core.spi.VertxMetricsFactory;
import java.io.IOException;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.TimeoutException;
import java.util.concurrent.atomic.AtomicReference;
import java.util.function.Consumer;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * {@code watch}: the daemon. Follows each run's logs on its own worker verticle until SIGTERM/SIGINT (then
 * flushes and returns 0) or until the watched job ends.
 */
public final class Daemon {

    private static final Logger LOG = LoggerFactory.getLogger(Daemon.class);

    private final DaemonConfig config;
    private final CountDownLatch done = new CountDownLatch(1);
    private final AtomicReference<String> endReason = new AtomicReference<>("watcher stopped");
    private final List<WatchedRun> runs = new ArrayList<>();

    private boolean endWithJobs = true;

    public Daemon(DaemonConfig config) {
        this.config = config;
    }

    /** Whether the daemon ends when every watched job has ended (default true; the demo's live view keeps it up). */
    public Daemon endWhenJobsEnd(boolean b) {
        this.endWithJobs = b;
        return this;
    }

    /** Asks the daemon to end (as SIGTERM does); safe from any thread. */
    public void shutdown(String reason) {
        endReason.compareAndSet("watcher stopped", reason);
        done.countDown();
    }

    /** Runs until {@link #shutdown} or the watched job ends; returns the exit code. */
    public int run() throws IOException, StateDir.LockedException, InterruptedException {
        try (StateDir state = StateDir.open(config.stateDir(), false);
                Journal journal = Journal.open(config.timelineFile(), config.clock(),
                        config.quiet() ? null : new ConsoleEcho(config.out()), false)) {
            Vertx vertx = newVertx(null);
            try {
                return watch(vertx, state, journal);
            } finally {
                try {
                    vertx.close().await(10, TimeUnit.SECONDS);
                } catch (TimeoutException e) {
                    LOG.warn("the event loop did not close in time");
                }
            }
        }
    }

    private int watch(Vertx vertx, StateDir state, Journal journal) throws InterruptedException, IOException {
        List<ChannelSpec> channels = config.effectiveRules().channels();
        Dispatcher dispatcher = null;
        if (!channels.isEmpty()) {
            dispatcher = new Dispatcher(vertx, state.outboxDir(), channels, journal, config.clock());
            await(dispatcher.start(), 30);
        }
        Jobs jobs = Jobs.attach(config, journal);
        LiveBridge bridge = null;
        LiveServer live = null;
        if (config.http() != null) {
            PrometheusMeterRegistry registry = new PrometheusMeterRegistry(PrometheusConfig.DEFAULT);
            WatcherMetrics.commonTags(registry, hostName());
            bridge = new LiveBridge(config.runs());
            try {
                live = LiveServer.start(vertx, config.http(), bridge, registry, config.httpToken())
                        .await(30, TimeUnit.SECONDS);
            } catch (TimeoutException | RuntimeException e) {
                throw new IllegalArgumentException("--http " + config.http() + ": " + e.getMessage(), e);
            }
            journal.addListener(bridge::onEvent);
            journal.addListener(live::onEvent);
            if (!config.quiet()) {
                config.out().println("live view: " + live.url() + " (metrics: " + live.url() + "metrics)");
            }
        }
        Consumer<Notice> notices = dispatcher == null ? n -> { } : dispatcher::submit;
        for (RunSpec spec : config.runs()) {
            WatchedRun.StopHook hook = jobs.hookFor(spec.name());
            WatchedRun r = new WatchedRun(spec, config, state, journal, notices, hook, List.of(), bridge,
                    live == null ? null : live.url());
            runs.add(r);
            await(vertx.deployVerticle(r, new DeploymentOptions().setThreadingModel(ThreadingModel.WORKER)), 30);
        }
        Map<String, WatchedRun> byName = new LinkedHashMap<>();
        for (WatchedRun r : runs) {
            byName.put(r.spec().name(), r);
        }
        jobs.onEnd((run, job) -> byName.get(run).jobEnded(job).toCompletionStage().toCompletableFuture(), () -> {
            if (endWithJobs) {
                shutdown("every watched job ended");
            }
        });
        if (!config.quiet()) {
            config.out().println("watching " + runs.size() + " run(s); timeline: " + journal.file().toAbsolutePath()
                    + "; stop with Ctrl-C or SIGTERM");
        }
        done.await();
        String reason = endReason.get();
        for (WatchedRun r : runs) {
            // end on the run's own context so no poll runs concurrently
            Future<Void> f = r.endOnContext(reason);
            await(f, 30);
        }
        if (dispatcher != null) {
            await(dispatcher.drain(config.drainBound()), config.drainBound().toSeconds() + 5);
            dispatcher.close();
        }
        jobs.close();
        if (live != null) {
            live.close();
        }
        if (!config.quiet()) {
            config.out().println("ended (" + reason + "); timeline: " + journal.file().toAbsolutePath());
        }
        return 0;
    }

    /** This machine's host name (for metric tags and a default mail sender), or {@code localhost}. */
    public static String hostName() {
        try {
            return java.net.InetAddress.getLocalHost().getHostName();
        } catch (IOException e) {
            return "localhost";
        }
    }

    List<WatchedRun> runs() {
        return runs;
    }

    /** A Vert.x with small pools: a login node may have 128 cores, and the daemon needs few threads. */
    static Vertx newVertx(VertxMetricsFactory metrics) {
        VertxOptions o = new VertxOptions().setEventLoopPoolSize(2).setWorkerPoolSize(4)
                .setInternalBlockingPoolSize(4).setBlockedThreadCheckInterval(10).setBlockedThreadCheckIntervalUnit(
                        TimeUnit.SECONDS);
        var b = Vertx.builder().with(o);
        if (metrics != null) {
            b = b.withMetrics(metrics);
        }
        return b.build();
    }

    /** Waits for a future from a non-Vert.x thread, with a bound; a failure or timeout is logged, not thrown. */
    static <T> T await(Future<T> f, long seconds) {
        try {
            return f.await(seconds, TimeUnit.SECONDS);
        } catch (TimeoutException e) {
            LOG.warn("gave up waiting after {} s", seconds);
            return null;
        } catch (RuntimeException e) {
            LOG.warn("failed: {}", e.toString());
            return null;
        }
    }

    /** A reader's report about the file (truncation, replacement, bad bytes): counted, logged, never fatal. */
    static void tailNotice(RunPipeline p, TailNotice n) {
        switch (n.kind()) {
            case LINE_CUT -> p.malformed(Malformed.TOO_LONG, n.lineNo(), n.detail());
            case BAD_UTF8 -> p.malformed(Malformed.BAD_UTF8, n.lineNo(), n.detail());
            case BINARY -> p.malformed(Malformed.BINARY, n.lineNo(), n.detail());
            case GONE -> p.malformed(Malformed.FILE_GONE, n.lineNo(), n.detail());
            default -> LOG.info("{}: {} at line {}: {}", p.run(), n.kind(), n.lineNo(), n.detail());
        }
    }

    /** The detectors' current forecasts and state, by detector. */
    static Map<String, Object> snapshot(RunPipeline p) {
        Map<String, Object> m = new LinkedHashMap<>();
        for (Detector d : p.detectors()) {
            Map<String, Object> s = d.snapshot();
            if (!s.isEmpty()) {
                m.put(d.getClass().getSimpleName(), s);
            }
        }
        return m;
    }

}
