package dev.watcher.daemon;

import dev.watcher.journal.Journal;
import dev.watcher.journal.StateDir;
import dev.watcher.history.RunHistory;
import dev.watcher.model.ChannelSpec;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.Notice;
import dev.watcher.model.PendingEvent;
import dev.watcher.notify.Dispatcher;
import dev.watcher.tail.LogReader;
import dev.watcher.tail.TailOptions;
import io.vertx.core.Vertx;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.concurrent.TimeUnit;

/**
 * {@code replay}: the same pipeline as {@code watch} over finished logs at full speed, into a fresh state
 * directory. Deterministic: the same input gives the same detections in the same order. Sends notices only
 * when asked ({@code --notify}); never stops a job.
 */
public final class Replay {

    private Replay() {
    }

    /** Runs the replay; returns the process exit code. */
    public static int run(DaemonConfig c) throws IOException, StateDir.LockedException {
        try (StateDir state = StateDir.open(c.stateDir(), true);
                // the timeline is made again by replaying again: forced to the disk once, at the end
                Journal journal = Journal.open(c.timelineFile(), c.clock(),
                        c.quiet() ? null : new ConsoleEcho(c.out()), true, false)) {
            Vertx vertx = null;
            Dispatcher dispatcher = null;
            List<ChannelSpec> channels = c.effectiveRules().channels();
            if (c.sendNotices() && !channels.isEmpty()) {
                vertx = Daemon.newVertx(null);
                dispatcher = new Dispatcher(vertx, state.outboxDir(), channels, journal, c.clock());
                Daemon.await(dispatcher.start(), 30);
            }
            Map<String, Object> summary = new LinkedHashMap<>();
            for (RunSpec spec : c.runs()) {
                summary.put(spec.name(), replayOne(spec, c, state, journal, dispatcher));
            }
            if (dispatcher != null) {
                Daemon.await(dispatcher.drain(c.drainBound()), c.drainBound().toSeconds() + 5);
                dispatcher.close();
            }
            if (vertx != null) {
                vertx.close().await(10, TimeUnit.SECONDS);
            }
            if (!c.quiet()) {
                c.out().println("timeline: " + journal.file().toAbsolutePath());
                c.out().println("state:    " + state.dir().toAbsolutePath());
            }
            return 0;
        } catch (java.util.concurrent.TimeoutException e) {
            throw new IOException("notifications did not finish: " + e.getMessage(), e);
        }
    }

    private static Map<String, Object> replayOne(RunSpec spec, DaemonConfig c, StateDir state, Journal journal,
            Dispatcher dispatcher) throws IOException {
        RunHistory history = new RunHistory(spec.name(), state.historyDir());
        RunOutputs out = new RunOutputs() {
            @Override
            public void event(PendingEvent e) {
                journal.append(e);
            }

            @Override
            public void notice(Notice n) {
                if (dispatcher != null) {
                    dispatcher.submit(n);
                }
            }

            @Override
            public void record(IterationRecord r) {
                history.observe(r);
            }
        };
        RunPipeline p = Pipelines.build(spec, c.effectiveRules(), c.overrides(), out, 1_000_000, c.clock());
        // Holds and gathering run on wall time, which a full-speed replay does not give them: the rules keep
        // their state while the log is read, and with --notify what is still open at the end is sent.
        p.decider().setCatchingUp(true);
        journal.append(PendingEvent.run(spec.name(), 0, "started", "replay of " + describe(spec.sources())));
        // reading and parsing on a reader thread, the rest of the pipeline on this one, in the same order
        try (ReadAhead ahead = new ReadAhead(p)) {
            for (int i = 0; i < spec.sources().size(); i++) {
                Path src = spec.sources().get(i);
                if (!Files.isRegularFile(src)) {
                    throw new java.nio.file.NoSuchFileException(src.toString(), null, "no such log file");
                }
                ahead.run(i, h -> LogReader.readAll(src, h, TailOptions.DEFAULTS));
            }
        }
        p.flush();
        if (c.sendNotices()) {
            p.decider().setCatchingUp(false);
            for (Notice n : p.decider().caughtUp()) {
                out.notice(n);
            }
        }
        journal.append(PendingEvent.run(spec.name(), p.lastIter(), "ended", "end of the log (replay)"));
        history.save();
        Map<String, Object> runState = new LinkedHashMap<>();
        runState.put("run", spec.name());
        runState.put("sources", spec.sources().stream().map(x -> x.toAbsolutePath().toString()).toList());
        runState.put("counters", p.counters().toMap());
        runState.put("last_iter", p.lastIter());
        runState.put("snapshot", Daemon.snapshot(p));
        state.saveRun(spec.name(), runState);
        return runState;
    }

    static String describe(List<Path> sources) {
        return String.join(" + ", sources.stream().map(Path::toString).toList());
    }
}
