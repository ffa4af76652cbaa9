package dev.watcher.detect.stats;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Random;
import org.junit.jupiter.api.Test;

/**
 * The correlation-widened batch-means interval and the O(N) form of Fisher's g test that the monitor judgements
 * use.
 */
class BatchCorrelationAndSpectrumTest {

    @Test
    void lagOneCorrelationOfARampOfBatchMeansIsExactByAlgebra() {
        // exact by algebra: batch means 1..10, deviations d_i = i - 5.5, sum d_i^2 = n (n^2 - 1) / 12 = 82.5,
        // sum d_i d_{i+1} = 82.5 - d_10^2 - d_10 = 82.5 - 20.25 - 4.5 = 57.75, so r1 = 0.7 (numpy gives 0.7 too)
        double[] x = new double[20];
        for (int i = 0; i < 20; i++) {
            x[i] = 1 + i / 2;
        }
        BatchMeans b = BatchMeans.of(x, 0, 20, 10, 0.95);
        assertEquals(5.5, b.mean(), 1e-12);
        assertEquals(0.7, b.lagOneCorrelation(), 1e-12);
        assertEquals(b.halfWidth() * Math.sqrt(1.7 / 0.3), b.effectiveHalfWidth(), 1e-12);
    }

    @Test
    void negativelyCorrelatedBatchMeansDoNotNarrowTheInterval() {
        // alternating batch means 0, 1, 0, 1, ...: r1 = -(n - 1) / n by algebra (n = 10: -0.9)
        double[] x = new double[40];
        for (int i = 0; i < 40; i++) {
            x[i] = (i / 4) % 2;
        }
        BatchMeans b = BatchMeans.of(x, 0, 40, 10, 0.95);
        assertEquals(-0.9, b.lagOneCorrelation(), 1e-12);
        assertEquals(b.halfWidth(), b.effectiveHalfWidth(), 0);
    }

    @Test
    void theWidenedIntervalRestoresMostOfTheCoverageThatShortBatchesLose() {
        // computed reference: a first-order autoregressive series of known mean 0; with phi = 0.98 its memory
        // (about (1 + phi) / (1 - phi) = 99 values) is longer than the 50-value batches of 20 batches over 1000
        // values, so the plain interval covers the mean well below its nominal 95 %. The widening must at least
        // halve the shortfall, and must leave independent data at about the nominal rate (2000 draws: a
        // standard error of 0.005 on a coverage near 0.95).
        double[] plainAndWidened = coverage(0.98, 2000);
        double nominal = 0.95;
        assertTrue(plainAndWidened[0] < nominal - 0.1, "plain coverage " + plainAndWidened[0]);
        assertTrue(nominal - plainAndWidened[1] < 0.5 * (nominal - plainAndWidened[0]),
                "coverage plain " + plainAndWidened[0] + ", widened " + plainAndWidened[1]);
        double[] independent = coverage(0.0, 2000);
        assertEquals(nominal, independent[1], 0.03, "independent data, widened coverage");
    }

    private static double[] coverage(double phi, int draws) {
        Random g = new Random(11);
        int n = 1000;
        double[] x = new double[n];
        int plain = 0;
        int widened = 0;
        for (int r = 0; r < draws; r++) {
            double e = g.nextGaussian();
            for (int i = 0; i < n; i++) {
                e = phi * e + Math.sqrt(1 - phi * phi) * g.nextGaussian();
                x[i] = e;
            }
            BatchMeans b = BatchMeans.of(x, 0, n, 20, 0.95);
            plain += Math.abs(b.mean()) <= b.halfWidth() ? 1 : 0;
            widened += Math.abs(b.mean()) <= b.effectiveHalfWidth() ? 1 : 0;
        }
        return new double[] {plain / (double) draws, widened / (double) draws};
    }

    @Test
    void fisherNearAPeriodGivesTheSameTestAsTheWholeFftPeriodogram() {
        // reference: the periodogram computed by Commons Math's FFT (Periodogram.of); fisherNear must give the same
        // g, peak and p-value, whether it takes its O(N) route (a dominant period near the hint) or falls back
        Random rng = new Random(4);
        for (int trial = 0; trial < 200; trial++) {
            int n = 64 + rng.nextInt(1500);
            double period = 3 + rng.nextDouble() * 120;
            double amplitude = rng.nextDouble() * 2;
            double noise = 0.01 + rng.nextDouble();
            double[] x = new double[n];
            for (int i = 0; i < n; i++) {
                double phase = 2 * Math.PI * i / period;
                x[i] = 5 + 0.001 * i + amplitude * Math.sin(phase) + 0.4 * amplitude * Math.sin(2 * phase)
                        + noise * rng.nextGaussian();
            }
            FisherG fft = Periodogram.of(x, n).fisher();
            // the true period, a wrong one, and none
            for (double hint : new double[] {period, period * 2.7, Double.NaN}) {
                FisherG near = Periodogram.fisherNear(x, n, hint);
                assertEquals(fft.m(), near.m());
                assertEquals(fft.peak(), near.peak(), "trial " + trial + " hint " + hint);
                assertEquals(fft.g(), near.g(), 1e-9 * fft.g(), "trial " + trial + " hint " + hint);
                assertEquals(fft.pValue(), near.pValue(), 1e-9 + 1e-6 * fft.pValue(), "trial " + trial);
            }
        }
        assertNull(Periodogram.fisherNear(new double[10], 10, 4));
    }
}
