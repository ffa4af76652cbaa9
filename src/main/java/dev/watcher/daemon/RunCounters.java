package dev.watcher.daemon;

import dev.watcher.model.Malformed;
import java.util.EnumMap;
import java.util.LinkedHashMap;
import java.util.Map;
import java.util.concurrent.atomic.AtomicLong;

/**
 * Per-run counters: lines read, records made, malformed input by kind, detections by pattern. Written on
 * the run's thread, read by the live view and metrics from any thread.
 */
public final class RunCounters {
    final AtomicLong lines = new AtomicLong();
    final AtomicLong records = new AtomicLong();
    final AtomicLong segments = new AtomicLong();
    private final Map<Malformed, AtomicLong> malformed = new EnumMap<>(Malformed.class);

    RunCounters() {
        for (Malformed m : Malformed.values()) {
            malformed.put(m, new AtomicLong());
        }
    }

    public long lines() {
        return lines.get();
    }

    public long records() {
        return records.get();
    }

    public long malformed(Malformed kind) {
        return malformed.get(kind).get();
    }

    public long malformedTotal() {
        long s = 0;
        for (AtomicLong a : malformed.values()) {
            s += a.get();
        }
        return s;
    }

    /**
     * Counts lines read. One writer (the run's thread): a plain read and an ordered write, no atomic
     * read-modify-write per line; readers on other threads see the count a moment later at worst.
     */
    void addLines(long n) {
        lines.setRelease(lines.getPlain() + n);
    }

    /** Counts one record made (one writer, as {@link #addLines}). */
    void addRecord() {
        records.setRelease(records.getPlain() + 1);
    }

    long countMalformed(Malformed kind) {
        return malformed.get(kind).incrementAndGet();
    }

    /** The counters as plain values (for the run state file and the end-of-run summary). */
    public Map<String, Object> toMap() {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("lines", lines.get());
        m.put("records", records.get());
        m.put("segments", segments.get());
        Map<String, Object> bad = new LinkedHashMap<>();
        malformed.forEach((k, v) -> {
            if (v.get() > 0) {
                bad.put(k.id(), v.get());
            }
        });
        m.put("malformed", bad);
        return m;
    }
}
