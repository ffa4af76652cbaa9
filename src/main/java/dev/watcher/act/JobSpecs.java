package dev.watcher.act;

import java.util.regex.Pattern;

/** The grammar of {@code --job} specs, kept out of the public {@link JobRef} interface. */
final class JobSpecs {
    static final String FORMS =
            "expected pid:N, slurm:ID, slurm:ID_TASK, slurm:ID.STEP, slurm:ID_TASK.STEP or pbs:ID";
    static final Pattern SLURM = Pattern.compile("([0-9]+)(?:_([0-9]+))?(?:\\.([0-9]+|batch|extern))?");
    static final Pattern PBS = Pattern.compile("[0-9]+(?:\\[[0-9]*\\])?(?:\\.[A-Za-z0-9][A-Za-z0-9.\\-]*)?");

    private JobSpecs() {
    }
}
