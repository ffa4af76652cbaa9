package dev.watcher.act;

import java.nio.file.Path;
import java.time.Duration;
import java.util.List;
import java.util.Locale;
import java.util.Set;

/**
 * How a stop sequence is carried out once the gates let it act (the gates themselves travel with each
 * {@link dev.watcher.model.StopRequest} as a {@link dev.watcher.model.StopGate}).
 *
 * <p>The sequence: write the stop file (when set), run the user's command (when set), send {@code signal}
 * to the attached job (unless null), wait up to {@code grace} for the job to end, then force it (SIGKILL,
 * {@code scancel}, {@code qdel}) and wait up to {@code forcedWait} more.
 *
 * @param signal      the graceful signal without the SIG prefix ({@code TERM}, {@code INT}, {@code USR1}, ...),
 *                    or null to send none (the stop file or command is then the graceful step)
 * @param grace       how long the job may take to end after the graceful step before it is forced
 * @param stopFile    where to write the stop file (normally the case directory plus {@link #STOP_FILE_NAME}),
 *                    or null for none
 * @param command     a user command as an argument list, run without a shell; {@code {job}} and {@code {run}}
 *                    in any argument are replaced by the job spec and the run name; empty for none
 * @param commandTimeout how long the user command may run before it is killed and counted as failed
 * @param forcedWait  how long to wait for the job to disappear after the forced step before reporting failure
 * @param given       the job's size and time limit as the user gave them; used where the scheduler does not tell
 */
public record StopPolicy(String signal, Duration grace, Path stopFile, List<String> command,
        Duration commandTimeout, Duration forcedWait, JobInfo given) {

    /**
     * The stop file's default name, written into the case directory. The demo solver polls for the same
     * name in its output folder.
     */
    public static final String STOP_FILE_NAME = "halt.request";

    /** Signals a user may choose for the graceful step. */
    public static final Set<String> SIGNALS = Set.of("TERM", "INT", "HUP", "QUIT", "USR1", "USR2", "ALRM", "XCPU");

    public StopPolicy {
        signal = normalizeSignal(signal);
        if (grace == null || grace.isNegative()) {
            throw new IllegalArgumentException("grace period must be zero or more: " + grace);
        }
        command = command == null ? List.of() : List.copyOf(command);
        commandTimeout = commandTimeout == null ? Duration.ofSeconds(60) : commandTimeout;
        forcedWait = forcedWait == null ? Duration.ofSeconds(90) : forcedWait;
        given = given == null ? JobInfo.UNKNOWN : given;
    }

    /** SIGTERM, 30 s of grace, no stop file, no command, nothing given. */
    public static StopPolicy defaults() {
        return new StopPolicy("TERM", Duration.ofSeconds(30), null, List.of(), null, null, null);
    }

    public StopPolicy withSignal(String s) {
        return new StopPolicy(s, grace, stopFile, command, commandTimeout, forcedWait, given);
    }

    public StopPolicy withGrace(Duration g) {
        return new StopPolicy(signal, g, stopFile, command, commandTimeout, forcedWait, given);
    }

    public StopPolicy withStopFile(Path f) {
        return new StopPolicy(signal, grace, f, command, commandTimeout, forcedWait, given);
    }

    public StopPolicy withCommand(List<String> c) {
        return new StopPolicy(signal, grace, stopFile, c, commandTimeout, forcedWait, given);
    }

    public StopPolicy withForcedWait(Duration w) {
        return new StopPolicy(signal, grace, stopFile, command, commandTimeout, w, given);
    }

    /** With the job's size and time limit as the user gave them (either may be null). */
    public StopPolicy withGiven(Integer cores, Duration timeLimit) {
        return new StopPolicy(signal, grace, stopFile, command, commandTimeout, forcedWait,
                new JobInfo(null, timeLimit, cores, "given"));
    }

    /**
     * {@code TERM}, {@code SIGTERM} and {@code term} all give {@code TERM}; null, empty or {@code none} give
     * null (no graceful signal).
     *
     * @throws IllegalArgumentException for a signal outside {@link #SIGNALS} (KILL is the forced step's)
     */
    public static String normalizeSignal(String s) {
        if (s == null || s.isBlank() || s.equalsIgnoreCase("none")) {
            return null;
        }
        String n = s.trim().toUpperCase(Locale.ROOT);
        if (n.startsWith("SIG")) {
            n = n.substring(3);
        }
        if (!SIGNALS.contains(n)) {
            throw new IllegalArgumentException("stop signal '" + s + "' is not one of " + new java.util.TreeSet<>(SIGNALS)
                    + " or none");
        }
        return n;
    }
}
