package dev.riskmin.diagnostics.stopping;

import dev.riskmin.testing.Cases;
import org.apache.commons.math3.distribution.BinomialDistribution;
import org.apache.commons.math3.distribution.TDistribution;
import org.junit.jupiter.api.Test;

import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The statistic of the fluctuation–dissipation test as a pure computation: batch means, t interval,
 * equivalence band and guards, checked against known answers and against the sampling behaviour it
 * promises (METHODS §4 checks).
 */
class BatchMeansEquivalenceTest {
    private static final double DELTA = 0.02;
    private static final double GAMMA = 0.2;

    @Test
    void handComputedWindowGivesTheTabulatedHalfWidth() {
        // z = 1..9: m = 3, b = 3, batch means 2, 5, 8, mean 5, σ² = (3/2)(9 + 0 + 9) = 27, df = 2,
        // h = t(0.90, 2) √(27/9); t(0.90, 2) = 1.886 (NIST/SEMATECH e-Handbook of Statistical Methods,
        // §1.3.6.7.2, table of upper critical values of the t distribution).
        double[] z = {1, 2, 3, 4, 5, 6, 7, 8, 9};
        double[] v = {10, 10, 10, 10, 10, 10, 10, 10, 10};
        BatchMeansEquivalence.Outcome o = BatchMeansEquivalence.of(0.5, GAMMA).evaluate(z, v, 0, 9, false);
        assertEquals(3, o.batchSize());
        assertEquals(3, o.batches());
        assertEquals(2, o.degreesOfFreedom());
        assertEquals(5.0, o.zMean(), 1e-15);
        assertEquals(10.0, o.vMean(), 1e-15);
        assertEquals(27.0, o.longRunVariance(), 1e-12);
        assertEquals(1.886 * Math.sqrt(3.0), o.halfWidth(), 1e-3 * Math.sqrt(3.0));
        assertEquals(5.0, o.band(), 1e-15);
        assertFalse(o.equivalent()); // 5 + 3.27 is not below 5
    }

    @Test
    void aWindowThatWrapsRoundTheRingGivesTheSameOutcome() {
        RandomGenerator rng = Cases.rng(7);
        int n = 400;
        double[] z = new double[n];
        double[] v = new double[n];
        for (int k = 0; k < n; k++) {
            z[k] = 0.01 * rng.nextGaussian();
            v[k] = 1 + 0.1 * rng.nextGaussian();
        }
        int shift = 123;
        double[] zRing = new double[n];
        double[] vRing = new double[n];
        for (int k = 0; k < n; k++) {
            zRing[(k + shift) % n] = z[k];
            vRing[(k + shift) % n] = v[k];
        }
        BatchMeansEquivalence test = BatchMeansEquivalence.of(DELTA, GAMMA);
        BatchMeansEquivalence.Outcome flat = test.evaluate(z, v, 0, n, true);
        BatchMeansEquivalence.Outcome ring = test.evaluate(zRing, vRing, shift, n, true);
        assertEquals(flat.zMean(), ring.zMean(), 1e-15);
        assertEquals(flat.longRunVariance(), ring.longRunVariance(), 1e-15);
        assertEquals(flat.fires(), ring.fires());
    }

    /**
     * METHODS §4 check: for x<sub>t</sub> = ρ x<sub>t−1</sub> + e<sub>t</sub>, e ~ N(0, s²), the long-run
     * variance is s²/(1 − ρ)² (Hamilton, <i>Time Series Analysis</i>, Princeton 1994, §7.2 — section
     * from memory). Mean over 20 series of 250,000 (500 batches each: relative sd about 1.4 % for the
     * mean, batch-size bias about −0.3 %); tolerance 5 %.
     */
    @Test
    void batchMeansVarianceOfAnAutoregressiveSeriesTendsToItsLongRunVariance() {
        double rho = 0.5;
        double s = 1.5;
        int length = 250_000;
        RandomGenerator rng = Cases.rng(11);
        double[] x = new double[length];
        double sum = 0;
        int series = 20;
        for (int r = 0; r < series; r++) {
            double prev = s * rng.nextGaussian() / Math.sqrt(1 - rho * rho); // start in the stationary law
            for (int t = 0; t < length; t++) {
                prev = rho * prev + s * rng.nextGaussian();
                x[t] = prev;
            }
            sum += BatchMeansEquivalence.longRunVariance(x, 0, length);
        }
        double expected = s * s / ((1 - rho) * (1 - rho));
        double ratio = sum / series / expected;
        assertEquals(1.0, ratio, 0.05, "batch-means sigma^2 / (s^2/(1-rho)^2) = " + ratio);
    }

