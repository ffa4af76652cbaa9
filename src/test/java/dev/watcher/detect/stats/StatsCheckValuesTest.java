package dev.watcher.detect.stats;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.apache.commons.math3.stat.correlation.KendallsCorrelation;
import org.apache.commons.math3.stat.regression.OLSMultipleLinearRegression;
import org.apache.commons.math3.stat.regression.SimpleRegression;
import org.junit.jupiter.api.Test;

/** The statistics against published worked examples and against Commons Math where they overlap. */
class StatsCheckValuesTest {

    // C1: worked example "Mann-Kendall by hand", College of the Holy Cross course notes (METHODS.md C1);
    // the Theil-Sen values reproduced with scipy.stats.theilslopes (scipy 1.17.1).
    private static final double[] C1 = {12.9, 14.8, 13.2, 15.7, 13.8, 15.6, 12.9, 11.0, 17.3, 15.9, 19.0, 18.3,
        20.1, 21.7};

    @Test
    void mannKendallReproducesTheHolyCrossWorkedExample() {
        MannKendall mk = MannKendall.of(C1, C1.length);
        assertEquals(54, mk.s());
        assertEquals(332.667, mk.variance(), 1e-3); // one tie pair (12.9 twice)
        assertEquals(2.9058, mk.z(), 1e-4);
        assertEquals(0.0018, mk.pIncreasing(), 1e-4);
        assertEquals(0.003663, mk.pTwoSided(), 1e-6);
        assertFalse(mk.exact(), "n = 14 uses the normal approximation");
    }

    @Test
    void theilSenReproducesScipyOnTheHolyCrossSeries() {
        double[] x = new double[C1.length];
        for (int i = 0; i < x.length; i++) {
            x[i] = i + 1;
        }
        TheilSen ts = TheilSen.fit(x, C1, C1.length, 0.95);
        assertEquals(0.56667, ts.slope(), 1e-5);
        assertEquals(0.325, ts.low(), 1e-9);
        assertEquals(0.86667, ts.high(), 1e-5);
        assertEquals(11.4, ts.intercept(), 1e-9); // scipy.stats.theilslopes intercept, scipy 1.17.1
    }

    @Test
    void smallSamplesUseTheExactDistribution() {
        // C2 (METHODS.md): S = 10, Var(S) = 16.67, Z = 2.20, normal two-sided p = 0.028, exact p = 0.016667
        double[] x = {4.0, 4.3, 4.6, 4.9, 5.2};
        MannKendall normal = MannKendall.normal(x, 5);
        assertEquals(10, normal.s());
        assertEquals(16.67, normal.variance(), 0.005);
        assertEquals(2.20, normal.z(), 0.005);
        // the published 0.028 is the tail of the rounded Z = 2.20 (0.0278); the unrounded Z = 2.2045 gives 0.0275
        assertEquals(0.028, normal.pTwoSided(), 0.001);
        MannKendall exact = MannKendall.of(x, 5);
        assertTrue(exact.exact());
        assertEquals(0.016667, exact.pTwoSided(), 1e-6);
        assertEquals(1.0 / 120, exact.pIncreasing(), 1e-12); // the one increasing ordering of 5! = 120
        assertEquals(1.0, exact.pDecreasing(), 1e-12);
    }

    @Test
    void exactTailsAreAProperDistribution() {
        // P(S >= -n0) = 1 and P(S >= s) is symmetric: P(S >= s) = P(S <= -s) (Kendall 1975, the null
        // distribution of S is symmetric about 0)
        for (int n = 2; n <= 10; n++) {
            long n0 = (long) n * (n - 1) / 2;
            assertEquals(1.0, MannKendall.exactUpperTail(n, -n0), 1e-12);
            assertEquals(0.0, MannKendall.exactUpperTail(n, n0 + 2), 1e-12);
            for (long s = -n0; s <= n0; s += 2) {
                double up = MannKendall.exactUpperTail(n, s);
                double downOfMinus = 1 - MannKendall.exactUpperTail(n, -s + 2);
                assertEquals(up, downOfMinus, 1e-12, "n=" + n + " s=" + s);
            }
        }
    }

    @Test
    void theilSenReproducesTheHollanderWolfeExample() {
        // C3: Hollander & Wolfe (1999), Nonparametric Statistical Methods, Theil estimator example;
        // scipy.stats.theilslopes agrees (METHODS.md C3)
        double[] y = {21, 4, 9, 12, 35, 18, 10, 22, 24, 1, 6, 8, 13, 16, 19};
        double[] x = {67, 28, 30, 28, 52, 40, 25, 37, 44, 10, 14, 20, 28, 40, 51};
        TheilSen ts = TheilSen.fit(x, y, y.length, 0.95);
        assertEquals(0.5, ts.slope(), 1e-12);
        assertEquals(0.3243243, ts.low(), 1e-7);
        assertEquals(0.75, ts.high(), 1e-12);
        assertEquals(-2.0, ts.intercept(), 1e-12);
    }

