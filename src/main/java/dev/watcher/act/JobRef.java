package dev.watcher.act;

import java.util.regex.Matcher;

/**
 * The job a run belongs to, as given with {@code --job}: a local process, a SLURM job (optionally an array
 * task and/or a step) or a PBS job. A value: parsing does no I/O; {@link JobControl#attach} looks the job up.
 */
public sealed interface JobRef permits JobRef.Pid, JobRef.Slurm, JobRef.Pbs {

    /** The spec form, e.g. {@code pid:4242}, {@code slurm:1234_7.0}, {@code pbs:77.head}. */
    String describe();

    /** The method id used in the timeline's action events: {@code pid}, {@code slurm} or {@code pbs}. */
    String method();

    /**
     * Parses {@code pid:N}, {@code slurm:ID}, {@code slurm:ID_TASK}, {@code slurm:ID.STEP},
     * {@code slurm:ID_TASK.STEP} or {@code pbs:ID}.
     *
     * @throws IllegalArgumentException naming the spec and the forms expected
     */
    static JobRef parse(String spec) {
        if (spec == null || spec.isBlank()) {
            throw new IllegalArgumentException("--job: empty job spec; " + JobSpecs.FORMS);
        }
        String s = spec.trim();
        int colon = s.indexOf(':');
        if (colon < 0) {
            throw new IllegalArgumentException("--job '" + spec + "': no kind before ':'; " + JobSpecs.FORMS);
        }
        String kind = s.substring(0, colon);
        String rest = s.substring(colon + 1);
        switch (kind) {
            case "pid": {
                if (!rest.matches("[1-9][0-9]{0,9}")) {
                    throw new IllegalArgumentException("--job '" + spec + "': a pid must be a positive number; "
                            + JobSpecs.FORMS);
                }
                return new Pid(Long.parseLong(rest));
            }
            case "slurm": {
                Matcher m = JobSpecs.SLURM.matcher(rest);
                if (!m.matches()) {
                    throw new IllegalArgumentException("--job '" + spec
                            + "': a SLURM id is digits, optionally _TASK (array task) and .STEP (digits or 'batch'); "
                            + JobSpecs.FORMS);
                }
                return new Slurm(m.group(1), m.group(2), m.group(3));
            }
            case "pbs": {
                if (!JobSpecs.PBS.matcher(rest).matches()) {
                    throw new IllegalArgumentException("--job '" + spec
                            + "': a PBS id starts with digits (e.g. 1234 or 1234.server or 1234[7].server); "
                            + JobSpecs.FORMS);
                }
                return new Pbs(rest);
            }
            default:
                throw new IllegalArgumentException("--job '" + spec + "': unknown kind '" + kind + "'; " + JobSpecs.FORMS);
        }
    }

    /** A local process by pid. */
    record Pid(long pid) implements JobRef {
        public Pid {
            if (pid <= 0) {
                throw new IllegalArgumentException("pid must be positive: " + pid);
            }
        }

        @Override
        public String describe() {
            return "pid:" + pid;
        }

        @Override
        public String method() {
            return "pid";
        }
    }

    /**
     * A SLURM job: {@code jobId} digits, {@code arrayTask} and {@code step} null when absent.
     */
    record Slurm(String jobId, String arrayTask, String step) implements JobRef {
        public Slurm {
            if (jobId == null || !jobId.matches("[0-9]+")) {
                throw new IllegalArgumentException("SLURM job id must be digits: " + jobId);
            }
        }

        /** The job without its step: {@code ID} or {@code ID_TASK}, as squeue and scontrol take it. */
        public String job() {
            return arrayTask == null ? jobId : jobId + "_" + arrayTask;
        }

        /** What scancel takes: {@code ID[_TASK][.STEP]}. */
        public String target() {
            return step == null ? job() : job() + "." + step;
        }

        @Override
        public String describe() {
            return "slurm:" + target();
        }

        @Override
        public String method() {
            return "slurm";
        }
    }

    /** A PBS/Torque job id as qsig, qdel and qstat take it. */
    record Pbs(String id) implements JobRef {
        public Pbs {
            if (id == null || id.isBlank()) {
                throw new IllegalArgumentException("PBS job id is empty");
            }
        }

        @Override
        public String describe() {
            return "pbs:" + id;
        }

        @Override
        public String method() {
            return "pbs";
        }
    }
}
