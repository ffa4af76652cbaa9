package dev.watcher.act;

/**
 * One step of a stop sequence as a {@link JobControl} reports it; the coordinator turns each into an
 * {@code action} event.
 *
 * @param state  {@code signalled}, {@code done}, {@code refused} or {@code failed}
 * @param method {@code pid}, {@code slurm}, {@code pbs}, {@code stop-file} or {@code command}
 * @param signal the signal sent (e.g. {@code TERM}, {@code KILL}), or null
 * @param detail what happened, in a short sentence (for {@code refused}: the reason)
 * @param error  for {@code failed}: the error; otherwise null
 */
public record StopStep(String state, String method, String signal, String detail, String error) {

    public static StopStep signalled(String method, String signal, String detail) {
        return new StopStep("signalled", method, signal, detail, null);
    }

    public static StopStep done(String method, String signal, String detail) {
        return new StopStep("done", method, signal, detail, null);
    }

    public static StopStep refused(String method, String reason) {
        return new StopStep("refused", method, null, reason, null);
    }

    public static StopStep failed(String method, String signal, String error) {
        return new StopStep("failed", method, signal, null, error);
    }
}
