package dev.watcher.act;

import java.io.IOException;
import java.time.Duration;
import java.util.List;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.ScheduledFuture;
import java.util.concurrent.TimeUnit;
import java.util.function.Consumer;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * What a scheduler job's control shares: polling for the end, and the sequence "signal, wait the grace
 * period, force, wait" with the scheduler's own commands. Subclasses say which commands.
 */
abstract class SchedulerControl implements JobControl {

    private static final Logger LOG = LoggerFactory.getLogger(SchedulerControl.class);
    private static final Duration QUERY_TIMEOUT = Duration.ofSeconds(30);

    /** What asking the scheduler whether the job runs gave. */
    enum Presence { RUNNING, GONE, UNKNOWN }

    final ExternalCommand tools;
    private final Duration pollEvery;
    private CompletableFuture<Void> end;
    private ScheduledFuture<?> poller;

    SchedulerControl(ExternalCommand tools, Duration pollEvery) {
        this.tools = tools;
        this.pollEvery = pollEvery;
    }

    /** Asks the scheduler; must not throw. */
    abstract Presence presence();

    /** The graceful step's command, e.g. {@code scancel --signal=TERM 12.0}. */
    abstract List<String> signalCommand(String signal);

    /** The forced step's command, e.g. {@code scancel 12.0}. */
    abstract List<String> forceCommand();

    /** How the forced step is labelled in the timeline's {@code signal} field. */
    abstract String forceLabel();

    @Override
    public boolean alive() {
        return presence() != Presence.GONE;
    }

    @Override
    public synchronized CompletableFuture<Void> onEnd() {
        if (end == null) {
            end = new CompletableFuture<>();
            poller = Daemons.POLL.scheduleWithFixedDelay(() -> {
                if (!end.isDone() && presence() == Presence.GONE) {
                    end.complete(null);
                }
                if (end.isDone()) {
                    cancelPoller();
                }
            }, 0, pollEvery.toMillis(), TimeUnit.MILLISECONDS);
        }
        return end.thenApply(v -> v);
    }

    private synchronized void cancelPoller() {
        if (poller != null) {
            poller.cancel(false);
        }
    }

    @Override
    public StopStep stop(String signal, Duration grace, Duration forcedWait, Consumer<StopStep> progress)
            throws InterruptedException {
        String m = method();
        if (presence() == Presence.GONE) {
            return report(progress, StopStep.done(m, null, job().describe() + " had already ended"));
        }
        if (signal != null) {
            List<String> cmd = signalCommand(signal);
            ExternalCommand.Result r = run(cmd);
            if (r.ok()) {
                progress.accept(StopStep.signalled(m, signal, String.join(" ", cmd)));
            } else if (presence() == Presence.GONE) {
                return report(progress, StopStep.done(m, signal, job().describe() + " ended before it was signalled"));
            } else {
                progress.accept(StopStep.failed(m, signal, String.join(" ", cmd) + ": " + r.brief()));
            }
        }
        if (waitGone(grace)) {
            return report(progress, StopStep.done(m, signal, job().describe() + " ended"
                    + (signal == null ? " within the grace period" : " after SIG" + signal)));
        }
        List<String> force = forceCommand();
        ExternalCommand.Result r = run(force);
        if (!r.ok()) {
            if (presence() == Presence.GONE) {
                return report(progress, StopStep.done(m, signal, job().describe() + " ended"));
            }
            return report(progress, StopStep.failed(m, forceLabel(), String.join(" ", force) + ": " + r.brief()));
        }
        progress.accept(StopStep.signalled(m, forceLabel(), String.join(" ", force) + " after "
                + grace.toSeconds() + " s of grace"));
        if (waitGone(forcedWait)) {
            return report(progress, StopStep.done(m, forceLabel(), job().describe() + " ended after " + force.get(0)));
        }
        return report(progress, StopStep.failed(m, forceLabel(), job().describe() + " still listed "
                + forcedWait.toSeconds() + " s after " + String.join(" ", force)));
    }

    private static StopStep report(Consumer<StopStep> progress, StopStep s) {
        progress.accept(s);
        return s;
    }

    ExternalCommand.Result run(List<String> cmd) throws InterruptedException {
        try {
            return tools.run(cmd, QUERY_TIMEOUT);
        } catch (IOException e) {
            return new ExternalCommand.Result(-1, "", e.getMessage());
        }
    }

    /** Runs a query; a failure to start is logged and gives null. */
    ExternalCommand.Result query(List<String> cmd) {
        try {
            return tools.run(cmd, QUERY_TIMEOUT);
        } catch (IOException e) {
            LOG.warn("{}: {}", String.join(" ", cmd), e.getMessage());
            return null;
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            return null;
        }
    }

    private boolean waitGone(Duration d) throws InterruptedException {
        long deadline = System.nanoTime() + d.toNanos();
        long step = Math.max(100, Math.min(1000, d.toMillis() / 5));
        while (true) {
            if (presence() == Presence.GONE) {
                return true;
            }
            long left = deadline - System.nanoTime();
            if (left <= 0) {
                return false;
            }
            Thread.sleep(Math.min(step, Math.max(1, TimeUnit.NANOSECONDS.toMillis(left))));
        }
    }
}
