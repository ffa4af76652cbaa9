package dev.watcher.model;

import java.time.Duration;

/**
 * What must hold before a stop may act: the condition persisted for {@code persistRecords} records and
 * {@code persistFor} of wall time, the run is at least {@code minRunAge} old, and at least
 * {@code afterSegment} has passed since the last new segment (a restart looks like a jump).
 */
public record StopGate(int persistRecords, Duration persistFor, Duration minRunAge, Duration afterSegment) {

    public static final StopGate DEFAULT = new StopGate(20, Duration.ofSeconds(10), Duration.ofMinutes(2),
            Duration.ofMinutes(1));
}
