package dev.riskmin.sampling;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.riskmin.data.Dataset;
import dev.riskmin.loss.Losses;
import dev.riskmin.objective.LinearObjective;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.testing.Cases;
import java.util.random.RandomGenerator;
import org.apache.commons.math3.stat.inference.ChiSquareTest;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;
import org.junit.jupiter.params.provider.MethodSource;

class ImportanceSamplingTest {

    /** Least squares on rows of very different norms, so the smoothness constants L_i differ a lot. */
    private static LinearObjective heterogeneousLeastSquares(RandomGenerator rng, int n, int d) {
        double[][] x = Cases.gaussianMatrix(rng, n, d);
        for (double[] row : x) {
            double scale = Math.exp(1.2 * rng.nextGaussian());
            for (int j = 0; j < d; j++) {
                row[j] *= scale;
            }
        }
        double[] y = Cases.linearTargets(rng, x, Cases.gaussianVector(rng, d, 1.0), 0.3, 0.5);
        return LinearObjective.of(Dataset.of(x, y), Losses.squared(), Penalty.none(), true);
    }

    /** p_i = u/n + (1 − u) L_i/Σ L, computed directly (Needell, Srebro &amp; Ward 2014; METHODS §9). */
    private static double[] probabilities(LinearObjective objective, double u) {
        int n = objective.size();
        double sum = 0;
        for (int i = 0; i < n; i++) {
            sum += objective.sampleSmoothness(i);
        }
        double[] p = new double[n];
        for (int i = 0; i < n; i++) {
            p[i] = u / n + (1 - u) * objective.sampleSmoothness(i) / sum;
        }
        return p;
    }

    private static SamplingContext context(LinearObjective objective) {
        return SamplingContext.of(objective.size(), null, objective::sampleSmoothness);
    }

