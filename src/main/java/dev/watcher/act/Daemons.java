package dev.watcher.act;

import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.ScheduledExecutorService;
import java.util.concurrent.atomic.AtomicInteger;

/** The stage's background threads: all daemon threads, so they never hold the JVM open. */
final class Daemons {

    private static final AtomicInteger COUNT = new AtomicInteger();

    /** Drains child processes' output. */
    static final ExecutorService IO = Executors.newCachedThreadPool(r -> thread(r, "act-io-"));

    /** Polls schedulers for the end of a job. */
    static final ScheduledExecutorService POLL = Executors.newScheduledThreadPool(1, r -> thread(r, "act-poll-"));

    private Daemons() {
    }

    static Thread thread(Runnable r, String prefix) {
        Thread t = new Thread(r, prefix + COUNT.incrementAndGet());
        t.setDaemon(true);
        return t;
    }
}
