package dev.watcher.detect;

import dev.watcher.detect.stats.Cusum;
import dev.watcher.detect.stats.MannKendall;
import dev.watcher.detect.stats.TheilSen;

/**
 * The cheap per-equation state behind the rise detectors ({@code single-equation-blowup},
 * {@code family-divergence}), on log10 r (METHODS.md, blow-up onset):
 * <ul>
 * <li>every record, O(1) amortised: a one-sided CUSUM (Page 1954) on first differences standardized by a
 *     noise scale from the running mean absolute second difference (floored at {@code minScale}; a steady
 *     trend does not inflate it); an exponentially smoothed level (weight 0.3) and its minimum over the last
 *     {@code baselineWindow} records after the segment's warm-up (a sliding-window minimum: the baseline of a
 *     noisy series must be recent, or its ever lower extremes make every wander look like a rise); how much
 *     log10 r wanders around the forecast of Holt's linear smoothing (level 0.05, trend 0.02: a steady
 *     convergence rate is not wandering), learnt after the warm-up and frozen while the CUSUM signals;</li>
 * <li>{@link #candidate}: the CUSUM has signalled and the smoothed level is {@link #required} above the
 *     baseline minimum ({@code minRise} plus {@code riseNoise} standard deviations of the wandering);</li>
 * <li>{@link #late}: on demand, the Theil–Sen fit and a one-sided Mann–Kendall test (exact up to 10 points,
 *     Hamed–Rao corrected above) of the values since the baseline minimum (the late phase of a two-phase
 *     split at the minimum), at most {@code window} values.</li>
 * </ul>
 * The first {@code warmup} records of a segment set no baseline, so start-up transients and the jump after a
 * restart are not taken for a rise.
 *
 * <p>The per-record part that does not depend on the baseline window (the CUSUM, the smoothings, the noise
 * scale and the windows of values) lives in a {@link Core} that the blow-up and family detectors of one run
 * share when their parameters agree ({@link Cores}): each record is added to a core once, whichever detector
 * comes first, so the two detectors cost little more than one. Each detector keeps its own baseline
 * minimum and evaluation clock. Not thread-safe: one run's thread.
 */
final class RiseTracker {
    private static final double SMOOTH = 0.3;
    private static final double HOLT_LEVEL = 0.05;
    private static final double HOLT_TREND = 0.02;
    private static final double SCALE_WEIGHT = 0.05;
    /**
     * For white noise of standard deviation s, first differences have standard deviation s sqrt 2 and second
     * differences a mean absolute value s sqrt 6 sqrt(2/pi); their ratio, 0.7236, turns the mean absolute
     * second difference into the noise scale of the first differences.
     */
    private static final double SECOND_TO_FIRST = 0.7236;
    static final int MIN_LATE = 6;

    final String name;
    final String family;
    private final Core core;
    private final double riseNoise;
    private final double recoveredMargin;
    private final double maxRequired;
    /** The highest rise of the CUSUM episode under way (0 when none is). */
    private double episodePeak;
    /** The highest rise this equation has come back from in this segment (an episode that ended). */
    private double recoveredFrom;
    /** The baseline minimum is taken over this many of the core's latest smoothed levels. */
    private final int baselineWindow;
    /** The baseline minimum and where it lies, as of core count {@code minFor} (computed on demand). */
    private long minFor = -1;
    private double minValue;
    private long minCount;
    /** The core's count when this tracker last saw a value (a core shared with another detector). */
    private long seen;
    long lastEval = Long.MIN_VALUE / 2;

    /** A tracker on a core that other trackers of the run may share, with a detector's parameters. */
    RiseTracker(Core core, Params p) {
        this.core = core;
        this.name = core.name;
        this.family = EquationFamilies.familyOf(name);
        this.riseNoise = p.riseNoise();
        this.recoveredMargin = p.recoveredMargin();
        this.maxRequired = p.maxRequired();
        this.baselineWindow = Math.max(core.window.capacity(), p.baselineWindow());
        if (baselineWindow > core.levelCapacity()) {
            throw new IllegalArgumentException("core keeps " + core.levelCapacity() + " levels, not " + baselineWindow);
        }
    }

    /**
     * Adds the value of record {@code stamp} (a number that grows by one or more per record, the same for
     * every detector of the run); a record already added to a shared core is not added again.
     */
    void add(long stamp, long iter, double y) {
        core.add(stamp, iter, y);
        long count = core.count;
        if (count == seen) {
            return;
        }
        seen = count;
        if (count > core.warmup) {
            // the rises this equation came back from on its own set the bar for the next one
            if (core.cusum.signalled()) {
                episodePeak = Math.max(episodePeak, core.smooth - minSmooth());
            } else if (episodePeak > 0) {
                recoveredFrom = Math.max(recoveredFrom, episodePeak);
                episodePeak = 0;
            }
        }
    }

