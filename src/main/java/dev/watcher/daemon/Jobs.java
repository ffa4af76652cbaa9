package dev.watcher.daemon;

import dev.watcher.act.JobControl;
import dev.watcher.act.JobRef;
import dev.watcher.act.StopCoordinator;
import dev.watcher.act.StopPolicy;
import dev.watcher.journal.Journal;
import dev.watcher.model.StopRequest;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.concurrent.CompletableFuture;

/**
 * The daemon's side of the action stage: attaches to each run's job once at start, gives each run its
 * stop coordinator, and tells the daemon when every watched job has ended.
 */
final class Jobs implements AutoCloseable {

    private final Map<String, JobControl> controls = new LinkedHashMap<>();
    private final Map<String, StopCoordinator> coordinators = new LinkedHashMap<>();
    private final DaemonConfig config;
    private final Journal journal;

    private Jobs(DaemonConfig config, Journal journal) {
        this.config = config;
        this.journal = journal;
    }

    /** Attaches to every run's job (IllegalStateException when a job cannot be found). */
    static Jobs attach(DaemonConfig config, Journal journal) {
        Jobs j = new Jobs(config, journal);
        for (RunSpec r : config.runs()) {
            String spec = config.jobs().get(r.name());
            JobControl control = spec == null ? null : JobControl.attach(JobRef.parse(spec));
            if (control != null) {
                j.controls.put(r.name(), control);
            }
            StopPolicy policy = config.stopPolicy() == null ? StopPolicy.defaults() : config.stopPolicy();
            if (policy.stopFile() != null && !policy.stopFile().isAbsolute()) {
                // a relative stop file is written into the case directory (the log's folder)
                java.nio.file.Path caseDir = r.sources().get(0).toAbsolutePath().getParent();
                policy = policy.withStopFile(caseDir.resolve(policy.stopFile()));
            }
            j.coordinators.put(r.name(), new StopCoordinator(r.name(), control, config.stop(), policy,
                    config.clock(), journal));
        }
        return j;
    }

    /** The run's hook into its stop coordinator. */
    WatchedRun.StopHook hookFor(String run) {
        StopCoordinator c = coordinators.get(run);
        return new WatchedRun.StopHook() {
            @Override
            public void request(StopRequest r) {
                c.request(r);
            }

            @Override
            public void record(long iter) {
                c.recordSeen(iter);
            }

            @Override
            public void segment(long iter) {
                c.segment(iter);
            }

            @Override
            public void converged(boolean converged) {
                c.converged(converged);
            }

            @Override
            public void resolved(String pattern) {
                c.cleared(pattern);
            }
        };
    }

    /**
     * Calls {@code perRun} with the run's name and job description when that run's job ends, and
     * {@code all} once every attached job has ended (never when no job is attached). When the job ends
     * because the watcher is stopping it, {@code perRun} waits until the stop sequence has recorded its last
     * step (the job's end is what it waits for too), so the timeline has {@code done} before the run ends.
     */
    void onEnd(java.util.function.BiFunction<String, String, CompletableFuture<Void>> perRun, Runnable all) {
        if (controls.isEmpty()) {
            return;
        }
        List<CompletableFuture<Void>> ends = new ArrayList<>();
        controls.forEach((run, c) -> ends.add(c.onEnd()
                .thenCompose(v -> coordinators.get(run).stopSequence()
                        .map(s -> s.exceptionally(t -> null)).orElse(CompletableFuture.completedFuture(null)))
                .thenCompose(v -> perRun.apply(run, c.job().describe()))
                .exceptionally(t -> null)));
        CompletableFuture.allOf(ends.toArray(CompletableFuture[]::new)).thenRun(all);
    }

    @Override
    public void close() {
        coordinators.values().forEach(StopCoordinator::close);
    }
}
