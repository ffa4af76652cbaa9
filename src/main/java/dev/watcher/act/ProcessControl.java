package dev.watcher.act;

import java.io.IOException;
import java.time.Duration;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.ExecutionException;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.TimeoutException;
import java.util.function.Consumer;

/**
 * A local process, known by the {@link ProcessHandle} and {@link ProcessIdentity} taken at attach. TERM and
 * KILL go through the handle (the JDK signals only while the start time still matches); other graceful
 * signals go through kill(1) right after the identity is checked again.
 */
final class ProcessControl implements JobControl {

    private final JobRef.Pid job;
    private final ProcessIdentity identity;
    /** Null when the recorded identity did not match any live process at attach. */
    private final ProcessHandle handle;
    private final CompletableFuture<Void> end;

    ProcessControl(JobRef.Pid job, ProcessIdentity identity, ProcessHandle handle) {
        this.job = job;
        this.identity = identity;
        this.handle = handle;
        this.end = handle == null ? CompletableFuture.completedFuture(null)
                : handle.onExit().handle((h, e) -> null);
    }

    @Override
    public JobRef job() {
        return job;
    }

    @Override
    public Optional<ProcessIdentity> identity() {
        return Optional.of(identity);
    }

    @Override
    public boolean alive() {
        return handle != null && handle.isAlive();
    }

    @Override
    public CompletableFuture<Void> onEnd() {
        return end.thenApply(v -> v);
    }

    @Override
    public JobInfo info() {
        return new JobInfo(identity.start(), null, null, "process");
    }

    @Override
    public StopStep stop(String signal, Duration grace, Duration forcedWait, Consumer<StopStep> progress)
            throws InterruptedException {
        String refusal = checkIdentity();
        if (refusal != null) {
            return report(progress, StopStep.refused("pid", refusal));
        }
        if (!handle.isAlive()) {
            return report(progress, StopStep.done("pid", null, "process " + identity.pid() + " had already ended"));
        }
        if (signal != null) {
            String error = send(signal);
            if (error != null) {
                if (!handle.isAlive()) {
                    return report(progress, StopStep.done("pid", signal, "process ended before it could be signalled"));
                }
                report(progress, StopStep.failed("pid", signal, error));
            } else {
                progress.accept(StopStep.signalled("pid", signal, "sent SIG" + signal + " to pid " + identity.pid()));
                if (waitEnd(grace)) {
                    return report(progress, StopStep.done("pid", signal,
                            "process " + identity.pid() + " ended after SIG" + signal));
                }
            }
        } else if (waitEnd(grace)) {
            return report(progress, StopStep.done("pid", null, "process " + identity.pid() + " ended within the grace period"));
        }
        // Forced. The handle refuses by itself if the pid was recycled meanwhile (start time mismatch).
        refusal = checkIdentity();
        if (refusal != null) {
            return report(progress, StopStep.refused("pid", refusal));
        }
        if (!handle.destroyForcibly() && handle.isAlive()) {
            return report(progress, StopStep.failed("pid", "KILL", "SIGKILL to pid " + identity.pid() + " was not delivered"));
        }
        progress.accept(StopStep.signalled("pid", "KILL",
                "sent SIGKILL to pid " + identity.pid() + " after " + grace.toSeconds() + " s of grace"));
        if (waitEnd(forcedWait)) {
            return report(progress, StopStep.done("pid", "KILL", "process " + identity.pid() + " ended after SIGKILL"));
        }
        return report(progress, StopStep.failed("pid", "KILL", "process " + identity.pid() + " still alive after SIGKILL"));
    }

    private static StopStep report(Consumer<StopStep> progress, StopStep s) {
        progress.accept(s);
        return s;
    }

    /** Why the live pid is not the attached process, or null when it is (or when it has simply ended). */
    private String checkIdentity() {
        if (handle == null) {
            Optional<ProcessIdentity> now = ProcessHandle.of(identity.pid()).flatMap(ProcessIdentity::of);
            return now.map(identity::mismatch).orElse("pid " + identity.pid() + " no longer exists")
                    + "; not signalled";
        }
        Optional<ProcessIdentity> now = ProcessHandle.of(identity.pid()).flatMap(ProcessIdentity::of);
        if (now.isEmpty()) {
            return null; // ended: nothing to signal, and nothing else carries the pid yet
        }
        String m = identity.mismatch(now.get());
        return m == null ? null : m + "; not signalled";
    }

    private String send(String signal) throws InterruptedException {
        if ("TERM".equals(signal)) {
            return handle.destroy() ? null : "SIGTERM to pid " + identity.pid() + " was not delivered";
        }
        try {
            ExternalCommand kill = new ExternalCommand(Map.of("PATH", "/usr/bin:/bin:/usr/sbin:/sbin"));
            ExternalCommand.Result r = kill.run(List.of("kill", "-s", signal, Long.toString(identity.pid())),
                    Duration.ofSeconds(10));
            return r.ok() ? null : "kill -s " + signal + " " + identity.pid() + ": " + r.brief();
        } catch (IOException e) {
            return "kill -s " + signal + ": " + e.getMessage();
        }
    }

    private boolean waitEnd(Duration d) throws InterruptedException {
        try {
            end.get(Math.max(0, d.toMillis()), TimeUnit.MILLISECONDS);
            return true;
        } catch (TimeoutException e) {
            return !handle.isAlive();
        } catch (ExecutionException e) {
            return !handle.isAlive();
        }
    }
}
