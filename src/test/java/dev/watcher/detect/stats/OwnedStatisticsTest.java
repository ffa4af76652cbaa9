package dev.watcher.detect.stats;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Random;
import org.junit.jupiter.api.Test;

/** Checks of MSER-5, batch means, Fisher's g, the periodogram period and the geometric-decay estimates. */
class OwnedStatisticsTest {

    @Test
    void aitkenRecoversTheLimitOfAGeometricMonitorExactly() {
        // C5 of METHODS.md: phi_n = 1 + 0.5 * 0.9^n, constructed, exact by algebra (Aitken's delta-squared is
        // exact on a geometric sequence); only floating-point rounding separates the result from 1.0.
        double x3 = 1 + 0.5 * Math.pow(0.9, 3);
        double x4 = 1 + 0.5 * Math.pow(0.9, 4);
        double x5 = 1 + 0.5 * Math.pow(0.9, 5);
        assertEquals(1.0, GeometricDecay.aitken(x3, x4, x5), 1e-13);
        GeometricDecay g = GeometricDecay.of(x3, x4, x5);
        assertTrue(g.valid());
        assertEquals(0.9, g.lambda(), 1e-12);
        assertEquals(1.0, g.limit(), 1e-13);
        // remaining error of x5 is 0.5 * 0.9^5 by construction (the Ferziger & Peric geometric estimate)
        assertEquals(0.5 * Math.pow(0.9, 5), g.remainingError(), 1e-13);
    }

    @Test
    void blockMeansOfAGeometricSequenceGiveTheSameLimit() {
        // constructed, exact by algebra: block means of phi_n = 2 - 0.3 * 0.99^n are geometric with 0.99^block
        double[] x = new double[300];
        for (int i = 0; i < x.length; i++) {
            x[i] = 2 - 0.3 * Math.pow(0.99, i);
        }
        GeometricDecay g = GeometricDecay.ofBlocks(x, x.length, 50);
        assertNotNull(g);
        assertTrue(g.valid());
        assertEquals(Math.pow(0.99, 50), g.lambda(), 1e-9);
        assertEquals(2.0, g.limit(), 1e-9);
        assertNull(GeometricDecay.ofBlocks(x, 100, 50));
    }

    @Test
    void aDivergingSequenceHasNoGeometricLimit() {
        assertFalse(GeometricDecay.of(1, 2, 4).valid());
    }

    @Test
    void batchMeansHalfWidthMatchesTheStudentTTable() {
        // constructed: 10 batches of 4 values whose batch means are exactly 1, 2, ..., 10. The standard deviation
        // of 1..10 is sqrt(55/6) = 3.0276504; t(9, 0.975) = 2.262157 (standard t table, e.g. Abramowitz &
        // Stegun table 26.10 [memory]); half-width = 2.262157 * 3.0276504 / sqrt(10) = 2.165868.
        double[] x = new double[40];
        for (int j = 0; j < 10; j++) {
            double mean = j + 1;
            x[4 * j] = mean - 0.5;
            x[4 * j + 1] = mean + 0.5;
            x[4 * j + 2] = mean - 0.25;
            x[4 * j + 3] = mean + 0.25;
        }
        BatchMeans b = BatchMeans.of(x, 0, 40, 10, 0.95);
        assertNotNull(b);
        assertEquals(4, b.batchSize());
        assertEquals(5.5, b.mean(), 1e-12);
        assertEquals(2.262157, BatchMeans.tQuantile(9, 0.975), 1e-6);
        assertEquals(2.262157 * 3.0276504 / Math.sqrt(10), b.halfWidth(), 1e-5);
    }

    @Test
    void batchMeansLeavesOutTheEarliestLeftoverValues() {
        double[] x = {100, 1, 1, 2, 2};
        BatchMeans b = BatchMeans.of(x, 0, 5, 2, 0.95);
        assertEquals(1.5, b.mean(), 1e-12);
        assertNull(BatchMeans.of(x, 0, 3, 2, 0.95));
    }