    /** Adds a value with a core of its own (tests, single detectors): every call is a new record. */
    void add(long iter, double y) {
        add(core.stamp + 1, iter, y);
    }

    long count() {
        return core.count;
    }

    /** The newest value. */
    double last() {
        return core.last;
    }

    /** The exponentially smoothed level. */
    double smooth() {
        return core.smooth;
    }

    /** Lowest raw value since the segment's warm-up (evidence only). */
    double minRaw() {
        return core.minRaw;
    }

    boolean warm() {
        return core.count > core.warmup;
    }

    /** The baseline: the lowest smoothed level over the last baselineWindow records (+infinity before). */
    double minSmooth() {
        baseline();
        return minValue;
    }

    /** The record count of the baseline minimum (the latest one when several are equal). */
    private long minAt() {
        baseline();
        return minCount;
    }

    /** Computes the baseline once per record, on demand: most records never need it. */
    private void baseline() {
        if (minFor != core.count) {
            minFor = core.count;
            minValue = core.minLevel(baselineWindow);
            minCount = core.count > core.warmup ? core.minLevelAt + core.warmup : core.count;
        }
    }

    double rise() {
        return core.smooth - minSmooth();
    }

    double cusum() {
        return core.cusum.value();
    }

    boolean cusumSignalled() {
        return core.cusum.signalled();
    }

    boolean candidate(double minRise) {
        return core.count > core.warmup && core.cusum.signalled() && rise() >= required(minRise);
    }

    /**
     * The rise that counts: {@code minRise} plus {@code riseNoise} standard deviations (1.2533 times the mean
     * absolute deviation) of the wandering around Holt's forecast: {@code minRise} on smooth histories, more
     * on noisy ones. And at least {@code recoveredMargin} above the highest rise this equation has come back
     * from in this segment (a plateau whose noise makes excursions of its own), but never more than
     * {@code maxRequired} decades for that reason: a real blow-up is still caught well before 3 decades.
     */
    double required(double minRise) {
        double noise = minRise + riseNoise * 1.2533 * core.wander;
        return Math.max(noise, Math.min(maxRequired, recoveredFrom + recoveredMargin));
    }

    /** How far the raw values fell within the window before the baseline minimum (0 when they did not). */
    double fall(double[] ys) {
        int n = core.window.copyLogs(ys);
        int since = (int) Math.min(n, core.count - minAt() + 1);
        double max = Double.NEGATIVE_INFINITY;
        for (int i = 0; i < n - since; i++) {
            max = Math.max(max, ys[i]);
        }
        return Double.isFinite(max) ? Math.max(0, max - minSmooth()) : 0;
    }

    /** The late phase: values since the baseline minimum (at most the window); null when fewer than MIN_LATE. */
    Late late(double[] xs, double[] ys) {
        int n = core.window.copyIters(xs);
        core.window.copyLogs(ys);
        int since = (int) Math.min(n, core.count - minAt() + 1);
        if (since < MIN_LATE) {
            return null;
        }
        int from = n - since;
        double[] lx = java.util.Arrays.copyOfRange(xs, from, n);
        double[] ly = java.util.Arrays.copyOfRange(ys, from, n);
        TheilSen ts = TheilSen.fit(lx, ly, since, 0.95);
        MannKendall mk = since <= MannKendall.EXACT_MAX_N ? MannKendall.of(ly, since) : MannKendall.hamedRao(ly, since);
        return new Late(ts, mk);
    }

    /** The Theil–Sen fit of the whole window (for resolution after a restart). */
    TheilSen window(double[] xs, double[] ys) {
        int n = core.window.copyIters(xs);
        core.window.copyLogs(ys);
        return TheilSen.fit(xs, ys, n, 0.95);
    }

    int size() {
        return core.window.size();
    }

    record Late(TheilSen fit, MannKendall trend) {
    }

    /**
     * A new segment: the core and this tracker's baseline start again. Every detector sharing the core
     * calls this between the same two records; resetting an already reset core changes nothing.
     */
    void reset() {
        core.reset();
        seen = 0;
        minFor = -1;
        episodePeak = 0;
        recoveredFrom = 0;
        lastEval = Long.MIN_VALUE / 2;
    }

