package dev.watcher.parse;

import dev.watcher.model.IterationRecord;
import java.util.Map;
import java.util.TreeMap;
import java.util.function.Consumer;

/**
 * Joins the records of several sources that feed one run (residuals written to one file, monitors to
 * another) on the iteration: the records of all sources for the same segment and iteration become one
 * record whose residuals and monitors are those of every part, in source order (a name given by two
 * sources keeps the later source's value). Merged records leave in (segment, iteration) order once every
 * source has reached that point.
 *
 * <p>Bounded: at most {@code maxPending} iterations wait; past that the oldest leaves with what it has (a
 * source lagging too far, or one that has not started writing, does not hold the run back for ever). A
 * record arriving for a point already passed is counted in {@link #late()} and dropped, so records never
 * leave out of order. Segments come from each source's own parser: sources that restart together number
 * their segments alike.
 *
 * <p>Not thread-safe: one per run, called on the run's thread. Pure: no I/O, no clock.
 */
public final class RecordJoiner {

    /** The default bound on waiting iterations. */
    public static final int DEFAULT_MAX_PENDING = 4096;

    private final int sources;
    private final int maxPending;
    private final Key[] reached;
    private final TreeMap<Key, IterationRecord[]> pending = new TreeMap<>();
    private final Assembly residuals = new Assembly(Repeated.LAST);
    private final Assembly monitors = new Assembly(Repeated.LAST);
    private Key emitted;
    private long late;

    /** A joiner for {@code sources} sources numbered 0.. sources-1, with the default bound. */
    public RecordJoiner(int sources) {
        this(sources, DEFAULT_MAX_PENDING);
    }

    /** A joiner for {@code sources} sources keeping at most {@code maxPending} iterations waiting. */
    public RecordJoiner(int sources, int maxPending) {
        if (sources < 1 || maxPending < 1) {
            throw new IllegalArgumentException("sources and maxPending must be positive");
        }
        this.sources = sources;
        this.maxPending = maxPending;
        this.reached = new Key[sources];
    }

    /** Position of one record: segment first, then iteration. */
    private record Key(int segment, long iter) implements Comparable<Key> {
        @Override
        public int compareTo(Key o) {
            int c = Integer.compare(segment, o.segment);
            return c != 0 ? c : Long.compare(iter, o.iter);
        }
    }

    /**
     * One record from {@code source}; merged records that became complete go to {@code out}, in order.
     * With a single source, records pass through unchanged.
     */
    public void accept(int source, IterationRecord r, Consumer<IterationRecord> out) {
        if (source < 0 || source >= sources) {
            throw new IllegalArgumentException("source " + source + " not in 0.." + (sources - 1));
        }
        Key key = new Key(r.segment(), r.iter());
        if (emitted != null && key.compareTo(emitted) <= 0) {
            late++;
            return;
        }
        pending.computeIfAbsent(key, k -> new IterationRecord[sources])[source] = r;
        if (reached[source] == null || key.compareTo(reached[source]) > 0) {
            reached[source] = key;
        }
        Key all = null;
        for (Key k : reached) {
            if (k == null) {
                all = null;
                break;
            }
            if (all == null || k.compareTo(all) < 0) {
                all = k;
            }
        }
        while (!pending.isEmpty()) {
            Map.Entry<Key, IterationRecord[]> first = pending.firstEntry();
            boolean ready = all != null && first.getKey().compareTo(all) <= 0;
            if (!ready && pending.size() <= maxPending) {
                break;
            }
            pending.pollFirstEntry();
            emit(first.getKey(), first.getValue(), out);
        }
    }

    /** Emits everything still waiting, in order (end of input, or shutdown). */
    public void flush(Consumer<IterationRecord> out) {
        while (!pending.isEmpty()) {
            Map.Entry<Key, IterationRecord[]> first = pending.pollFirstEntry();
            emit(first.getKey(), first.getValue(), out);
        }
    }

    /** Records dropped because they arrived after their iteration had already left. */
    public long late() {
        return late;
    }

    /** Iterations waiting for a lagging source. */
    public int pending() {
        return pending.size();
    }

    private void emit(Key key, IterationRecord[] parts, Consumer<IterationRecord> out) {
        emitted = key;
        IterationRecord only = null;
        int n = 0;
        for (IterationRecord p : parts) {
            if (p != null) {
                only = p;
                n++;
            }
        }
        if (n == 1) {
            out.accept(only);
            return;
        }
        residuals.begin();
        monitors.begin();
        long step = IterationRecord.NONE;
        long inner = IterationRecord.NONE;
        double time = Double.NaN;
        long line = -1;
        for (IterationRecord p : parts) {
            if (p == null) {
                continue;
            }
            for (int i = 0; i < p.residuals().size(); i++) {
                residuals.put(p.residuals().name(i), p.residuals().value(i));
            }
            for (int i = 0; i < p.monitors().size(); i++) {
                monitors.put(p.monitors().name(i), p.monitors().value(i));
            }
            if (step == IterationRecord.NONE) {
                step = p.step();
            }
            if (inner == IterationRecord.NONE) {
                inner = p.inner();
            }
            if (Double.isNaN(time)) {
                time = p.time();
            }
            if (line < 0) {
                line = p.line();
            }
        }
        out.accept(new IterationRecord(key.iter(), step, time, inner, residuals.finish(), monitors.finish(),
                key.segment(), line));
    }
}
