package dev.watcher.cli;

import sun.misc.Signal;

/**
 * SIGTERM and SIGINT end the daemon in order (flush, then exit 0) instead of the JVM's default exit 143.
 */
final class Signals {
    private Signals() {
    }

    @SuppressWarnings("sunapi")
    static void onTermOrInt(Runnable r) {
        for (String s : new String[] {"TERM", "INT"}) {
            try {
                Signal.handle(new Signal(s), sig -> r.run());
            } catch (IllegalArgumentException e) {
                // the platform does not have this signal
            }
        }
    }
}