    /**
     * The per-record state of one equation that does not depend on the baseline window. Mutable; added to
     * at most once per record ({@code stamp}); one run's thread.
     */
    static final class Core {
        final String name;
        final int warmup;
        private final double minScale;
        /** The last {@code window} iterations and values, in one ring. */
        private final Window window;
        private final Cusum cusum;
        private long stamp = Long.MIN_VALUE;
        long count;
        double last = Double.NaN;
        double smooth;
        private double holtLevel;
        private double holtTrend;
        private double wander;
        private double scale;
        private double lastD;
        double minRaw = Double.POSITIVE_INFINITY;
        // The smoothed levels after the warm-up, numbered k = 1, 2, ... (k = count - warmup): level k at
        // levels[k & mask], and the minimum of each aligned block of 16 (k >> 4) at blockMins[(k >> 4) & bmask].
        // A baseline minimum over the last w levels reads w / 16 block minima and at most 31 levels, and only
        // when asked; a record costs two stores and a comparison.
        private final double[] levels;
        private final double[] blockMins;
        private long k;
        /** The number k of the level that {@link #minLevel} found last. */
        long minLevelAt;

        Core(String name, int window, int warmup, double cusumK, double cusumH, double minScale, int levelWindow) {
            this.name = name;
            this.warmup = warmup;
            this.minScale = minScale;
            this.window = new Window(window);
            cusum = new Cusum(cusumK, cusumH, 0);
            levels = new double[Integer.highestOneBit(Math.max(16, levelWindow) * 2 - 1)];
            blockMins = new double[Integer.highestOneBit((levels.length / 16 + 2) * 2 - 1)];
        }

        /** How many of the latest levels a baseline may span. */
        int levelCapacity() {
            return levels.length;
        }

        /**
         * The lowest smoothed level among the last {@code w} after the warm-up (+infinity when there is none);
         * sets {@link #minLevelAt} to its number, the latest of equal ones (as a monotonic deque would).
         */
        double minLevel(int w) {
            long hi = k;
            long lo = Math.max(1, k - w + 1);
            double best = Double.POSITIVE_INFINITY;
            long at = -1;
            if (hi < lo) {
                minLevelAt = -1;
                return best;
            }
            int mask = levels.length - 1;
            long firstFull = (lo & 15) == 0 ? lo >> 4 : (lo >> 4) + 1;
            // the levels before the first whole block, one by one
            long upTo = Math.min(hi, (firstFull << 4) - 1);
            for (long i = lo; i <= upTo; i++) {
                double v = levels[(int) (i & mask)];
                if (v <= best) {
                    best = v;
                    at = i;
                }
            }
            // then block by block (the newest block holds exactly the levels written so far)
            long bestBlock = -1;
            int bmask = blockMins.length - 1;
            for (long b = firstFull; b <= hi >> 4; b++) {
                double v = blockMins[(int) (b & bmask)];
                if (v <= best) {
                    best = v;
                    bestBlock = b;
                }
            }
            if (bestBlock >= 0) {
                long end = Math.min(hi, (bestBlock << 4) + 15);
                for (long i = bestBlock << 4; i <= end; i++) {
                    if (levels[(int) (i & mask)] <= best) {
                        at = i;
                    }
                }
            }
            minLevelAt = at;
            return best;
        }

        void add(long at, long iter, double y) {
            if (at == stamp) {
                return;
            }
            stamp = at;
            count++;
            if (count == 1) {
                smooth = y;
                holtLevel = y;
                holtTrend = 0;
            } else {
                double d = y - last;
                cusum.add(d / Math.max(scale, minScale));
                if (count >= 3) {
                    double dd = SECOND_TO_FIRST * Math.abs(d - lastD);
                    scale = count == 3 ? dd : scale + SCALE_WEIGHT * (dd - scale);
                }
                lastD = d;
                smooth += SMOOTH * (y - smooth);
                // Holt's linear smoothing follows a steady trend without lag, so the deviation from its
                // forecast measures how the level wanders, not how fast it converges. The wandering is learnt
                // after the warm-up (not from the start-up transient) and frozen while a rise is under way, so
                // the rise does not raise its own bar.
                double forecast = holtLevel + holtTrend;
                if (count > warmup && !cusum.signalled()) {
                    wander += SCALE_WEIGHT * (Math.abs(y - forecast) - wander);
                }
                double level = forecast + HOLT_LEVEL * (y - forecast);
                holtTrend += HOLT_TREND * (level - holtLevel - holtTrend);
                holtLevel = level;
            }
            last = y;
            window.add(iter, y);
            if (count > warmup) {
                minRaw = Math.min(minRaw, y);
                k++;
                levels[(int) (k & (levels.length - 1))] = smooth;
                int b = (int) ((k >> 4) & (blockMins.length - 1));
                blockMins[b] = (k & 15) == 0 || k == 1 ? smooth : Math.min(blockMins[b], smooth);
            }
        }

