package dev.watcher.detect;

import dev.watcher.model.Detection;
import dev.watcher.model.DetectionState;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.Severity;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.function.Consumer;

/**
 * The skeleton shared by the per-monitor condition detectors ({@code monitor-settled}, {@code
 * monitor-periodic}): each monitor's samples are kept in a window ({@link MonitorSeries}), the window is
 * judged every so many samples ({@link #judge}), and a condition (severity info) follows the judgements with
 * hysteresis, so that noise at the tolerance's edge does not flap it:
 * <ul>
 *   <li>it opens when the judgement holds on {@code open_checks} consecutive checks, the later ones judging
 *       the stretch of values the first one kept, grown by the new values (what looked settled must stay so
 *       as more of it is seen);</li>
 *   <li>it resolves only when it clearly clears: the judgement, with the tolerance widened by {@code
 *       resolve_factor} and on the values since the opening, fails on {@code clear_checks} consecutive
 *       checks, which come every {@code every} samples however full the window is;</li>
 *   <li>a window too short to judge (after a restart) neither holds nor clears an open condition.</li>
 * </ul>
 *
 * <p>Parameters ({@code pattern-id.}): {@code window} samples judged (the subclass's default), {@code every}
 * samples between judgements of a full window (an eighth of the window, {@link #DEFAULT_CHECKS_PER_WINDOW};
 * while the window fills it is judged proportionally more often), {@code open_checks} (2), {@code
 * clear_checks} (3), {@code resolve_factor} (2).
 *
 * <p>Cost per record: O(1) per monitor, without hashing in steady runs; a judgement is O(window) and runs once
 * per {@code every} samples, so the amortised cost per sample is O(window / every) = O(8) with the defaults.
 * Per-monitor detector state is looked up only when a monitor is judged; evidence is built only for a
 * detection or a snapshot.
 *
 * @param <V> the judgement's verdict
 */
abstract class MonitorConditionDetector<V extends MonitorJudge.Verdict> implements Detector {

    /**
     * Judgements per window length when {@code every} is not set: the window is judged again after an eighth
     * of it is new. A judgement costs O(window), so this keeps the cost per record independent of the window,
     * and a verdict lags the data by at most an eighth of the window it rests on.
     */
    static final int DEFAULT_CHECKS_PER_WINDOW = 8;

    /** One monitor's condition. */
    static final class Watch<V> {
        boolean open;
        int failing;
        /** Consecutive checks on which the judgement held while not open. */
        int passes;
        /**
         * Sample count (see {@link MonitorSeries.Track#count()}) at which the values that held start: those of the
         * open condition, or of the checks counted in {@code passes}; -1 when none.
         */
        long heldFrom = -1;
        V last;
        double iterationsPerSample;
        double timePerSample;
    }

    private final String pattern;
    private final String state;
    private final MonitorJudge judge;
    private final MonitorSeries series;
    private final int openChecks;
    private final int clearChecks;
    private final double resolveFactor;
    private final Map<String, Watch<V>> watches = new LinkedHashMap<>();
    private double[] scratch = new double[0];
    private int segmentSeen;

    /**
     * @param state the condition as a word for summaries ({@code settled}, {@code periodic})
     */
    MonitorConditionDetector(String pattern, String state, DetectSettings settings, int defaultWindow,
            int minWindow) {
        String p = pattern + ".";
        this.pattern = pattern;
        this.state = state;
        this.judge = new MonitorJudge(settings);
        int window = Math.max(minWindow, settings.integer(p + "window", defaultWindow));
        int every = Math.max(1, settings.integer(p + "every", Math.max(1, window / DEFAULT_CHECKS_PER_WINDOW)));
        this.series = new MonitorSeries(window, every);
        this.openChecks = Math.max(1, settings.integer(p + "open_checks", 2));
        this.clearChecks = Math.max(1, settings.integer(p + "clear_checks", 3));
        this.resolveFactor = Math.max(1, settings.number(p + "resolve_factor", 2));
    }

    /**
     * Judges a monitor's window {@code x[0..n)} with {@code judge}: {@code scale} is 1 to open, {@code
     * resolve_factor} to stay open; {@code heldFrom} is the index in x where the stretch held so far starts
     * (while open, or confirming an opening), else -1.
     */
    abstract V judge(MonitorJudge judge, double[] x, int n, double scale, int heldFrom);

    /** Where the values that opened the condition start in the judged window (the sample index). */
    int heldStart(V verdict) {
        return 0;
    }

