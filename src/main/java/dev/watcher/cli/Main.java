package dev.watcher.cli;

import java.util.LinkedHashMap;
import java.util.Map;
import java.util.function.Supplier;
import picocli.CommandLine;
import picocli.CommandLine.Command;

/**
 * The {@code watcher} command line: the composition root's entry. Exit codes: 0 success; 2 bad usage or
 * invalid input files (with a message on stderr); 1 for runtime failure.
 */
@Command(name = "watcher", mixinStandardHelpOptions = true, versionProvider = Main.Version.class,
        description = "Follows the growing logs of long CFD runs, judges convergence, alerts with remedies,"
                + " stops diverging jobs when allowed, and leaves an event timeline and a report.")
public final class Main implements Runnable {

    /**
     * The subcommands by name. Picocli builds a command's model by reflection over its options, which is a
     * good part of a short replay's start-up: only the command named on the command line is given to it
     * (every one when none is named, for the usage, or for {@code help}).
     */
    private static final Map<String, Supplier<Object>> COMMANDS = commands();

    private static Map<String, Supplier<Object>> commands() {
        Map<String, Supplier<Object>> m = new LinkedHashMap<>();
        m.put("demo", DemoCommand::new);
        m.put("watch", WatchCommand::new);
        m.put("replay", ReplayCommand::new);
        m.put("report", ReportCommand::new);
        m.put("check", CheckCommand::new);
        m.put("bench", BenchCommand::new);
        m.put("help", CommandLine.HelpCommand::new);
        return m;
    }

    private static CommandLine withCommands(CommandLine cl, String only) {
        Supplier<Object> named = only == null || "help".equals(only) ? null : COMMANDS.get(only);
        if (named != null) {
            cl.addSubcommand(only, named.get());
        } else {
            COMMANDS.forEach((name, command) -> cl.addSubcommand(name, command.get()));
        }
        return cl;
    }

    public static void main(String[] args) {
        System.exit(execute(args));
    }

    /** Runs the command line and returns the exit code (tests call this). */
    public static int execute(String... args) {
        if (args.length > 0 && ("replay".equals(args[0]) || "watch".equals(args[0]) || "demo".equals(args[0]))) {
            dev.watcher.daemon.Prewarm.start();
        }
        CommandLine cl = withCommands(new CommandLine(new Main()), args.length > 0 ? args[0] : null);
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
        withCommands(new CommandLine(this), null).usage(System.out);
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
