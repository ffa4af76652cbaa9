package dev.watcher.act;

import java.time.Duration;
import java.time.Instant;
import java.util.Optional;

/**
 * What the scheduler (or the user) tells about a job's size and time, for "core-hours saved". Any part may
 * be null when unknown.
 *
 * @param start     when the job started running
 * @param timeLimit the wall-time limit it was granted; null when unlimited or unknown
 * @param cores     cores allocated to it
 * @param source    where the values came from, e.g. {@code scontrol}, {@code qstat}, {@code given}
 */
public record JobInfo(Instant start, Duration timeLimit, Integer cores, String source) {

    public static final JobInfo UNKNOWN = new JobInfo(null, null, null, "unknown");

    /** This, with each unknown part taken from {@code other}. */
    public JobInfo orElse(JobInfo other) {
        if (other == null) {
            return this;
        }
        JobInfo merged = new JobInfo(start != null ? start : other.start,
                timeLimit != null ? timeLimit : other.timeLimit, cores != null ? cores : other.cores,
                source);
        boolean usedOther = (start == null && other.start != null) || (timeLimit == null && other.timeLimit != null)
                || (cores == null && other.cores != null);
        if (usedOther) {
            merged = new JobInfo(merged.start, merged.timeLimit, merged.cores,
                    "unknown".equals(source) ? other.source : source + "+" + other.source);
        }
        return merged;
    }

    /**
     * The most a stop at {@code now} can save: cores times the time left before the limit would have ended
     * the job, in core-hours. Empty unless start, time limit and cores are all known. Never negative.
     */
    public Optional<Double> coreHoursLeft(Instant now) {
        if (start == null || timeLimit == null || cores == null) {
            return Optional.empty();
        }
        Duration left = Duration.between(now, start.plus(timeLimit));
        if (left.isNegative()) {
            left = Duration.ZERO;
        }
        return Optional.of(cores * (left.toMillis() / 3_600_000.0));
    }
}
