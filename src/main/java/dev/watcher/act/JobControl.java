package dev.watcher.act;

import java.time.Duration;
import java.util.Map;
import java.util.Optional;
import java.util.concurrent.CompletableFuture;
import java.util.function.Consumer;

/**
 * The handle on the one job a run belongs to, attached once when the daemon starts. Implementations are
 * thread-safe: the daemon asks {@link #onEnd()} on one thread while a stop sequence runs on another.
 *
 * <p>Local processes keep the identity taken at attach (pid, start time, command): a process that has the
 * same pid but another start time or command is never signalled; the control reports {@code refused}.
 */
public interface JobControl {

    /** The job as given. */
    JobRef job();

    /** The method id for action events: {@code pid}, {@code slurm} or {@code pbs}. */
    default String method() {
        return job().method();
    }

    /**
     * Whether the job still runs. For a scheduler job this asks the scheduler (a short child process); an
     * answer that cannot be had counts as alive, so a scheduler hiccup never reads as "the job ended".
     */
    boolean alive();

    /**
     * Completes when the job has ended (by itself or stopped). Local processes complete on exit; scheduler
     * jobs are polled every few seconds. Never completes exceptionally.
     */
    CompletableFuture<Void> onEnd();

    /**
     * Stops the job: {@code signal} first (skipped when null), then, if the job is still there after
     * {@code grace}, the forced step. Blocks until the job has ended, the forced step has had its time, or
     * the control refused; call it on a thread of its own. Every step goes to {@code progress} as it
     * happens; the last one (done, refused or failed) is also returned.
     *
     * @param signal a name from {@link StopPolicy#SIGNALS}, or null for no graceful signal
     * @param grace      how long to wait after the graceful step
     * @param forcedWait how long to wait for the job to disappear after the forced step
     */
    StopStep stop(String signal, Duration grace, Duration forcedWait, Consumer<StopStep> progress)
            throws InterruptedException;

    /** What the scheduler says about the job's start, time limit and cores; may be partly or wholly unknown. */
    JobInfo info();

    /** The recorded identity of a local process; empty for scheduler jobs. */
    default Optional<ProcessIdentity> identity() {
        return Optional.empty();
    }

    /** Attaches to {@code job} with this process's environment (PATH finds scancel, qsig, ...). */
    static JobControl attach(JobRef job) {
        return attach(job, System.getenv());
    }

    /**
     * Attaches to {@code job}. A local process's identity is taken now; scheduler tools are looked up on
     * {@code environment}'s PATH (also the environment they run with).
     *
     * @throws IllegalStateException when there is no such process, or a scheduler tool is not on PATH
     */
    static JobControl attach(JobRef job, Map<String, String> environment) {
        if (job instanceof JobRef.Pid p) {
            ProcessHandle h = ProcessHandle.of(p.pid()).orElseThrow(
                    () -> new IllegalStateException("--job " + job.describe() + ": no process with pid " + p.pid()));
            ProcessIdentity id = ProcessIdentity.of(h).orElseThrow(() -> new IllegalStateException(
                    "--job " + job.describe() + ": the process has ended or its start time cannot be read"));
            return new ProcessControl(p, id, h);
        }
        if (job instanceof JobRef.Slurm s) {
            return new SlurmControl(s, new ExternalCommand(environment, "squeue", "scancel", "scontrol"),
                    Duration.ofSeconds(5));
        }
        return new PbsControl((JobRef.Pbs) job, new ExternalCommand(environment, "qsig", "qdel", "qstat"),
                Duration.ofSeconds(5));
    }

    /**
     * Re-attaches to a local process by a recorded identity (e.g. kept in the state directory across a daemon
     * restart). When the pid now belongs to another process, the control treats the job as ended and refuses
     * to signal.
     */
    static JobControl process(ProcessIdentity identity) {
        Optional<ProcessHandle> h = ProcessHandle.of(identity.pid());
        ProcessHandle match = h.flatMap(ProcessIdentity::of).filter(cur -> identity.mismatch(cur) == null).isPresent()
                ? h.get() : null;
        return new ProcessControl(new JobRef.Pid(identity.pid()), identity, match);
    }
}