    @Test
    void tabularCusumSignalsWhereLucasAndCrosierSay() {
        // C4: Lucas & Crosier (1982), Technometrics 24:199, k = 0.5, h = 5 (METHODS.md C4)
        double[] z = {0.8, 1.9, 1.4, 2.0, 1.1, 0.7, 2.6};
        double[] expected = {0.3, 1.7, 2.6, 4.1, 4.7, 4.9, 7.0};
        Cusum plain = new Cusum(0.5, 5, 0);
        for (int i = 0; i < z.length; i++) {
            boolean signal = plain.add(z[i]);
            assertEquals(expected[i], plain.value(), 1e-9);
            assertEquals(i == 6, signal, "plain CUSUM signals at i = 7 only, i=" + (i + 1));
        }
        Cusum fir = new Cusum(0.5, 5, 2.5);
        double[] withHeadStart = {2.8, 4.2, 5.1};
        for (int i = 0; i < 3; i++) {
            boolean signal = fir.add(z[i]);
            assertEquals(withHeadStart[i], fir.value(), 1e-9);
            assertEquals(i == 2, signal, "head start 2.5 signals at i = 3, i=" + (i + 1));
        }
        fir.reset();
        assertEquals(2.5, fir.value(), 0);
    }

    @Test
    void kendallsTauAgreesWithCommonsMath() {
        KendallsCorrelation reference = new KendallsCorrelation();
        double[] order = new double[C1.length];
        for (int i = 0; i < order.length; i++) {
            order[i] = i;
        }
        assertEquals(reference.correlation(order, C1), MannKendall.of(C1, C1.length).tauB(), 1e-12);
        // a series with many ties (a flat plateau with steps)
        double[] steps = {3, 3, 3, 2, 2, 5, 5, 5, 5, 1, 4, 4};
        double[] o = new double[steps.length];
        for (int i = 0; i < o.length; i++) {
            o[i] = i;
        }
        assertEquals(reference.correlation(o, steps), MannKendall.of(steps, steps.length).tauB(), 1e-12);
    }

    @Test
    void theilSenEqualsLeastSquaresOnAnExactLineAndIsCloseOnNoise() {
        double[] x = new double[50];
        double[] y = new double[50];
        SimpleRegression reg = new SimpleRegression();
        for (int i = 0; i < 50; i++) {
            x[i] = i;
            y[i] = -2.5 + 0.03 * i;
            reg.addData(x[i], y[i]);
        }
        TheilSen exactLine = TheilSen.fit(x, y, 50, 0.95);
        assertEquals(reg.getSlope(), exactLine.slope(), 1e-12);
        assertEquals(reg.getIntercept(), exactLine.intercept(), 1e-12);
        // with symmetric bounded noise both estimate the same slope; Sen's interval and the regression's
        // 95 % interval overlap
        SimpleRegression noisy = new SimpleRegression();
        for (int i = 0; i < 50; i++) {
            y[i] = -2.5 + 0.03 * i + 0.2 * Math.sin(1.7 * i * i);
            noisy.addData(x[i], y[i]);
        }
        TheilSen ts = TheilSen.fit(x, y, 50, 0.95);
        double half = noisy.getSlopeConfidenceInterval(0.05);
        assertTrue(ts.low() < noisy.getSlope() + half && ts.high() > noisy.getSlope() - half);
        assertEquals(noisy.getSlope(), ts.slope(), 0.01);
        assertTrue(ts.low() < ts.slope() && ts.slope() < ts.high());
    }

    @Test
    void quadraticFitAgreesWithCommonsMathOrdinaryLeastSquares() {
        int n = 60;
        double[] y = new double[n];
        double[][] design = new double[n][2];
        for (int t = 0; t < n; t++) {
            y[t] = 1.0 - 0.05 * t + 0.0012 * t * t + 0.05 * Math.sin(2.3 * t * t);
            design[t][0] = t;
            design[t][1] = (double) t * t;
        }
        OLSMultipleLinearRegression ols = new OLSMultipleLinearRegression();
        ols.newSampleData(y, design);
        double[] beta = ols.estimateRegressionParameters();
        double[] se = ols.estimateRegressionParametersStandardErrors();
        QuadraticFit q = QuadraticFit.of(y, n);
        assertEquals(beta[0], q.a(), 1e-9);
        assertEquals(beta[1], q.b(), 1e-9);
        assertEquals(beta[2], q.c(), 1e-11);
        assertEquals(se[2], q.seC(), 1e-11);
        assertTrue(q.pConvex() < 1e-6, "a clear valley is significantly convex");
        assertTrue(q.slopeStart() < 0 && q.slopeEnd() > 0);
    }

