package dev.watcher.cli;

import picocli.CommandLine;
import picocli.CommandLine.Command;

/**
 * The {@code watcher} command line: the composition root's entry. Exit codes: 0 success; 2 bad usage or
 * invalid input files (with a message on stderr); 1 for runtime failure.
 */
@Command(name = "watcher", mixinStandardHelpOptions = true, versionProvider = Main.Version.class,
        description = "Follows the growing logs of long CFD runs, judges convergence, alerts with remedies,"
                + " stops diverging jobs when allowed, and leaves an event timeline and a report.",
        subcommands = {DemoCommand.class, WatchCommand.class, ReplayCommand.class, ReportCommand.class,
            CheckCommand.class, BenchCommand.class, CommandLine.HelpCommand.class})
public final class Main implements Runnable {

    public static void main(String[] args) {
        System.exit(execute(args));
    }

    /** Runs the command line and returns the exit code (tests call this). */
    public static int execute(String... args) {
        if (args.length > 0 && ("replay".equals(args[0]) || "watch".equals(args[0]) || "demo".equals(args[0]))) {
            dev.watcher.daemon.Prewarm.start();
        }
        CommandLine cl = new CommandLine(new Main());
        cl.setExecutionExceptionHandler((ex, cmd, parsed) -> {
            if (ex instanceof UserError u) {
                cmd.getErr().println("watcher: " + u.getMessage());
                return 2;
            }
            cmd.getErr().println("watcher: failed: " + ex);
            if (Boolean.getBoolean("watcher.trace")) {
                ex.printStackTrace(cmd.getErr());
            }
            return 1;
        });
        return cl.execute(args);
    }

    @Override
    public void run() {
        new CommandLine(this).usage(System.out);
    }

    /** Bad usage or invalid input: the message is shown as it is and the exit code is 2. */
    static final class UserError extends RuntimeException {
        private static final long serialVersionUID = 1L;

        UserError(String message) {
            super(message);
        }

        UserError(String message, Throwable cause) {
            super(message, cause);
        }
    }

    static final class Version implements CommandLine.IVersionProvider {
        @Override
        public String[] getVersion() {
            String v = Main.class.getPackage().getImplementationVersion();
            return new String[] {"watcher " + (v == null ? "development build" : v)};
        }
    }
}