    @Test
    void fisherGCriticalValuesMatchThePublishedTable() {
        // 5 % critical values of Fisher's g for m ordinates: m = 5: 0.6838, m = 10: 0.4450, m = 20: 0.2704
        // (Fisher 1929 table, as reprinted e.g. in Wei, Time Series Analysis [memory]; scipy.optimize.brentq on
        // the closed form gives 0.683772, 0.444953, 0.270404).
        assertEquals(0.05, FisherG.pValue(0.683772, 5), 1e-5);
        assertEquals(0.05, FisherG.pValue(0.444953, 10), 1e-5);
        assertEquals(0.05, FisherG.pValue(0.270404, 20), 1e-5);
    }

    @Test
    void fisherGPValueAgreesWithASimulationOfWhiteNoise() {
        // computed reference: periodogram ordinates of Gaussian white noise are independent exponentials, so
        // the tail of g = max / sum can be simulated; 40000 draws give a standard error below 0.0025.
        Random rng = new Random(12345);
        int m = 10;
        int draws = 40000;
        int over = 0;
        double[] ord = new double[m];
        for (int d = 0; d < draws; d++) {
            for (int k = 0; k < m; k++) {
                ord[k] = -Math.log(1 - rng.nextDouble());
            }
            if (FisherG.of(ord, m).g() > 0.3) {
                over++;
            }
        }
        assertEquals((double) over / draws, FisherG.pValue(0.3, m), 0.01);
    }

    @Test
    void periodogramFindsAPeriodHiddenInNoiseAndWhiteNoiseIsNotSignificant() {
        Random rng = new Random(7);
        double[] x = new double[1000];
        double[] w = new double[1000];
        for (int i = 0; i < x.length; i++) {
            w[i] = rng.nextGaussian();
            x[i] = 3.0 + 0.02 * i + Math.sin(2 * Math.PI * i / 37.0) + 0.5 * w[i];
        }
        Periodogram p = Periodogram.of(x, x.length);
        assertEquals(512, p.length());
        assertEquals(37.0, p.period(), 1.0);
        assertTrue(p.fisher().pValue() < 1e-6, "p = " + p.fisher().pValue());
        Periodogram noise = Periodogram.of(w, w.length);
        assertTrue(noise.fisher().pValue() > 0.01, "p = " + noise.fisher().pValue());
        assertNull(Periodogram.of(x, 10));
    }

    @Test
    void firstAutocorrelationPeakFindsTheRepeatOfAPattern() {
        double[] x = new double[30];
        double[] pattern = {1, 3, 2, 0.5, 2.5};
        for (int i = 0; i < x.length; i++) {
            x[i] = pattern[i % 5];
        }
        assertEquals(5, Periodogram.firstAutocorrelationPeak(x, x.length, 2, 10, 0.3));
    }

    @Test
    void mserCutsAConstructedStepTransientExactly() {
        // constructed, exact by algebra: 50 values at 5 (ten batches) then 200 values alternating 0 +/- 0.1, whose
        // batches of five have means +/- 0.02; keeping any of the first ten batches adds a large squared
        // deviation, so the minimum of MSER lies at the first batch after the step.
        double[] x = new double[250];
        for (int i = 0; i < x.length; i++) {
            x[i] = i < 50 ? 5 : ((i % 2 == 0) ? 0.1 : -0.1);
        }
        Mser m = Mser.of(x, x.length);
        assertEquals(50, m.truncation());
        assertTrue(m.reliable());
    }

    @Test
    void mserCutsAnExponentialTransientWhereItSinksIntoTheNoise() {
        // constructed: 10 exp(-i/20) plus unit-variance noise: the transient falls below a tenth of the noise
        // level after about 20 ln(100) = 92 values and is gone in practice before 150.
        Random rng = new Random(3);
        double[] x = new double[2000];
        for (int i = 0; i < x.length; i++) {
            x[i] = 10 * Math.exp(-i / 20.0) + rng.nextGaussian();
        }
        Mser m = Mser.of(x, x.length);
        assertTrue(m.truncation() >= 20 && m.truncation() <= 150, "cut at " + m.truncation());
        assertTrue(m.reliable());
    }

    @Test
    void mserFlagsATransientThatLastsTheWholeSeries() {
        double[] x = new double[200];
        for (int i = 0; i < x.length; i++) {
            x[i] = 1.0 / (1 + i) + 1e-4 * ((i % 2) - 0.5);
        }
        Mser m = Mser.of(x, x.length);
        assertTrue(m.truncation() > 100, "cut at " + m.truncation());
        assertFalse(m.reliable());
    }
}