    @ParameterizedTest(name = "seed={0}, uniformShare={1}")
    @CsvSource({"21, 0.5", "22, 0.5", "23, 0.1", "24, 0.9"})
    void drawFrequenciesPassChiSquareAgainstP(long seed, double uniformShare) {
        RandomGenerator rng = Cases.rng(seed);
        LinearObjective objective = heterogeneousLeastSquares(rng, 40, 3);
        double[] p = probabilities(objective, uniformShare);
        int n = objective.size();
        BatchSource source = Sampling.importance(uniformShare).start(context(objective), rng);
        assertFalse(source.uniformScales());
        int batchSize = 20;
        int[] batch = new int[batchSize];
        double[] scales = new double[batchSize];
        long[] observed = new long[n];
        for (int b = 0; b < 10_000; b++) { // 200,000 draws; the smallest expected count is >= 500
            source.next(batch, scales, batchSize);
            for (int k = 0; k < batchSize; k++) {
                int i = batch[k];
                observed[i]++;
                // The reweighting that keeps the gradient unbiased: s_i = 1/(n p_i) (METHODS §9).
                assertEquals(1.0 / (n * p[i]), scales[k], 1e-12 / (n * p[i]), "scale of sample " + i);
                assertTrue(scales[k] <= 1.0 / uniformShare + 1e-12, "scale above 1/u for sample " + i);
            }
        }
        // Pearson chi-square goodness of fit at alpha = 0.001 (commons-math3 ChiSquareTest; fixed seeds).
        ChiSquareTest test = new ChiSquareTest();
        assertFalse(test.chiSquareTest(p, observed, 0.001),
                "frequencies reject p: p-value " + test.chiSquareTest(p, observed));
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void scaledGradientsAverageToFullGradient(long seed) {
        // E[g_i/(n p_i)] = G exactly (METHODS §9); the empirical mean of M draws must sit within
        // 5 standard errors of G per coordinate, the standard error estimated from the same draws (CLT).
        RandomGenerator rng = Cases.rng(seed);
        int d = 4;
        LinearObjective objective = heterogeneousLeastSquares(rng, 60, d);
        int p = d + 1;
        double[] h = Cases.gaussianVector(rng, p, 0.5);
        double[] full = new double[p];
        objective.gradient(h, full);

        BatchSource source = Sampling.importance().start(context(objective), rng);
        int batchSize = 10;
        int batches = 10_000;
        int[] batch = new int[batchSize];
        double[] scales = new double[batchSize];
        double[] g = new double[p];
        double[] sum = new double[p];
        double[] sumSquares = new double[p];
        for (int b = 0; b < batches; b++) {
            source.next(batch, scales, batchSize);
            for (int k = 0; k < batchSize; k++) {
                java.util.Arrays.fill(g, 0.0);
                objective.addSampleGradient(h, batch[k], scales[k], g);
                for (int j = 0; j < p; j++) {
                    sum[j] += g[j];
                    sumSquares[j] += g[j] * g[j];
                }
            }
        }
        long draws = (long) batchSize * batches;
        for (int j = 0; j < p; j++) {
            double mean = sum[j] / draws;
            double variance = (sumSquares[j] - draws * mean * mean) / (draws - 1);
            double standardError = Math.sqrt(variance / draws);
            assertTrue(Math.abs(mean - full[j]) <= 5 * standardError,
                    "coordinate " + j + ": mean " + mean + " vs full gradient " + full[j] + ", standard error "
                            + standardError);
        }
    }

    @Test
    void refusesInfiniteOrNaNSmoothnessNamingTheSample() {
        IllegalArgumentException infinite = assertThrows(IllegalArgumentException.class,
                () -> Sampling.importance().start(
                        SamplingContext.of(20, null, i -> i == 12 ? Double.POSITIVE_INFINITY : 1.0), Cases.rng(1)));
        assertEquals("importance sampling needs finite per-sample smoothness; sample 12 has Infinity",
                infinite.getMessage());
        IllegalArgumentException nan = assertThrows(IllegalArgumentException.class,
                () -> Sampling.importance(0.3).start(
                        SamplingContext.of(20, null, i -> i == 7 ? Double.NaN : 1.0), Cases.rng(1)));
        assertEquals("importance sampling needs finite per-sample smoothness; sample 7 has NaN", nan.getMessage());
        // Unknown smoothness reads as +∞ (SamplingContext), so the first sample is named.
        IllegalArgumentException unknown = assertThrows(IllegalArgumentException.class,
                () -> Sampling.importance().start(SamplingContext.of(5, null, null), Cases.rng(1)));
        assertEquals("importance sampling needs finite per-sample smoothness; sample 0 has Infinity",
                unknown.getMessage());
        IllegalArgumentException negative = assertThrows(IllegalArgumentException.class,
                () -> Sampling.importance().start(SamplingContext.of(5, null, i -> i - 3.0), Cases.rng(1)));
        assertEquals("importance sampling needs per-sample smoothness >= 0; sample 0 has -3.0", negative.getMessage());
    }

    @Test
    void refusesUniformShareOutsideZeroOne() {
        for (double bad : new double[] {0.0, -0.5, 1.5, Double.NaN, Double.POSITIVE_INFINITY}) {
            IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> Sampling.importance(bad));
            assertEquals("uniformShare (" + bad + ") must be in (0, 1]", e.getMessage());
        }
    }

    @Test
    void uniformShareOneOrEqualSmoothnessGivesUniformScales() {
        int[] batch = new int[8];
        double[] scales = new double[8];
        BatchSource one = Sampling.importance(1.0).start(SamplingContext.of(30, null, i -> 1.0 + i), Cases.rng(5));
        BatchSource equal = Sampling.importance().start(SamplingContext.of(30, null, i -> 2.5), Cases.rng(5));
        BatchSource zero = Sampling.importance().start(SamplingContext.of(30, null, i -> 0.0), Cases.rng(5));
        for (BatchSource source : new BatchSource[] {one, equal, zero}) {
            assertTrue(source.uniformScales());
            source.next(batch, scales, 8);
            for (double s : scales) {
                assertEquals(1.0, s);
            }
        }
    }
}
