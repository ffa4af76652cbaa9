package dev.watcher.model;

/**
 * One iteration of a run as a parser assembled it: what flows from parse to detect.
 *
 * @param iter      the global iteration counter as the log gave it
 * @param step      time-step index, or {@link #NONE} in steady runs
 * @param time      physical time, or NaN when the log gives none
 * @param inner     inner iteration within the step (restarting at 1), or {@link #NONE}
 * @param residuals residuals per equation (names may carry a region: {@code fluid/energy})
 * @param monitors  monitored physical quantities per name
 * @param segment   0 for the first segment of the run; incremented at each restart the parser recognised
 * @param line      line number (1-based) of the line that completed this record in its source
 */
public record IterationRecord(long iter, long step, double time, long inner, Samples residuals,
        Samples monitors, int segment, long line) {

    public static final long NONE = -1;

    public IterationRecord {
        if (residuals == null) {
            residuals = Samples.EMPTY;
        }
        if (monitors == null) {
            monitors = Samples.EMPTY;
        }
    }

    /** A steady-run record. */
    public static IterationRecord steady(long iter, Samples residuals, Samples monitors) {
        return new IterationRecord(iter, NONE, Double.NaN, NONE, residuals, monitors, 0, 0);
    }

    public boolean hasStep() {
        return step != NONE;
    }

    public boolean hasInner() {
        return inner != NONE;
    }

    public boolean hasTime() {
        return !Double.isNaN(time);
    }

    public IterationRecord withSegment(int newSegment) {
        return new IterationRecord(iter, step, time, inner, residuals, monitors, newSegment, line);
    }

    public IterationRecord withLine(long newLine) {
        return new IterationRecord(iter, step, time, inner, residuals, monitors, segment, newLine);
    }
}
