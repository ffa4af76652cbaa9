package dev.watcher.daemon;

import dev.watcher.detect.Detector;
import dev.watcher.model.Detection;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.LineParser;
import dev.watcher.model.Malformed;
import dev.watcher.model.Notice;
import dev.watcher.model.ParseSink;
import dev.watcher.model.PendingEvent;
import dev.watcher.model.Samples;
import dev.watcher.parse.RecordJoiner;
import dev.watcher.rules.Decider;
import dev.watcher.rules.Decision;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.EnumMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.function.Consumer;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * One run's synchronous path: lines -> parsers (joined on the iteration when several files feed the run)
 * -> records -> detectors -> rules -> outputs. Used alike by {@code watch} (fed by followers) and
 * {@code replay} (fed by a whole-file reader), so both give the same detections in the same order.
 *
 * <p>A run's lines come either straight through {@link #line} or, for a long read, through a {@link ReadAhead}
 * that parses on a reader thread and hands the parsed items to {@link #parsed}, {@link #segmentParsed} and
 * {@link #malformed} in the same order.
 *
 * <p>Confined to the run's thread (the parsers to whichever thread a {@link ReadAhead} lends them to while it
 * reads); not thread-safe. Never throws on bad input: malformed lines are counted
 * per kind and logged at most once per kind per minute.
 */
final class RunPipeline {

    private static final Logger LOG = LoggerFactory.getLogger(RunPipeline.class);

    private final String run;
    private final List<LineParser> parsers;
    private final RecordJoiner joiner;
    private final List<Detector> detectors;
    /** The detectors as an array, and one sink for all their detections: nothing is allocated per call. */
    private final Detector[] detectorArray;
    private final Consumer<Detection> detections = this::onDetection;
    private final Consumer<IterationRecord> records = this::onRecord;
    private final Decider decider;
    private final RunOutputs out;
    private final RunCounters counters;
    private final Clock clock;
    private final Map<Malformed, Instant> lastLogged = new EnumMap<>(Malformed.class);
    private final List<Sink> sinks = new ArrayList<>();
    private IterationRecord last;
    private int segment;
    /** Detectors from this index on may be lent to a read-ahead's thread as a {@link Lane}. */
    private final int laneFrom;
    /** The run's thread observes detectors [0, observeTo): all of them unless the lane is lent. */
    private int observeTo;
    private Lane lent;

    RunPipeline(String run, List<LineParser> parsers, List<Detector> detectors, Decider decider, RunOutputs out,
            RunCounters counters, Clock clock, int joinBound) {
        this(run, parsers, detectors, decider, out, counters, clock, joinBound, detectors.size());
    }

    /**
     * @param laneFrom detectors from this index on share no state with the ones before (see
     *                 {@code Detectors.SECOND_LANE_FROM}); {@code detectors.size()} for none to lend
     */
    RunPipeline(String run, List<LineParser> parsers, List<Detector> detectors, Decider decider, RunOutputs out,
            RunCounters counters, Clock clock, int joinBound, int laneFrom) {
        this.run = run;
        this.parsers = List.copyOf(parsers);
        this.joiner = parsers.size() > 1 ? new RecordJoiner(parsers.size(), joinBound) : null;
        this.detectors = List.copyOf(detectors);
        this.detectorArray = this.detectors.toArray(new Detector[0]);
        this.laneFrom = Math.max(0, Math.min(laneFrom, detectorArray.length));
        this.observeTo = detectorArray.length;
        this.decider = decider;
        this.out = out;
        this.counters = counters;
        this.clock = clock;
        for (int i = 0; i < parsers.size(); i++) {
            sinks.add(new Sink(i));
        }
    }

    String run() {
        return run;
    }

    RunCounters counters() {
        return counters;
    }

    /** The latest record, or null before the first. */
    IterationRecord last() {
        return last;
    }

    long lastIter() {
        return last == null ? 0 : last.iter();
    }

    List<Detector> detectors() {
        return detectors;
    }

    /** One complete line of source {@code source} (0-based, in the order the sources were given). */
    void line(int source, CharSequence line, long lineNo) {
        counters.addLines(1);
        parsers.get(source).accept(line, lineNo, sinks.get(source));
    }

    /** The parser of source {@code source}, for a {@link ReadAhead} to run on its reader thread. */
    LineParser parser(int source) {
        return parsers.get(source);
    }

    /** {@code n} lines read by a {@link ReadAhead} (counted as {@link #line} counts them). */
    void linesRead(long n) {
        if (n > 0) {
            counters.addLines(n);
        }
    }

    /** A record the parser of {@code source} made (joined with the other sources' when there are several). */
    void parsed(int source, IterationRecord record) {
        if (joiner == null) {
            onRecord(record, null);
        } else {
            joiner.accept(source, record, records);
        }
    }

    /** A record a read-ahead made, with what the lent detectors found in it on the reader thread. */
    void parsed(IterationRecord record, List<Detection> fromLane) {
        onRecord(record, fromLane);
    }

    /** A new segment the parser recognised, before the first record of that segment. */
    void segmentParsed(int seg, long lineNo, String reason) {
        onSegment(seg, lineNo, reason, null);
    }

    /** A new segment a read-ahead's parser recognised, with what the lent detectors emitted for it. */
    void segmentParsed(int seg, long lineNo, String reason, List<Detection> fromLane) {
        onSegment(seg, lineNo, reason, fromLane);
    }

    /**
     * Lends the detectors from {@code laneFrom} on to a read-ahead, which runs them on its reader thread
     * right after parsing, record by record; the run's thread then runs only the others and passes on the
     * lane's detections after their own, record by record, so the timeline is the same as with one thread.
     * Null when there is nothing to lend, or when records are joined from several sources (the join happens
     * on the run's thread). Until {@link #returnLane}, only the read-ahead's thread may touch the lane.
     */
    Lane lendLane() {
        if (joiner != null || laneFrom >= detectorArray.length || lent != null) {
            return null;
        }
        lent = new Lane(segment, lastIter());
        observeTo = laneFrom;
        return lent;
    }

    /** The read-ahead is done with the lane (its reader thread has handed over its last batch). */
    void returnLane() {
        lent = null;
        observeTo = detectorArray.length;
    }

    /**
     * The lent detectors, driven by a read-ahead's reader thread in the order the parser emits records and
     * segments; it mirrors the run's thread's segment filter and last iteration.
     */
    final class Lane {
        // The lane's own copies of what it reads for every record: read through RunPipeline.this, they would
        // share a cache line with the fields the run's thread writes for every record (the last record), and
        // the two cores would pass that line back and forth record after record.
        private final Detector[] lentDetectors = detectorArray;
        private final int from = laneFrom;
        private int laneSegment;
        private long laneLastIter;
        private List<Detection> found;
        private final Consumer<Detection> collect = d -> {
            if (found == null) {
                found = new ArrayList<>(2);
            }
            found.add(d);
        };

        private Lane(int segment, long lastIter) {
            this.laneSegment = segment;
            this.laneLastIter = lastIter;
        }

        /** Runs the lent detectors over a record; their detections, or null when there were none. */
        List<Detection> record(IterationRecord r) {
            laneLastIter = r.iter();
            Detector[] ds = lentDetectors;
            for (int i = from; i < ds.length; i++) {
                ds[i].observe(r, collect);
            }
            return take();
        }

        /** Passes a new segment to the lent detectors (unless the run's thread will ignore it too). */
        List<Detection> segment(int seg) {
            if (seg <= laneSegment) {
                return null;
            }
            laneSegment = seg;
            for (int i = from; i < lentDetectors.length; i++) {
                lentDetectors[i].segment(seg, laneLastIter, collect);
            }
            return take();
        }

        private List<Detection> take() {
            List<Detection> f = found;
            found = null;
            return f;
        }
    }

    /** Bad input found below the parser (the reader): counted and skipped like a malformed line. */
    void malformed(Malformed kind, long lineNo, String detail) {
        long n = counters.countMalformed(kind);
        out.malformed(kind, lineNo, detail);
        Instant now = clock.instant();
        Instant prev = lastLogged.get(kind);
        if (prev == null || Duration.between(prev, now).compareTo(Duration.ofMinutes(1)) >= 0) {
            lastLogged.put(kind, now);
            LOG.warn("{}: skipped {} input at line {} ({}); {} so far", run, kind.id(), lineNo, detail, n);
        }
    }

    /** End of the input for now: a record still being assembled is emitted if complete. */
    void flush() {
        for (int i = 0; i < parsers.size(); i++) {
            parsers.get(i).flush(sinks.get(i));
        }
        if (joiner != null) {
            joiner.flush(records);
        }
    }

    /** Rules' time-driven notices (grouping waits, reminders). */
    void tick() {
        for (Notice n : decider.tick()) {
            out.notice(n);
        }
    }

    /** A detection that did not come from a detector (the silence watchdog) goes through the rules too. */
    void external(Detection d) {
        if (d.iter() <= 0 && last != null) {
            // the watchdog counts wall time, not passes: the event refers to the last record seen
            d = new Detection(d.pattern(), d.state(), d.severity(), last.iter(), d.equations(), d.monitor(),
                    d.summary(), d.remedy(), d.evidence());
        }
        onDetection(d);
    }

    Decider decider() {
        return decider;
    }

    /** The latest residual and monitor values by name (residuals first), for notices. */
    Map<String, Double> lastValues() {
        Map<String, Double> m = new LinkedHashMap<>();
        if (last != null) {
            put(m, last.residuals());
            put(m, last.monitors());
        }
        return m;
    }

    private static void put(Map<String, Double> m, Samples s) {
        for (int i = 0; i < s.size(); i++) {
            m.put(s.name(i), s.value(i));
        }
    }

    private void onRecord(IterationRecord r) {
        onRecord(r, null);
    }

    private void onRecord(IterationRecord r, List<Detection> fromLane) {
        counters.addRecord();
        last = r;
        out.record(r);
        Consumer<Detection> sink = detections;
        Detector[] ds = detectorArray;
        for (int i = 0, n = observeTo; i < n; i++) {
            ds[i].observe(r, sink);
        }
        if (fromLane != null) {
            for (Detection d : fromLane) {
                onDetection(d);
            }
        }
    }

    private void onSegment(int seg, long lineNo, String reason, List<Detection> fromLane) {
        if (seg <= segment) {
            return;
        }
        segment = seg;
        counters.segments.incrementAndGet();
        long iter = lastIter();
        out.event(PendingEvent.run(run, iter, "segment", reason + " (line " + lineNo + ")"));
        for (int i = 0; i < observeTo; i++) {
            detectorArray[i].segment(seg, iter, detections);
        }
        if (fromLane != null) {
            for (Detection d : fromLane) {
                onDetection(d);
            }
        }
        out.segment(seg, iter);
    }

    private void onDetection(Detection d) {
        Decision dec = decider.decide(d, lastValues());
        out.event(PendingEvent.detection(run, dec.detection()));
        for (Notice n : dec.notices()) {
            out.notice(n);
        }
        if (dec.stop() != null) {
            out.stop(dec.stop());
        }
    }

    private final class Sink implements dev.watcher.model.ParseSink {
        private final int source;

        Sink(int source) {
            this.source = source;
        }

        @Override
        public void record(IterationRecord record) {
            parsed(source, record);
        }

        @Override
        public void segment(int seg, long line, String reason) {
            segmentParsed(seg, line, reason);
        }

        @Override
        public void malformed(Malformed kind, long line, String detail) {
            RunPipeline.this.malformed(kind, line, detail);
        }
    }

}
