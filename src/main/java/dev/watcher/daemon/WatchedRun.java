package dev.watcher.daemon;

import dev.watcher.history.RunHistory;
import dev.watcher.journal.Journal;
import dev.watcher.journal.StateDir;
import dev.watcher.model.Detection;
import dev.watcher.model.DetectionState;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.Notice;
import dev.watcher.model.Patterns;
import dev.watcher.model.PendingEvent;
import dev.watcher.model.StopRequest;
import dev.watcher.model.TailPosition;
import dev.watcher.tail.FileFollower;
import dev.watcher.tail.LineHandler;
import dev.watcher.tail.SilenceWatch;
import dev.watcher.tail.TailNotice;
import dev.watcher.tail.TailOptions;
import io.vertx.core.Future;
import io.vertx.core.VerticleBase;
import java.io.IOException;
import java.io.InputStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.security.MessageDigest;
import java.security.NoSuchAlgorithmException;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.HexFormat;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.function.Consumer;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * One watched run: a worker verticle whose timer polls the run's followers, feeds the pipeline, runs the
 * silence watchdog and the rules' timers, and saves the run's state. Everything here runs on the
 * verticle's worker context, one call at a time.
 *
 * <p>Start-up reads each log from its start with notices held back (the history matters; the journal skips
 * the events it already holds when resuming); once every file is caught up, it writes {@code caught-up}
 * and notifies only about conditions still open.
 */
final class WatchedRun extends VerticleBase {

    private static final Logger LOG = LoggerFactory.getLogger(WatchedRun.class);
    private static final int HEAD_BYTES = 4096;

    private final RunSpec spec;
    private final DaemonConfig config;
    private final StateDir state;
    private final Journal journal;
    private final Consumer<Notice> notices;
    private final StopHook stops;
    private final List<Consumer<IterationRecord>> recordListeners;
    private final RunHistory history;
    private final List<FileFollower> followers = new ArrayList<>();
    private RunPipeline pipeline;
    /** Reads and parses ahead on its own thread while the history is re-read (null once caught up). */
    private ReadAhead ahead;
    private SilenceWatch silence;
    private boolean caughtUp;
    private boolean stopped;
    private long timerId = -1;
    private Instant lastSave = Instant.EPOCH;
    private long savedRecords = -1;
    private final LiveBridge live;
    private final String liveUrl;
    private final WallForecast wallForecast = new WallForecast();
    private dev.watcher.live.RunForecast liveForecast = dev.watcher.live.RunForecast.NONE;

    /** What the run tells the action stage. Called on the run's thread. */
    interface StopHook {
        void request(StopRequest r);

        void record(long iter);

        void segment(long iter);

        void converged(boolean converged);

        /** The condition behind a held stop cleared: the stop must not act on it any more. */
        void resolved(String pattern);
    }

    WatchedRun(RunSpec spec, DaemonConfig config, StateDir state, Journal journal, Consumer<Notice> notices,
            StopHook stops, List<Consumer<IterationRecord>> recordListeners, LiveBridge live, String liveUrl) {
        this.live = live;
        this.liveUrl = liveUrl;
        this.spec = spec;
        this.config = config;
        this.state = state;
        this.journal = journal;
        this.notices = notices;
        this.stops = stops;
        this.recordListeners = List.copyOf(recordListeners);
        this.history = new RunHistory(spec.name(), state.historyDir());
    }

    RunSpec spec() {
        return spec;
    }

    /** The run's pipeline (for the live view: counters, last record, detector snapshots); null before start. */
    RunPipeline pipeline() {
        return pipeline;
    }

    RunHistory history() {
        return history;
    }

    @Override
    public Future<?> start() throws Exception {
        String run = spec.name();
        pipeline = Pipelines.build(spec, config.effectiveRules(), config.overrides(), new Outputs(),
                dev.watcher.parse.RecordJoiner.DEFAULT_MAX_PENDING, config.clock());
        pipeline.decider().setCatchingUp(true);
        ahead = new ReadAhead(pipeline);
        if (live != null) {
            live.residualTarget(run, LiveBridge.residualTarget(Pipelines.settings(spec,
                    config.effectiveRules().forRun(run), config.overrides())));
        }
        silence = new SilenceWatch(config.clock(), config.silenceMin(), 20.0);
        Map<String, Object> saved = state.loadRun(run);
        boolean sameFiles = sameFiles(saved);
        boolean resumed = journal.lastSeq(run) > 0;
        if (!sameFiles || config.fromEnd()) {
            journal.forgetHeld(run);
        }
        TailOptions opts = new TailOptions(TailOptions.DEFAULTS.maxLineBytes(), config.pollMin(), config.pollMax());
        for (Path p : spec.sources()) {
            followers.add(new FileFollower(p, null, opts));
        }
        String view = liveUrl == null ? "" : "; live view at " + liveUrl;
        String why = resumed ? (sameFiles ? "resumed: re-reading the log; events already in the timeline are not repeated"
                : "resumed: the log is a new file; reading it from the start") : "watching " + Replay.describe(spec.sources());
        journal.append(PendingEvent.run(run, 0, resumed ? "resumed" : "started", why + view));
        if (config.fromEnd()) {
            for (FileFollower f : followers) {
                f.poll((line, lineNo) -> { }); // skip the history: read to the end, drop the lines
            }
        }
        schedule(0);
        return Future.succeededFuture();
    }

