package dev.watcher.rules;

import dev.watcher.model.Severity;
import dev.watcher.model.StopGate;
import java.time.Duration;

/**
 * Whether the rules allow stopping a run's job for one pattern, and the gate a stop must pass. Every field
 * may be null, meaning "not said here": a later layer (a user's file that extends the default, a per-run
 * override) replaces only what it says, see {@link #over}.
 *
 * @param allowed        the rules allow a stop for this pattern (stopping also needs {@code --stop})
 * @param atSeverity     the least severity (after the rules rewrote it) at which a stop is requested
 * @param persistRecords the condition persisted for this many records
 * @param persistFor     and for this much wall time
 * @param minRunAge      the run is at least this old
 * @param afterSegment   at least this long since the last new segment (a restart looks like a jump)
 */
public record StopRule(Boolean allowed, Severity atSeverity, Integer persistRecords, Duration persistFor,
        Duration minRunAge, Duration afterSegment) {

    /** Nothing said: no stop. */
    public static final StopRule UNSET = new StopRule(null, null, null, null, null, null);

    /** This rule with the fields {@code top} says laid over it. */
    public StopRule over(StopRule top) {
        if (top == null) {
            return this;
        }
        return new StopRule(pick(top.allowed, allowed), pick(top.atSeverity, atSeverity),
                pick(top.persistRecords, persistRecords), pick(top.persistFor, persistFor),
                pick(top.minRunAge, minRunAge), pick(top.afterSegment, afterSegment));
    }

    public boolean isAllowed() {
        return Boolean.TRUE.equals(allowed);
    }

    /** The gate, with {@link StopGate#DEFAULT}'s values where this rule says nothing. */
    public StopGate gate() {
        StopGate d = StopGate.DEFAULT;
        return new StopGate(pick(persistRecords, d.persistRecords()), pick(persistFor, d.persistFor()),
                pick(minRunAge, d.minRunAge()), pick(afterSegment, d.afterSegment()));
    }

    /** The least severity that may stop; critical when unsaid. */
    public Severity threshold() {
        return atSeverity == null ? Severity.CRITICAL : atSeverity;
    }

    static <T> T pick(T preferred, T fallback) {
        return preferred != null ? preferred : fallback;
    }
}
