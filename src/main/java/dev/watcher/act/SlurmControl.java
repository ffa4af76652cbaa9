package dev.watcher.act;

import java.time.Duration;
import java.time.Instant;
import java.time.LocalDateTime;
import java.time.ZoneId;
import java.time.format.DateTimeParseException;
import java.util.List;
import java.util.Set;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * A SLURM job or step: {@code scancel --signal=SIG ID[.STEP]} (reaches the job's steps, not its batch shell),
 * then {@code scancel ID[.STEP]} (TERM, then KILL after the cluster's KillWait); presence from {@code squeue};
 * size and time limit from {@code scontrol show job -o}.
 */
final class SlurmControl extends SchedulerControl {

    private static final Logger LOG = LoggerFactory.getLogger(SlurmControl.class);
    private static final Set<String> ENDED = Set.of("COMPLETED", "CANCELLED", "FAILED", "TIMEOUT", "NODE_FAIL",
            "PREEMPTED", "BOOT_FAIL", "DEADLINE", "OUT_OF_MEMORY", "SPECIAL_EXIT", "REVOKED");

    private final JobRef.Slurm job;
    private volatile JobInfo cached;

    SlurmControl(JobRef.Slurm job, ExternalCommand tools, Duration pollEvery) {
        super(tools, pollEvery);
        this.job = job;
    }

    @Override
    public JobRef job() {
        return job;
    }

    @Override
    Presence presence() {
        ExternalCommand.Result r = query(List.of("squeue", "-h", "-t", "all", "-j", job.job(), "-o", "%T"));
        if (r == null) {
            return Presence.UNKNOWN;
        }
        if (!r.ok()) {
            // A job the controller has already forgotten is reported as an invalid id.
            if (r.err().contains("Invalid job id")) {
                return Presence.GONE;
            }
            LOG.warn("squeue for {}: {}", job.describe(), r.brief());
            return Presence.UNKNOWN;
        }
        boolean running = r.out().lines().map(String::strip).anyMatch(s -> !s.isEmpty() && !ENDED.contains(s));
        if (!running || job.step() == null) {
            return running ? Presence.RUNNING : Presence.GONE;
        }
        ExternalCommand.Result steps = query(List.of("squeue", "-h", "-s", "-j", job.job(), "-o", "%i"));
        if (steps == null || !steps.ok()) {
            return Presence.UNKNOWN;
        }
        // Steps are listed as JOB.STEP with either the array form or the raw job id; match the step part.
        boolean listed = steps.out().lines().map(String::strip)
                .anyMatch(s -> s.endsWith("." + job.step()));
        return listed ? Presence.RUNNING : Presence.GONE;
    }

    @Override
    List<String> signalCommand(String signal) {
        // No --full: the signal goes to the job's steps, not to the batch shell, which then lives on to see its
        // steps end (a solver started without srun hears only the forced scancel, which sends TERM first).
        return List.of("scancel", "--signal=" + signal, job.target());
    }

    @Override
    List<String> forceCommand() {
        return List.of("scancel", job.target());
    }

    @Override
    String forceLabel() {
        return "KILL";
    }

    @Override
    public JobInfo info() {
        JobInfo c = cached;
        if (c != null) {
            return c;
        }
        ExternalCommand.Result r = query(List.of("scontrol", "show", "job", "-o", job.job()));
        if (r == null || !r.ok()) {
            return JobInfo.UNKNOWN;
        }
        JobInfo info = parseShowJob(r.out(), ZoneId.systemDefault());
        if (info.start() != null) {
            cached = info;
        }
        return info;
    }

    private static final Pattern FIELD = Pattern.compile("(?:^|\\s)(StartTime|TimeLimit|NumCPUs)=(\\S+)");

    /** Reads start time, time limit and CPU count from one line of {@code scontrol show job -o}. */
    static JobInfo parseShowJob(String text, ZoneId zone) {
        Instant start = null;
        Duration limit = null;
        Integer cpus = null;
        String line = text.lines().findFirst().orElse("");
        Matcher m = FIELD.matcher(line);
        while (m.find()) {
            String v = m.group(2);
            switch (m.group(1)) {
                case "StartTime" -> {
                    try {
                        start = LocalDateTime.parse(v).atZone(zone).toInstant();
                    } catch (DateTimeParseException e) {
                        start = null; // Unknown, None: not started
                    }
                }
                case "TimeLimit" -> limit = parseTimeLimit(v);
                case "NumCPUs" -> {
                    if (v.matches("[0-9]+")) {
                        cpus = Integer.parseInt(v);
                    }
                }
                default -> { }
            }
        }
        return new JobInfo(start, limit, cpus, "scontrol");
    }

    /**
     * SLURM's time formats: {@code MM}, {@code MM:SS}, {@code HH:MM:SS}, {@code D-HH}, {@code D-HH:MM},
     * {@code D-HH:MM:SS}; {@code UNLIMITED}, {@code Partition_Limit} and anything else give null.
     */
    static Duration parseTimeLimit(String v) {
        Matcher m = Pattern.compile("(?:([0-9]+)-)?([0-9]+)(?::([0-9]+))?(?::([0-9]+))?").matcher(v);
        if (!m.matches()) {
            return null;
        }
        long days = m.group(1) == null ? 0 : Long.parseLong(m.group(1));
        long a = Long.parseLong(m.group(2));
        Long b = m.group(3) == null ? null : Long.parseLong(m.group(3));
        Long c = m.group(4) == null ? null : Long.parseLong(m.group(4));
        Duration d;
        if (m.group(1) != null) {
            d = Duration.ofDays(days).plusHours(a).plusMinutes(b == null ? 0 : b).plusSeconds(c == null ? 0 : c);
        } else if (c != null) {
            d = Duration.ofHours(a).plusMinutes(b).plusSeconds(c);
        } else if (b != null) {
            d = Duration.ofMinutes(a).plusSeconds(b);
        } else {
            d = Duration.ofMinutes(a);
        }
        return d;
    }
}