    /**
     * False only when the saved state proves that a log is another file now (its first bytes differ): then
     * what is re-read is new and must be written. Without proof (no state saved yet, a daemon killed before
     * its first save) the files are taken as the same, so nothing is written twice.
     */
    private boolean sameFiles(Map<String, Object> saved) {
        Object heads = saved.get("heads");
        if (!(heads instanceof List<?> list) || list.size() != spec.sources().size()) {
            return true;
        }
        for (int i = 0; i < list.size(); i++) {
            if (!(list.get(i) instanceof Map<?, ?> m)) {
                continue;
            }
            Object len = m.get("length");
            Object hash = m.get("sha256");
            if (!(len instanceof Number n) || hash == null || n.intValue() == 0) {
                continue;
            }
            String now = headHash(spec.sources().get(i), n.intValue());
            if (!hash.toString().equals(now)) {
                return false;
            }
        }
        return true;
    }

    /** A hash of the first {@code len} bytes of the file, or null when it has fewer. */
    static String headHash(Path p, int len) {
        try (InputStream in = Files.newInputStream(p)) {
            byte[] b = in.readNBytes(len);
            if (b.length < len) {
                return null;
            }
            return HexFormat.of().formatHex(MessageDigest.getInstance("SHA-256").digest(b));
        } catch (IOException | NoSuchAlgorithmException e) {
            return null;
        }
    }

    private void schedule(long ms) {
        if (stopped) {
            return;
        }
        timerId = vertx.setTimer(Math.max(1, ms), id -> poll());
    }

    private void poll() {
        if (stopped) {
            return;
        }
        Duration next = config.pollMax();
        try {
            boolean atEnd = pollAll();
            if (atEnd && !caughtUp) {
                caughtUp();
            }
            Optional<Detection> quiet = silence.check();
            quiet.ifPresent(pipeline::external);
            pipeline.tick();
            maybeSave(false);
            publish();
            for (FileFollower f : followers) {
                Duration d = f.nextDelay();
                next = d.compareTo(next) < 0 ? d : next;
            }
        } catch (RuntimeException e) {
            LOG.error("{}: poll failed; going on", spec.name(), e);
        }
        schedule(next.toMillis());
    }

    /**
     * Polls every follower once; true when each has read up to the end of its file as it was. While the
     * history is re-read (up to 16 MiB a poll), a reader thread reads and parses while this one runs the rest
     * of the pipeline; the poll returns only when both are done, so it is still one call at a time.
     */
    private boolean pollAll() {
        boolean atEnd = true;
        for (int i = 0; i < followers.size(); i++) {
            final int source = i;
            FileFollower f = followers.get(i);
            if (ahead != null) {
                try {
                    ahead.run(source, f::poll);
                } catch (IOException e) {
                    throw new java.io.UncheckedIOException(e); // a follower reports file trouble, never throws it
                }
                atEnd &= f.atEnd();
                continue;
            }
            f.poll(new LineHandler() {
                @Override
                public void line(CharSequence line, long lineNo) {
                    pipeline.line(source, line, lineNo);
                }

                @Override
                public void notice(TailNotice n) {
                    Daemon.tailNotice(pipeline, n);
                }
            });
            atEnd &= f.atEnd();
        }
        return atEnd;
    }

    /**
     * The run's job ended: read what the solver wrote last, complete a record still being assembled, and end
     * the run. Runs on the run's context.
     */
    Future<Void> jobEnded(String job) {
        io.vertx.core.Promise<Void> p = io.vertx.core.Promise.promise();
        context.runOnContext(v -> {
            try {
                if (!stopped) {
                    for (int i = 0; i < 1000 && !pollAll(); i++) {
                        // drain what is left, in budgeted bites
                    }
                    pipeline.flush();
                    if (!caughtUp) {
                        caughtUp();
                    }
                    pipeline.tick();
                    end("the watched job " + job + " ended");
                }
                p.complete();
            } catch (RuntimeException e) {
                p.fail(e);
            }
        });
        return p.future();
    }

    private static Duration min(Duration a, Duration b) {
        return a.compareTo(b) <= 0 ? a : b;
    }

    private void caughtUp() {
        caughtUp = true;
        closeReadAhead(); // from here on a poll reads what was just written: little, and on this thread
        journal.append(PendingEvent.run(spec.name(), pipeline.lastIter(), "caught-up",
                "read the history: " + pipeline.counters().lines() + " lines, " + pipeline.counters().records()
                        + " records; now following"));
        pipeline.decider().setCatchingUp(false);
        for (Notice n : pipeline.decider().caughtUp()) {
            notices.accept(n);
        }
        for (StopRequest r : pipeline.decider().openStopRequests()) {
            stops.request(r);
        }
    }