    /**
     * METHODS §4 check: on i.i.d. N(0, 1) values the interval z̄ ± h covers the true mean 0 with
     * frequency about 1 − γ. With N = 1000 (m = 31, b = 32, 992 values used) the batch means are i.i.d.
     * normal, so (z̄ − 0)/(σ/√992) is Student t with b − 1 = 31 df while h uses df = m − 1 = 30: the
     * exact coverage is P(|T<sub>31</sub>| ≤ t<sub>0.9, 30</sub>) (commons-math3), within a two-sided
     * 99.9 % binomial band (commons-math3 BinomialDistribution) over 4,000 windows.
     */
    @Test
    void intervalCoversTheMeanOfIndependentNormalsAtItsConfidence() {
        int windows = 4000;
        int n = 1000;
        BatchMeansEquivalence test = BatchMeansEquivalence.of(DELTA, GAMMA);
        RandomGenerator rng = Cases.rng(13);
        double[] z = new double[n];
        double[] v = new double[n];
        java.util.Arrays.fill(v, 1.0);
        int covered = 0;
        for (int w = 0; w < windows; w++) {
            for (int k = 0; k < n; k++) {
                z[k] = rng.nextGaussian();
            }
            BatchMeansEquivalence.Outcome o = test.evaluate(z, v, 0, n, false);
            if (Math.abs(o.zMean()) <= o.halfWidth()) {
                covered++;
            }
        }
        double q = new TDistribution(null, 30).inverseCumulativeProbability(1 - GAMMA / 2);
        TDistribution t31 = new TDistribution(null, 31);
        double exact = t31.cumulativeProbability(q) - t31.cumulativeProbability(-q);
        assertWithinBinomialBand(covered, windows, exact, "coverage");
        assertEquals(1 - GAMMA, exact, 0.003); // the df choice m − 1 barely moves the nominal 0.8
    }

    /**
     * False alarms. The test declares stationarity when z̄ ± h lies inside (−δv̄, δv̄): it tests
     * H<sub>0</sub> |E z| ≥ δ E v ("not stationary") against H<sub>1</sub> |E z| &lt; δ E v. A false alarm is
     * a firing under H<sub>0</sub>; its probability is largest at the band's edge, E z = δ E v, where
     * firing needs z̄ + h &lt; δ v̄, i.e. the t statistic below −t<sub>1−γ/2, df</sub>: probability about γ/2
     * (two one-sided tests, each at γ/2; the lower side passes almost surely here). Feeding i.i.d.
     * z ~ N(δ·10, 1) and v ~ N(10, 1), windows of 1,000, the firing rate of the interval must match the
     * exact P(T<sub>31</sub> &lt; −t<sub>0.9, 30</sub>) ≈ 0.0996 (commons-math3) within a two-sided 99.9 %
     * binomial band over 4,000 windows; with the guards (before the first cut) it can only be lower.
     * Well outside the band (E z = 3δ E v) it never fires.
     */
    @Test
    void falseAlarmRateAtTheBandEdgeIsHalfTheSignificance() {
        int windows = 4000;
        int n = 1000;
        double meanV = 10;
        BatchMeansEquivalence test = BatchMeansEquivalence.of(DELTA, GAMMA);
        RandomGenerator rng = Cases.rng(17);
        double[] z = new double[n];
        double[] v = new double[n];
        double[] zFar = new double[n];
        int equivalent = 0;
        int fired = 0;
        int firedFar = 0;
        for (int w = 0; w < windows; w++) {
            for (int k = 0; k < n; k++) {
                double e = rng.nextGaussian();
                z[k] = DELTA * meanV + e;
                zFar[k] = 3 * DELTA * meanV + e;
                v[k] = meanV + rng.nextGaussian();
            }
            BatchMeansEquivalence.Outcome o = test.evaluate(z, v, 0, n, true);
            equivalent += o.equivalent() ? 1 : 0;
            fired += o.fires() ? 1 : 0;
            firedFar += test.evaluate(zFar, v, 0, n, true).fires() ? 1 : 0;
        }
        double q = new TDistribution(null, 30).inverseCumulativeProbability(1 - GAMMA / 2);
        double nominal = new TDistribution(null, 31).cumulativeProbability(-q);
        assertWithinBinomialBand(equivalent, windows, nominal, "false alarms at the edge");
        assertTrue(fired <= equivalent, fired + " firings with guards > " + equivalent + " without");
        assertEquals(0, firedFar, "firings with E z = 3 delta E v");
    }

    @Test
    void optionsAndWindowsAreValidatedWithTheirNames() {
        IllegalArgumentException delta = assertThrows(IllegalArgumentException.class,
                () -> BatchMeansEquivalence.of(1.5, 0.2));
        assertTrue(delta.getMessage().contains("delta (1.5)"), delta.getMessage());
        IllegalArgumentException gamma = assertThrows(IllegalArgumentException.class,
                () -> BatchMeansEquivalence.of(0.02, 0.0));
        assertTrue(gamma.getMessage().contains("gamma (0.0)"), gamma.getMessage());
        BatchMeansEquivalence test = BatchMeansEquivalence.of(0.02, 0.2);
        IllegalArgumentException length = assertThrows(IllegalArgumentException.class,
                () -> test.evaluate(new double[4], new double[4], 0, 5, false));
        assertTrue(length.getMessage().contains("length (5)"), length.getMessage());
        assertFalse(test.evaluate(new double[4], new double[4], 0, 3, false).fires());
    }

    private static void assertWithinBinomialBand(int count, int trials, double p, String what) {
        BinomialDistribution law = new BinomialDistribution(null, trials, p);
        int lo = law.inverseCumulativeProbability(0.0005);
        int hi = law.inverseCumulativeProbability(0.9995);
        assertTrue(count >= lo && count <= hi, what + ": " + count + " of " + trials + " outside [" + lo + ", " + hi
                + "] for p = " + p);
    }
}