    /**
     * The evidence of a verdict; built only for a detection or a snapshot, not at every judgement. The window's
     * iterations and physical time per sample are those of the judgement.
     */
    abstract Map<String, Object> evidence(V verdict, double iterationsPerSample, double timePerSample);

    abstract String openSummary(String name, V verdict, Map<String, Object> evidence);


    /** A monitor's entry in the snapshot. */
    abstract Map<String, Object> snapshotOf(V verdict, boolean open, Map<String, Object> evidence);

    final MonitorSeries series() {
        return series;
    }

    @Override
    public final void observe(IterationRecord record, Consumer<Detection> out) {
        if (record.segment() != segmentSeen) {
            segment(record.segment(), record.iter(), out);
        }
        if (!series.accept(record)) {
            return;
        }
        List<MonitorSeries.Track> due = series.due();
        for (int i = 0; i < due.size(); i++) {
            check(due.get(i), out);
        }
    }

    private void check(MonitorSeries.Track t, Consumer<Detection> out) {
        Watch<V> w = watches.computeIfAbsent(t.name(), k -> new Watch<>());
        if (scratch.length < t.size()) {
            scratch = new double[t.size()];
        }
        int n = t.copyValues(scratch);
        long first = t.count() - n;
        V v;
        if (w.open) {
            v = judge(judge, scratch, n, resolveFactor, held(w, first));
            if (v.holds() || v.inconclusive()) {
                w.failing = 0;
            } else if (++w.failing >= clearChecks) {
                w.open = false;
                w.failing = 0;
                w.passes = 0;
                w.heldFrom = -1;
                remember(w, t, v);
                t.fullPace(false);
                out.accept(new Detection(pattern, DetectionState.RESOLVED, Severity.INFO, t.lastIteration(),
                        List.of(), t.name(), t.name() + " no longer " + state + ": " + v.reason(), "",
                        evidence(v, w.iterationsPerSample, w.timePerSample)));
                return;
            }
            remember(w, t, v);
            return;
        }
        v = null;
        if (w.heldFrom >= 0) {
            // a stretch that held at the previous check: it must hold again as it grows
            v = judge(judge, scratch, n, 1, held(w, first));
            if (v.holds()) {
                w.passes++;
            } else {
                w.heldFrom = -1;
                w.passes = 0;
            }
        }
        if (w.heldFrom < 0) {
            v = judge(judge, scratch, n, 1, -1);
            if (v.holds()) {
                w.passes = 1;
                w.heldFrom = first + heldStart(v);
            }
        }
        remember(w, t, v);
        if (w.passes >= openChecks) {
            w.open = true;
            t.fullPace(true);
            w.failing = 0;
            Map<String, Object> e = evidence(v, w.iterationsPerSample, w.timePerSample);
            out.accept(new Detection(pattern, DetectionState.OPEN, Severity.INFO, t.lastIteration(), List.of(),
                    t.name(), openSummary(t.name(), v, e), "", e));
        }
    }

    /** The index in the judged window where the stretch being held starts (0 once it reaches past the window). */
    private static int held(Watch<?> w, long first) {
        return (int) Math.max(0, w.heldFrom - first);
    }

    private void remember(Watch<V> w, MonitorSeries.Track t, V v) {
        w.last = v;
        w.iterationsPerSample = t.iterationsPerSample();
        w.timePerSample = t.timePerSample();
    }

    /**
     * A new segment: the windows start afresh. Open conditions stay open (a restart does not unsettle a
     * monitor by itself) and are judged again once the new window is long enough, on whatever its own
     * judgement keeps, since the values they opened on are gone.
     */
    @Override
    public void segment(int segment, long iter, Consumer<Detection> out) {
        segmentSeen = segment;
        series.reset();
        for (Watch<V> w : watches.values()) {
            w.heldFrom = -1;
            if (!w.open) {
                w.passes = 0;
            }
        }
    }

    /** Per monitor: {@link #snapshotOf} the latest judgement. */
    @Override
    public Map<String, Object> snapshot() {
        Map<String, Object> m = new LinkedHashMap<>();
        watches.forEach((name, w) -> {
            if (w.last != null) {
                m.put(name, snapshotOf(w.last, w.open, evidence(w.last, w.iterationsPerSample, w.timePerSample)));
            }
        });
        return EvidenceNames.finite(Map.of("monitors", m));
    }
}
