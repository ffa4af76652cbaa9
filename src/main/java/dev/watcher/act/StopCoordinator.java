package dev.watcher.act;

import dev.watcher.model.EventSink;
import dev.watcher.model.EventType;
import dev.watcher.model.PendingEvent;
import dev.watcher.model.Severity;
import dev.watcher.model.StopGate;
import dev.watcher.model.StopRequest;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.Set;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Decides, for one run, whether and when the rules' {@link StopRequest}s act on the run's job, and carries
 * out the one stop sequence a run may have. Every step is an {@code action} event in the timeline:
 * {@code would-stop} (not armed), {@code requested}, {@code signalled}, {@code done}, {@code refused} (with
 * the reason), {@code failed} (with the error).
 *
 * <p>Gates (from each request's {@link StopGate}): the condition persisted for {@code persistRecords}
 * records and {@code persistFor} of clock time since its first request; the run (the job's start when the
 * scheduler or the process tells it, else the time this coordinator was made) is at least
 * {@code minRunAge} old; {@code afterSegment} has passed since the last new segment. A request that does
 * not pass yet is held and looked at again on every record; the first time it is held, one
 * {@code refused} event with {@code pending: true} says why. A held request is dropped when its condition
 * resolves ({@link #cleared}) and when a new segment starts (the persistence count starts again). At most one stop sequence (or one {@code would-stop}) per run; never a
 * stop while the run is marked converged, except a request whose pattern is {@code converged} itself
 * (stopping a finished run early to save hours).
 *
 * <p>Threads: {@link #request}, {@link #recordSeen}, {@link #segment} and {@link #converged} are called on
 * the run's thread and never block on the job: scheduler queries and the stop sequence run on this
 * coordinator's own daemon thread. The event sink must be safe to call from any thread.
 */
public final class StopCoordinator implements AutoCloseable {

    private static final Logger LOG = LoggerFactory.getLogger(StopCoordinator.class);
    private static final String CONVERGED = "converged";

    private final String run;
    private final JobControl control;
    private final boolean armed;
    private final StopPolicy policy;
    private final Clock clock;
    private final EventSink sink;
    private final ExecutorService worker;
    private final Instant watchStart;

    private long lastIter;
    private boolean convergedMark;
    private Instant lastSegmentAt;
    private final Map<String, Held> held = new LinkedHashMap<>();
    private final Set<String> refusedOnce = new HashSet<>();
    private CompletableFuture<Void> sequence;
    private volatile JobInfo jobInfo;

    /** A request waiting for its gates. */
    private static final class Held {
        final Instant since;
        StopRequest latest;
        long records;
        boolean deferralReported;

        Held(StopRequest r, Instant since) {
            this.latest = r;
            this.since = since;
            // the record that raised the condition is the first one it held for: a solver that writes one
            // NaN record and dies must still be stoppable with a gate of one record
            this.records = 1;
        }
    }

    /**
     * @param run     the run's name, as in the timeline
     * @param control the attached job, or null when nothing is attached (then only a stop file or a command
     *                can act)
     * @param armed   {@code --stop} was given; otherwise decisions are recorded as {@code would-stop} only
     * @param policy  how to stop
     * @param clock   the only source of time for the gates and the core-hours
     * @param sink    where action events go
     */
    public StopCoordinator(String run, JobControl control, boolean armed, StopPolicy policy, Clock clock,
            EventSink sink) {
        this.run = run;
        this.control = control;
        this.armed = armed;
        this.policy = policy == null ? StopPolicy.defaults() : policy;
        this.clock = clock;
        this.sink = sink;
        this.watchStart = clock.instant();
        this.worker = Executors.newSingleThreadExecutor(r -> Daemons.thread(r, "act-stop-" + run + "-"));
        this.jobInfo = this.policy.given();
        if (control != null && control.identity().isPresent()) {
            // A local process: its start time is already known, no I/O needed.
            this.jobInfo = control.info().orElse(this.policy.given());
        } else if (control != null) {
            // Fetch size and start once, off the run's thread; the gates use the start when it arrives.
            worker.execute(this::refreshInfo);
        }
    }

    /** A stop the rules allow for this run. Never blocks. */
    public synchronized void request(StopRequest r) {
        lastIter = Math.max(lastIter, r.iter());
        if (sequence != null) {
            refuseOnce(r, "once", armed ? "a stop sequence already ran for this run (at most one per run)"
                    : "a would-stop is already recorded for this run (at most one per run)");
            return;
        }
        if (convergedMark && !CONVERGED.equals(r.pattern())) {
            refuseOnce(r, "converged", "the run is marked converged: never stopped while converged");
            return;
        }
        if (armed && control == null && policy.stopFile() == null && policy.command().isEmpty()) {
            refuseOnce(r, "nothing", "no job attached (--job) and no stop file or command configured");
            return;
        }
        Held h = held.get(r.pattern());
        if (h == null) {
            h = new Held(r, clock.instant());
            held.put(r.pattern(), h);
        } else {
            h.latest = r;
        }
        evaluate(h);
    }

    /** One more record of the run was read (counts toward persistence; held requests are looked at again). */
    public synchronized void recordSeen(long iter) {
        lastIter = Math.max(lastIter, iter);
        for (Held h : new ArrayList<>(held.values())) {
            h.records++;
            if (sequence != null) {
                break;
            }
            evaluate(h);
        }
    }

    /**
     * The condition behind {@code pattern} resolved (its detection closed): a request held for it is dropped
     * and never acts. When the hold had been reported, a final {@code refused} event says it cleared.
     */
    public synchronized void cleared(String pattern) {
        Held h = held.remove(pattern);
        if (h != null && h.deferralReported && sequence == null) {
            emit(h.latest, "refused", Severity.INFO, fields(h.latest, primaryMethod(), null,
                    "the condition cleared before the gates passed", null));
        }
    }

    /** A new segment starts (a restart looks like a jump): held requests are dropped, the grace begins. */
    public synchronized void segment(long iter) {
        lastIter = Math.max(lastIter, iter);
        lastSegmentAt = clock.instant();
        held.clear();
    }

    /** The run is (or is no longer) marked converged; while it is, nothing but a converged stop acts. */
    public synchronized void converged(boolean isConverged) {
        this.convergedMark = isConverged;
        if (isConverged) {
            held.keySet().removeIf(p -> !CONVERGED.equals(p));
        }
    }

    /** The stop sequence (or would-stop) once started: completes when it has finished; empty before. */
    public synchronized Optional<CompletableFuture<Void>> stopSequence() {
        return Optional.ofNullable(sequence);
    }

    /** Lets a running stop sequence finish, then ends the coordinator's thread. */
    @Override
    public void close() {
        worker.shutdown();
    }

    // ---------------------------------------------------------------------------------------------------

    private void evaluate(Held h) {
        if (sequence != null) {
            return;
        }
        StopGate gate = h.latest.gate();
        Instant now = clock.instant();
        List<String> unmet = new ArrayList<>();
        if (h.records < gate.persistRecords()) {
            unmet.add("persisted " + h.records + " of " + gate.persistRecords() + " records");
        }
        Duration persisted = Duration.between(h.since, now);
        if (persisted.compareTo(gate.persistFor()) < 0) {
            unmet.add("persisted " + seconds(persisted) + " of " + seconds(gate.persistFor()) + " s");
        }
        JobInfo info = jobInfo;
        Instant runStart = info.start() != null ? info.start() : watchStart;
        Duration age = Duration.between(runStart, now);
        if (age.compareTo(gate.minRunAge()) < 0) {
            unmet.add("run age " + seconds(age) + " s, less than the minimum " + seconds(gate.minRunAge()) + " s");
        }
        if (lastSegmentAt != null) {
            Duration since = Duration.between(lastSegmentAt, now);
            if (since.compareTo(gate.afterSegment()) < 0) {
                unmet.add(seconds(since) + " s since a new segment, less than the " + seconds(gate.afterSegment())
                        + " s grace");
            }
        }
        if (!unmet.isEmpty()) {
            if (!h.deferralReported) {
                h.deferralReported = true;
                Map<String, Object> f = fields(h.latest, null, null, "too early: " + String.join("; ", unmet)
                        + "; held until the gates pass", null);
                f.put("pending", true);
                emit(h.latest, "refused", Severity.INFO, f);
            }
            return;
        }
        StopRequest r = h.latest;
        Map<String, Object> gateEvidence = new LinkedHashMap<>();
        gateEvidence.put("persisted_records", h.records);
        gateEvidence.put("persisted_seconds", seconds(persisted));
        gateEvidence.put("run_age_seconds", seconds(age));
        held.clear();
        sequence = CompletableFuture.runAsync(() -> runSequence(r, gateEvidence), worker)
                .exceptionally(e -> {
                    LOG.error("stop sequence for run {} failed", run, e);
                    emit(r, "failed", Severity.CRITICAL, fields(r, primaryMethod(), null, r.reason(),
                            String.valueOf(e.getCause() != null ? e.getCause() : e)));
                    return null;
                });
    }

    private void runSequence(StopRequest r, Map<String, Object> gateEvidence) {
        refreshInfo();
        Optional<Double> saved = jobInfo.coreHoursLeft(clock.instant());
        String method = primaryMethod();
        String signal = control != null ? policy.signal() : null;
        Map<String, Object> f = fields(r, method, signal, r.reason(), null);
        putCoreHours(f, saved);
        f.put("evidence", r.evidence());
        f.put("gate", gateEvidence);
        f.put("plan", plan());
        if (!armed) {
            emit(r, "would-stop", r.severity(), f);
            return;
        }
        emit(r, "requested", r.severity(), f);
        if (policy.stopFile() != null) {
            writeStopFile(r);
        }
        if (!policy.command().isEmpty()) {
            runCommand(r);
        }
        if (control == null) {
            Map<String, Object> d = fields(r, method, null, r.reason(), null);
            d.put("detail", "no job attached: the end of the job cannot be confirmed");
            emit(r, "done", r.severity(), d);
            return;
        }
        try {
            control.stop(policy.signal(), policy.grace(), policy.forcedWait(), step -> {
                Map<String, Object> s = fields(r, step.method(), step.signal(),
                        "refused".equals(step.state()) ? step.detail() : r.reason(), step.error());
                if (!"refused".equals(step.state()) && step.detail() != null) {
                    s.put("detail", step.detail());
                }
                if ("done".equals(step.state())) {
                    putCoreHours(s, jobInfo.coreHoursLeft(clock.instant()));
                }
                Severity sev = switch (step.state()) {
                    case "failed" -> Severity.CRITICAL;
                    case "refused" -> Severity.WARNING;
                    default -> r.severity();
                };
                emit(r, step.state(), sev, s);
            });
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            emit(r, "failed", Severity.CRITICAL, fields(r, control.method(), null, r.reason(),
                    "interrupted while stopping " + control.job().describe()));
        }
    }

    private void writeStopFile(StopRequest r) {
        Path file = policy.stopFile();
        String text = "# stop request from watcher: finish the current iteration, save, and exit\n"
                + "run: " + run + "\n"
                + "pattern: " + r.pattern() + "\n"
                + "iteration: " + r.iter() + "\n"
                + "reason: " + r.reason().replace('\n', ' ') + "\n"
                + "requested-at: " + clock.instant() + "\n";
        try {
            Path dir = file.toAbsolutePath().getParent();
            Path tmp = Files.createTempFile(dir, "." + file.getFileName(), ".tmp");
            Files.writeString(tmp, text, StandardCharsets.UTF_8);
            // Appear whole: a polling solver never reads half a file.
            Files.move(tmp, file, StandardCopyOption.ATOMIC_MOVE, StandardCopyOption.REPLACE_EXISTING);
            Map<String, Object> f = fields(r, "stop-file", null, r.reason(), null);
            f.put("detail", "wrote " + file);
            emit(r, "signalled", r.severity(), f);
        } catch (IOException | RuntimeException e) {
            emit(r, "failed", Severity.CRITICAL, fields(r, "stop-file", null, r.reason(),
                    "cannot write " + file + ": " + e));
        }
    }

    private void runCommand(StopRequest r) {
        String jobSpec = control != null ? control.job().describe() : "";
        List<String> argv = new ArrayList<>();
        for (String a : policy.command()) {
            argv.add(a.replace("{job}", jobSpec).replace("{run}", run));
        }
        try {
            ExternalCommand cmd = new ExternalCommand(System.getenv());
            ExternalCommand.Result res = cmd.run(argv, policy.commandTimeout());
            if (res.ok()) {
                Map<String, Object> f = fields(r, "command", null, r.reason(), null);
                f.put("detail", "ran " + String.join(" ", argv));
                emit(r, "signalled", r.severity(), f);
            } else {
                emit(r, "failed", Severity.CRITICAL, fields(r, "command", null, r.reason(),
                        String.join(" ", argv) + ": " + res.brief()));
            }
        } catch (IOException e) {
            emit(r, "failed", Severity.CRITICAL, fields(r, "command", null, r.reason(),
                    String.join(" ", argv) + ": " + e.getMessage()));
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            emit(r, "failed", Severity.CRITICAL, fields(r, "command", null, r.reason(), "interrupted"));
        }
    }

    private void refreshInfo() {
        if (control == null) {
            return;
        }
        try {
            jobInfo = control.info().orElse(policy.given());
        } catch (RuntimeException e) {
            LOG.warn("job info for {}: {}", control.job().describe(), e.toString());
        }
    }

    private String primaryMethod() {
        if (control != null) {
            return control.method();
        }
        if (policy.stopFile() != null) {
            return "stop-file";
        }
        return policy.command().isEmpty() ? null : "command";
    }

    /** What the sequence does, in order, for the would-stop and requested events. */
    private List<String> plan() {
        List<String> p = new ArrayList<>();
        if (policy.stopFile() != null) {
            p.add("write " + policy.stopFile());
        }
        if (!policy.command().isEmpty()) {
            p.add("run " + String.join(" ", policy.command()));
        }
        if (control != null) {
            if (policy.signal() != null) {
                p.add("SIG" + policy.signal() + " to " + control.job().describe());
            }
            p.add("force after " + seconds(policy.grace()) + " s of grace");
        }
        return p;
    }

    private void putCoreHours(Map<String, Object> f, Optional<Double> saved) {
        if (saved.isPresent()) {
            double v = Math.round(saved.get() * 100) / 100.0;
            f.put("core_hours_saved", v);
            JobInfo i = jobInfo;
            f.put("core_hours_note", "up to " + v + " core-hours: " + i.cores() + " cores for the "
                    + hours(Duration.between(clock.instant(), i.start().plus(i.timeLimit()))) + " h left of a "
                    + hours(i.timeLimit()) + " h time limit (" + i.source() + ")");
        }
    }

    private Map<String, Object> fields(StopRequest r, String method, String signal, String reason, String error) {
        Map<String, Object> f = new LinkedHashMap<>();
        f.put("method", method);
        f.put("signal", signal);
        f.put("reason", reason);
        f.put("core_hours_saved", null);
        f.put("pattern", r.pattern());
        f.put("job", control != null ? control.job().describe() : null);
        if (error != null) {
            f.put("error", error);
        }
        return f;
    }

    private void refuseOnce(StopRequest r, String kind, String reason) {
        if (refusedOnce.add(kind + "|" + r.pattern())) {
            emit(r, "refused", Severity.WARNING, fields(r, primaryMethod(), null, reason, null));
        }
    }

    private void emit(StopRequest r, String state, Severity severity, Map<String, Object> fields) {
        long iter;
        synchronized (this) {
            iter = Math.max(lastIter, r.iter());
        }
        try {
            sink.append(new PendingEvent(run, EventType.ACTION, iter, state, severity, fields));
        } catch (RuntimeException e) {
            LOG.error("action event for run {} not recorded: {}", run, e.toString());
        }
    }

    private static double seconds(Duration d) {
        return Math.round(d.toMillis() / 100.0) / 10.0;
    }

    private static double hours(Duration d) {
        return Math.max(0, Math.round(d.toMillis() / 360_000.0) / 10.0);
    }
}
