package dev.watcher.detect;

import dev.watcher.model.Samples;

/**
 * log10 of a record's residuals, computed once per record and shared by the detectors of one run that work
 * on the log scale ({@link Detectors#standard} hands one instance to each of them; a detector built alone
 * makes its own). Keyed by the identity of the record's {@link Samples}: the values of a {@code Samples}
 * never change, so the same instance always has the same logs. NaN stands for a value with no logarithm
 * (zero, negative, NaN, infinite), as {@link Log10#of}.
 *
 * <p>It also holds what else the detectors of a run share per record: a record stamp and the rise
 * trackers' cores.
 *
 * <p>The returned array is reused for the next record: read it within the same {@code observe} call, never
 * keep it. Confined to the run's thread; not thread-safe.
 */
final class ResidualLogs {
    private Samples last;
    private long stamp;
    private double[] logs = new double[8];
    /** The rise detectors' shared per-equation state (see {@link RiseTracker.Cores}). */
    final RiseTracker.Cores rises = new RiseTracker.Cores();

    /** The log10 of each residual of {@code res}, index for index (valid until the next call). */
    double[] of(Samples res) {
        if (res != last) {
            double[] v = res.values();
            if (logs.length < v.length) {
                logs = new double[Math.max(v.length, 2 * logs.length)];
            }
            for (int i = 0; i < v.length; i++) {
                logs[i] = Log10.of(v[i]);
            }
            last = res;
            stamp++;
        }
        return logs;
    }

    /** A number that grows by one with each new record seen by {@link #of}: the current record's stamp. */
    long stamp() {
        return stamp;
    }
}