    @Test
    void hamedRaoInflatesTheVarianceOfAnAutocorrelatedSeries() {
        // AR(1) with coefficient 0.8 driven by sin(i^2), plus 0.01 i, rounded to 6 places. Reference values
        // reproduced with numpy/scipy 1.17.1 from the formulas of Hamed & Rao (1998), J. Hydrology
        // 204:182-196 (Sen-slope detrending, scipy.stats.rankdata, lags outside +/-1.96/sqrt(n)):
        // S = 116, Var(S) = 7366.667, n/n* = 1.1458528, Z = 1.2516933, two-sided p = 0.2106817.
        double[] x = {0.0, 0.851471, -0.063626, 0.375218, 0.028271, -0.091735, -1.045167, -1.767886, -0.470283,
            -0.980114, -1.262457, 0.01885, -0.443942, -0.923153, 0.237007, -0.702489, -1.521199, -1.20148,
            -1.32125, -0.731613, -1.38821, -0.137098, 0.135825, 1.099132, 0.049353, 0.273499, -0.250335,
            0.011669, -0.911801, -1.475009, -0.114204, -0.3429, -0.360853, 0.690857, 0.522788, 0.276894,
            1.297191, 0.449613, -0.461837, 0.168664};
        MannKendall hr = MannKendall.hamedRao(x, x.length);
        assertEquals(116, hr.s());
        assertEquals(1.1458528, hr.varianceInflation(), 1e-6);
        assertEquals(7366.667 * 1.1458528, hr.variance(), 1e-2);
        assertEquals(1.2516933, hr.z(), 1e-6);
        assertEquals(0.2106817, hr.pTwoSided(), 1e-6);
        assertTrue(MannKendall.normal(x, x.length).pTwoSided() < hr.pTwoSided());
    }

    @Test
    void robustScaleFollowsIglewiczAndHoaglinAndFallsBackOnAPlateau() {
        // modified z-score 0.6745 (x - median) / MAD (Iglewicz & Hoaglin 1993)
        double[] x = {2, 3, 3, 4, 5, 6, 30};
        RobustScale r = RobustScale.of(x, x.length);
        assertEquals(4, r.median(), 0);
        assertEquals(1, r.mad(), 0); // |x - 4| = 2,1,1,0,1,2,26 -> median 1
        assertEquals(0.6745 * 26, r.modifiedZ(30), 0.01);
        assertTrue(r.modifiedZ(30) > RobustScale.OUTLIER_Z);
        // more than half equal: MAD = 0, fall back to the mean absolute deviation
        double[] plateau = {1, 1, 1, 1, 1, 1, 2};
        RobustScale p = RobustScale.of(plateau, plateau.length);
        assertEquals(0, p.mad(), 0);
        assertEquals(1.2533 / 7, p.sigma(), 1e-12);
        assertTrue(Double.isFinite(p.modifiedZ(2)));
        RobustScale flat = RobustScale.of(new double[] {1, 1, 1}, 3);
        assertEquals(0, flat.modifiedZ(1), 0);
        assertEquals(Double.POSITIVE_INFINITY, flat.modifiedZ(1.5), 0);
    }

    @Test
    void quantilesInterpolateLikeNumpy() {
        // numpy.percentile([1..10], 5) = 1.45, 95 -> 9.55 (linear interpolation, numpy's default)
        double[] s = {1, 2, 3, 4, 5, 6, 7, 8, 9, 10};
        RobustScale r = RobustScale.of(s, s.length);
        assertEquals(1.45, r.p05(), 1e-12);
        assertEquals(9.55, r.p95(), 1e-12);
    }

    @Test
    void holmRejectsStepDown() {
        // Holm (1979): p = 0.01, 0.04, 0.03, 0.005 at alpha 0.05 -> thresholds 0.0125, 0.0167, 0.025, 0.05 for
        // the sorted 0.005, 0.01, 0.03, 0.04: the first two are rejected, 0.03 > 0.025 stops
        double[] p = {0.01, 0.04, 0.03, 0.005};
        assertArrayEquals(new boolean[] {true, false, false, true}, Holm.reject(p, 4, 0.05));
        assertEquals(2, Holm.rejections(p, 4, 0.05));
    }

    @Test
    void rollingWindowKeepsTheNewestValuesOldestFirst() {
        RollingWindow w = new RollingWindow(3);
        for (int i = 1; i <= 5; i++) {
            w.add(i);
        }
        assertArrayEquals(new double[] {3, 4, 5}, w.toArray(), 0);
        assertEquals(5, w.last(), 0);
        assertTrue(w.full());
    }

    @Test
    void selectionFindsTheSameOrderStatisticsAsSorting() {
        java.util.SplittableRandom rnd = new java.util.SplittableRandom(7);
        for (int m : new int[] {1, 2, 3, 10, 101, 1000}) {
            double[] a = new double[m];
            for (int i = 0; i < m; i++) {
                a[i] = rnd.nextInt(20) * 0.5; // many ties
            }
            double[] sorted = a.clone();
            java.util.Arrays.sort(sorted);
            for (int k : new int[] {0, m / 3, m / 2, m - 1}) {
                assertEquals(sorted[k], Select.kth(a.clone(), 0, m, k), 0, "m=" + m + " k=" + k);
            }
        }
    }
}
