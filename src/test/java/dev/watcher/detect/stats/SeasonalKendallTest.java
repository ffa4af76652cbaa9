package dev.watcher.detect.stats;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

/** Constructed checks of the seasonal Kendall test (Hirsch, Slack & Smith 1982 [memory]), exact by algebra. */
class SeasonalKendallTest {

    @Test
    void aPatternThatOnlyRepeatsHasNoTrend() {
        // constructed, exact by algebra: every phase holds equal values, so every S_g is 0
        double[] pattern = {1, 4, 2, 8, 5};
        double[] x = new double[20];
        for (int i = 0; i < x.length; i++) {
            x[i] = pattern[i % 5];
        }
        SeasonalKendall t = SeasonalKendall.of(x, x.length, 5);
        assertEquals(0, t.s());
        assertEquals(0.0, t.slope(), 0);
        assertTrue(t.pIncreasing() >= 0.5);
        // the ordinary test on the same series sees no trend either, but only because it averages the shape out
    }

    @Test
    void aRepeatingPatternOnARampRisesInEveryPhase() {
        // constructed, exact by algebra: pattern + 0.1 i; each phase has 4 increasing values, S_g = 6, S = 30,
        // and every within-phase slope is 0.1 per sample
        double[] pattern = {1, 4, 2, 8, 5};
        double[] x = new double[20];
        for (int i = 0; i < x.length; i++) {
            x[i] = pattern[i % 5] + 0.1 * i;
        }
        SeasonalKendall t = SeasonalKendall.of(x, x.length, 5);
        assertEquals(30, t.s());
        assertEquals(0.1, t.slope(), 1e-12);
        // Var S = 5 * [4 * 3 * 13 / 18] = 43.333; z = 29 / 6.583 = 4.405
        assertEquals(5 * 4 * 3 * 13 / 18.0, t.variance(), 1e-9);
        assertTrue(t.pIncreasing() < 1e-4);
    }

    @Test
    void withOnePhaseItIsTheMannKendallTestWithItsExactSmallSampleTail() {
        // C2 of METHODS.md: x = 4.0, 4.3, 4.6, 4.9, 5.2: S = 10, exact one-sided p = 1/120
        double[] x = {4.0, 4.3, 4.6, 4.9, 5.2};
        SeasonalKendall t = SeasonalKendall.of(x, 5, 1);
        assertEquals(10, t.s());
        assertTrue(t.exact());
        assertEquals(1 / 120.0, t.pIncreasing(), 1e-12);
    }
}