        /** Starts a new segment (idempotent until the next value). */
        void reset() {
            window.clear();
            cusum.reset();
            count = 0;
            k = 0;
            scale = 0;
            lastD = 0;
            wander = 0;
            minRaw = Double.POSITIVE_INFINITY;
        }
    }

    /**
     * The cores of one run, shared by the detectors whose core parameters agree (window, warm-up, CUSUM
     * k and h, noise floor); different parameters get different cores. One run's thread.
     */
    static final class Cores {
        private final java.util.Map<java.util.List<Object>, Integer> reserved = new java.util.HashMap<>();
        private final java.util.Map<java.util.List<Object>, java.util.Map<String, Core>> byParams =
                new java.util.HashMap<>();

        private static java.util.List<Object> key(Params p) {
            return java.util.List.of(p.window(), p.warmup(), p.cusumK(), p.cusumH(), p.minScale());
        }

        /**
         * Called by each detector when it is built, before any record: the cores made for these parameters
         * keep enough levels for the longest baseline window of all the detectors that share them.
         */
        void reserve(Params p) {
            reserved.merge(key(p), p.baselineWindow(), Math::max);
        }

        /** The shared core of one equation; a private one when {@code p} asks more than was reserved. */
        Core of(String name, Params p) {
            java.util.List<Object> key = key(p);
            int levels = Math.max(p.baselineWindow(), reserved.getOrDefault(key, 0));
            Core c = byParams.computeIfAbsent(key, x -> new java.util.HashMap<>()).computeIfAbsent(name,
                    n -> new Core(n, p.window(), p.warmup(), p.cusumK(), p.cusumH(), p.minScale(), levels));
            if (c.levelCapacity() < p.baselineWindow()) {
                return new Core(name, p.window(), p.warmup(), p.cusumK(), p.cusumH(), p.minScale(),
                        p.baselineWindow());
            }
            return c;
        }
    }

    /**
     * The parameters the rise detectors have in common, read under a pattern's prefix (e.g.
     * {@code single-equation-blowup.}); the defaults are those documented by each detector, and two of them
     * differ between the detectors.
     */
    record Params(int window, double minRise, double minSlope, double alpha, int warmup, double cusumK,
            double cusumH, double minScale, double riseNoise, int baselineWindow, int evalEvery,
            double recoveredMargin, double maxRequired) {

        static Params read(DetectSettings s, String prefix, double minSlope, int baselineWindow) {
            int window = Math.max(2 * MIN_LATE, s.integer(prefix + "window", 60));
            return new Params(window,
                    s.number(prefix + "min_rise", 0.5),
                    s.number(prefix + "min_slope", minSlope),
                    s.number(prefix + "alpha", 0.01),
                    Math.max(1, s.integer(prefix + "warmup", 50)),
                    s.number(prefix + "cusum_k", 0.5),
                    s.number(prefix + "cusum_h", 5),
                    s.number(prefix + "min_scale", 0.005),
                    s.number(prefix + "rise_noise", 4),
                    Math.max(window, s.integer(prefix + "baseline_window", baselineWindow)),
                    Math.max(1, s.integer(prefix + "eval_every", 3)),
                    s.number(prefix + "recovered_margin", 0.3),
                    s.number(prefix + "max_required", 2.0));
        }
    }

    /** A fixed-capacity ring of (iteration, value) pairs, oldest first: one index for both. */
    static final class Window {
        private final double[] iters;
        private final double[] logs;
        private int start;
        private int size;

        Window(int capacity) {
            iters = new double[capacity];
            logs = new double[capacity];
        }

        void add(long iter, double y) {
            int cap = logs.length;
            int at;
            if (size < cap) {
                at = start + size;
                if (at >= cap) {
                    at -= cap;
                }
                size++;
            } else {
                at = start;
                start = start + 1 == cap ? 0 : start + 1;
            }
            iters[at] = iter;
            logs[at] = y;
        }

        int size() {
            return size;
        }

        int capacity() {
            return logs.length;
        }

        int copyIters(double[] dst) {
            return copy(iters, dst);
        }

        int copyLogs(double[] dst) {
            return copy(logs, dst);
        }

        private int copy(double[] ring, double[] dst) {
            int first = Math.min(size, ring.length - start);
            System.arraycopy(ring, start, dst, 0, first);
            System.arraycopy(ring, 0, dst, first, size - first);
            return size;
        }

        void clear() {
            start = 0;
            size = 0;
        }
    }
}
