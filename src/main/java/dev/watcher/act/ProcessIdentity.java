package dev.watcher.act;

import java.time.Instant;
import java.util.Optional;

/**
 * Who a local process is: its pid, its start time and its command, taken once at attach time. A process
 * with the same pid but another start time or command is another process (the pid was recycled) and is
 * never signalled. The daemon may keep this in its state directory to re-attach after a restart.
 *
 * @param start   the start time as the operating system reports it (never null)
 * @param command the executable's path, or null when the system does not tell (then only pid and start
 *                time identify the process)
 */
public record ProcessIdentity(long pid, Instant start, String command) {

    public ProcessIdentity {
        if (pid <= 0) {
            throw new IllegalArgumentException("pid must be positive: " + pid);
        }
        if (start == null) {
            throw new IllegalArgumentException("start time of pid " + pid + " is required");
        }
    }

    /** The identity of a live process, or empty when it has ended or its start time cannot be read. */
    public static Optional<ProcessIdentity> of(ProcessHandle handle) {
        ProcessHandle.Info info = handle.info();
        Optional<Instant> start = info.startInstant();
        if (start.isEmpty() || !handle.isAlive()) {
            return Optional.empty();
        }
        return Optional.of(new ProcessIdentity(handle.pid(), start.get(), info.command().orElse(null)));
    }

    /**
     * Why {@code current} is not this process, or null when it is: pid, start time and (when both know it)
     * command must match.
     */
    public String mismatch(ProcessIdentity current) {
        if (current.pid != pid) {
            return "pid " + current.pid + " is not pid " + pid;
        }
        if (!current.start.equals(start)) {
            return "pid " + pid + " now belongs to a process started " + current.start + ", not the one attached"
                    + " (started " + start + ")";
        }
        if (command != null && current.command != null && !command.equals(current.command)) {
            return "pid " + pid + " now runs " + current.command + ", not the attached " + command;
        }
        return null;
    }
}
