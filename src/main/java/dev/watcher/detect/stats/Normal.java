package dev.watcher.detect.stats;

import org.apache.commons.math3.special.Erf;

/** Standard normal tails and quantiles, from Commons Math's error function and its inverse. */
final class Normal {
    private Normal() {
    }

    /** P(Z &gt; z). */
    static double upperTail(double z) {
        return 0.5 * Erf.erfc(z / Math.sqrt(2));
    }

    /** The p-quantile. */
    static double quantile(double p) {
        return Math.sqrt(2) * Erf.erfInv(2 * p - 1);
    }
}
