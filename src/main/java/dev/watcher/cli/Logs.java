package dev.watcher.cli;

import ch.qos.logback.classic.Level;
import ch.qos.logback.classic.Logger;
import org.slf4j.LoggerFactory;

/** Console logging: quiet (warnings) by default, {@code --verbose} shows what the daemon does. */
final class Logs {
    private Logs() {
    }

    static void configure(boolean verbose) {
        if (verbose) {
            ((Logger) LoggerFactory.getLogger(org.slf4j.Logger.ROOT_LOGGER_NAME)).setLevel(Level.INFO);
            ((Logger) LoggerFactory.getLogger("dev.watcher")).setLevel(Level.DEBUG);
        }
    }
}