    private void maybeSave(boolean force) {
        Instant now = config.clock().instant();
        long recs = pipeline.counters().records();
        if (!force && (recs == savedRecords || Duration.between(lastSave, now).toMillis() < 2000)) {
            return;
        }
        lastSave = now;
        savedRecords = recs;
        try {
            Map<String, Object> s = new LinkedHashMap<>();
            s.put("run", spec.name());
            s.put("sources", spec.sources().stream().map(x -> x.toAbsolutePath().toString()).toList());
            List<Map<String, Object>> heads = new ArrayList<>();
            List<Map<String, Object>> positions = new ArrayList<>();
            for (int i = 0; i < followers.size(); i++) {
                TailPosition pos = followers.get(i).position();
                Map<String, Object> pm = new LinkedHashMap<>();
                pm.put("file_key", pos.fileKey());
                pm.put("offset", pos.offset());
                pm.put("line", pos.lineNo());
                pm.put("fingerprint", pos.fingerprint());
                positions.add(pm);
                int len = (int) Math.min(HEAD_BYTES, pos.offset());
                Map<String, Object> hm = new LinkedHashMap<>();
                hm.put("length", len);
                hm.put("sha256", headHash(spec.sources().get(i), len));
                heads.add(hm);
            }
            s.put("positions", positions);
            s.put("heads", heads);
            s.put("last_seq", journal.lastSeq(spec.name()));
            s.put("last_iter", pipeline.lastIter());
            s.put("caught_up", caughtUp);
            s.put("counters", pipeline.counters().toMap());
            Map<String, Object> snap = Daemon.snapshot(pipeline);
            s.put("snapshot", snap);
            if (caughtUp) {
                wallForecast.observe(now, pipeline.lastIter());
            }
            Map<String, Object> wall = wallForecast.forecast(snap.get("ConvergedDetector"));
            if (!wall.isEmpty()) {
                s.put("wall_forecast", wall);
            }
            liveForecast = LiveBridge.forecastOf(snap, wall);
            state.saveRun(spec.name(), s);
            history.save();
            if (live != null) {
                live.publish(history);
            }
        } catch (IOException e) {
            LOG.warn("{}: cannot save the run state: {}", spec.name(), e.toString());
        }
    }

    private void closeReadAhead() {
        if (ahead != null) {
            ahead.close();
            ahead = null;
        }
    }

    private void publish() {
        if (live != null) {
            live.publish(LiveBridge.statusOf(pipeline, stopped ? dev.watcher.live.RunStatus.ENDED
                    : caughtUp ? dev.watcher.live.RunStatus.FOLLOWING : dev.watcher.live.RunStatus.CATCHING_UP,
                    liveForecast));
        }
    }

    /** Writes the run's {@code ended} event (unless the caller will) and its final state. */
    void end(String reason) {
        if (stopped) {
            return;
        }
        stopped = true;
        if (timerId >= 0) {
            vertx.cancelTimer(timerId);
        }
        closeReadAhead();
        for (FileFollower f : followers) {
            try {
                f.close();
            } catch (Exception e) {
                LOG.debug("close", e);
            }
        }
        journal.append(PendingEvent.run(spec.name(), pipeline.lastIter(), "ended", reason));
        maybeSave(true);
        publish();
    }

    /** Ends the run on its own context (no poll runs concurrently); completes when the final state is saved. */
    Future<Void> endOnContext(String reason) {
        if (context == null) {
            return Future.succeededFuture();
        }
        io.vertx.core.Promise<Void> p = io.vertx.core.Promise.promise();
        context.runOnContext(v -> {
            try {
                end(reason);
                p.complete();
            } catch (RuntimeException e) {
                p.fail(e);
            }
        });
        return p.future();
    }

    @Override
    public Future<?> stop() {
        end("watcher stopped");
        return Future.succeededFuture();
    }

    private final class Outputs implements RunOutputs {
        @Override
        public void event(PendingEvent e) {
            journal.append(e);
            if (e.type() == dev.watcher.model.EventType.DETECTION && Patterns.CONVERGED.equals(e.pattern())) {
                stops.converged(DetectionState.OPEN.id().equals(e.state()));
            }
            if (e.type() == dev.watcher.model.EventType.DETECTION && DetectionState.RESOLVED.id().equals(e.state())) {
                stops.resolved(e.pattern());
            }
        }

        @Override
        public void notice(Notice n) {
            notices.accept(n);
        }

        @Override
        public void stop(StopRequest r) {
            if (caughtUp) {
                stops.request(r); // while catching up, the rules keep it: asked for again at catch-up if still open
            }
        }

        @Override
        public void record(IterationRecord r) {
            silence.onRecord();
            stops.record(r.iter());
            history.observe(r);
            for (Consumer<IterationRecord> l : recordListeners) {
                l.accept(r);
            }
        }

        @Override
        public void segment(int segment, long iter) {
            stops.segment(iter);
        }
    }
}
