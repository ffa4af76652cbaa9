package dev.watcher.daemon;

import dev.watcher.detect.stats.BatchMeans;
import dev.watcher.history.RunHistory;
import dev.watcher.journal.Journal;
import dev.watcher.journal.StateDir;
import dev.watcher.model.Detection;
import dev.watcher.model.DetectionState;
import dev.watcher.model.PendingEvent;
import dev.watcher.model.Severity;
import dev.watcher.model.TimelineEvent;
import java.time.Instant;
import java.util.List;
import java.util.Map;
import java.util.concurrent.atomic.AtomicBoolean;
import org.slf4j.LoggerFactory;

/**
 * Start-up in parallel: while the command line is parsed and the rules and formats are read, a background
 * thread initializes what the pipeline needs next and takes long to set up the first time: the logging
 * configuration, the JSON encoders of the timeline, the state directory and the history, and the Student t
 * quantiles of the monitor judgements. A replay of a short log starts about a tenth of a second sooner on two
 * cores. It touches no state of a run: only class initialization, which the JVM serializes, a throw-away
 * encoding, and a cache of pure function values.
 */
public final class Prewarm {

    private static final AtomicBoolean STARTED = new AtomicBoolean();

    private Prewarm() {
    }

    /** Starts the background initialization once per process (later calls do nothing). */
    public static void start() {
        if (!STARTED.compareAndSet(false, true)) {
            return;
        }
        Thread t = new Thread(Prewarm::run, "watcher-prewarm");
        t.setDaemon(true);
        t.setPriority(Thread.MIN_PRIORITY);
        t.start();
    }

    private static void run() {
        try {
            LoggerFactory.getLogger(Prewarm.class);
            Class.forName(StateDir.class.getName(), true, Prewarm.class.getClassLoader());
            Detection d = new Detection("residual-level", DetectionState.INFO, Severity.INFO, 1, List.of("energy"),
                    null, "energy residual fell below 1e-03", "", Map.of("value", 9.9e-4, "level", 1e-3));
            Journal.encode(TimelineEvent.of(1, Instant.EPOCH, PendingEvent.detection("prewarm", d)));
            Class.forName(RunHistory.class.getName(), true, Prewarm.class.getClassLoader());
            // the t quantiles of the monitor judgements at their default confidence (monitor-settled.confidence)
            BatchMeans.prepare(0.95);
        } catch (ClassNotFoundException | RuntimeException | LinkageError e) {
            // only a head start: whatever fails here is done, and reported, where it is needed
        }
    }
}
