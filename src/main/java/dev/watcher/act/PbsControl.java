package dev.watcher.act;

import java.time.Duration;
import java.time.Instant;
import java.time.LocalDateTime;
import java.time.ZoneId;
import java.time.format.DateTimeFormatter;
import java.time.format.DateTimeParseException;
import java.util.List;
import java.util.Locale;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * A PBS/Torque job: {@code qsig -s SIGxxx ID}, then {@code qdel ID}; presence and size from {@code qstat -f ID}
 * (job_state C or F, or an unknown id, is ended). The commands' forms are from their manual pages [memory].
 */
final class PbsControl extends SchedulerControl {

    private static final Logger LOG = LoggerFactory.getLogger(PbsControl.class);

    private final JobRef.Pbs job;

    PbsControl(JobRef.Pbs job, ExternalCommand tools, Duration pollEvery) {
        super(tools, pollEvery);
        this.job = job;
    }

    @Override
    public JobRef job() {
        return job;
    }

    @Override
    Presence presence() {
        ExternalCommand.Result r = query(List.of("qstat", "-f", job.id()));
        if (r == null) {
            return Presence.UNKNOWN;
        }
        if (!r.ok()) {
            String e = (r.err() + r.out()).toLowerCase(Locale.ROOT);
            if (e.contains("unknown job") || e.contains("has finished")) {
                return Presence.GONE;
            }
            LOG.warn("qstat for {}: {}", job.describe(), r.brief());
            return Presence.UNKNOWN;
        }
        String state = attribute(r.out(), "job_state");
        return state != null && (state.equals("C") || state.equals("F")) ? Presence.GONE : Presence.RUNNING;
    }

    @Override
    List<String> signalCommand(String signal) {
        return List.of("qsig", "-s", "SIG" + signal, job.id());
    }

    @Override
    List<String> forceCommand() {
        return List.of("qdel", job.id());
    }

    @Override
    String forceLabel() {
        return "KILL";
    }

    @Override
    public JobInfo info() {
        ExternalCommand.Result r = query(List.of("qstat", "-f", job.id()));
        if (r == null || !r.ok()) {
            return JobInfo.UNKNOWN;
        }
        return parseQstat(r.out(), ZoneId.systemDefault());
    }

    /** Reads walltime, cores and start time from {@code qstat -f} output (Torque and PBS Pro spellings). */
    static JobInfo parseQstat(String text, ZoneId zone) {
        String wall = attribute(text, "Resource_List.walltime");
        Duration limit = wall == null ? null : SlurmControl.parseTimeLimit(wall);
        Integer cores = null;
        String ncpus = attribute(text, "Resource_List.ncpus");
        if (ncpus != null && ncpus.matches("[0-9]+")) {
            cores = Integer.parseInt(ncpus);
        } else {
            String nodes = attribute(text, "Resource_List.nodes");
            if (nodes != null) {
                Matcher m = Pattern.compile("([0-9]+):ppn=([0-9]+)").matcher(nodes);
                if (m.find()) {
                    cores = Integer.parseInt(m.group(1)) * Integer.parseInt(m.group(2));
                }
            }
        }
        String st = attribute(text, "start_time");
        if (st == null) {
            st = attribute(text, "stime");
        }
        Instant start = null;
        if (st != null) {
            try {
                start = LocalDateTime.parse(st.replaceAll("\\s+", " "),
                        DateTimeFormatter.ofPattern("EEE MMM d HH:mm:ss yyyy", Locale.ROOT)).atZone(zone).toInstant();
            } catch (DateTimeParseException e) {
                start = null;
            }
        }
        return new JobInfo(start, limit, cores, "qstat");
    }

    /** The value of {@code name = value} in qstat -f output, or null. */
    static String attribute(String text, String name) {
        Matcher m = Pattern.compile("^\\s*" + Pattern.quote(name) + "\\s*=\\s*(.*?)\\s*$", Pattern.MULTILINE)
                .matcher(text);
        return m.find() ? m.group(1) : null;
    }
}
