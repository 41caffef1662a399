package dev.riskmin.diagnostics.estimator;

import dev.riskmin.loss.Losses;
import dev.riskmin.objective.LinearObjective;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.testing.Cases;
import dev.riskmin.testing.LeastSquaresProblem;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.ArrayList;
import java.util.List;
import java.util.function.Consumer;
import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The estimators of {@link NoiseStatistics} are exact in expectation: on small problems every batch
 * is enumerated (all n<sup>B</sup> ordered batches with replacement, all C(n, B) subsets without, all
 * combinations of per-stratum subsets), so the expectations are computed exactly, not sampled.
 * The check of METHODS §1: "enumerating all batches (n=7, B=3) matches both formulas exactly; WOR
 * with B = n gives 0"; of §2: "exact expectations equal |G|^2 and tr(Sigma) (enumerated); identical
 * g_i give S_est = 0". The formulas: Cochran, Sampling Techniques, 3rd ed., Wiley 1977, ch. 2 and 5
 * (chapters from memory); McCandlish et al., arXiv:1812.06162, 2018.
 */
class NoiseStatisticsEnumerationTest {
    private static final double TOLERANCE = 1e-12;

    /** Least squares with 7 samples and 2 features plus intercept (p = 3), at a random point h. */
    private static Gradients sevenSamples(long seed) {
        LeastSquaresProblem problem = LeastSquaresProblem.gaussian(seed, 7, 2, 0.5);
        double[] h = Cases.gaussianVector(Cases.rng(seed + 1), 3, 1.0);
        return Gradients.of(problem.objective(), h);
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void withReplacementTraceAndVarianceAreExactOverAllOrderedBatches(long seed) {
        Gradients g = sevenSamples(seed);
        int b = 3;
        double[] sums = new double[3]; // T, ‖g_B − G‖², in-batch ‖G‖² estimate
        int[] count = {0};
        double[] mean = new double[g.p];
        tuples(g.n, b, batch -> {
            double[] block = g.block(batch);
            double t = NoiseStatistics.sampleTrace(block, b, g.p);
            NoiseStatistics.meanGradient(block, null, b, g.p, mean);
            sums[0] += t;
            sums[1] += NoiseStatistics.distanceSquared(mean, g.mean, g.p);
            sums[2] += NoiseStatistics.correctedNormSquared(NoiseStatistics.normSquared(mean, g.p),
                    NoiseStatistics.withReplacementVariance(t, b));
            count[0]++;
        });
        assertEquals(343, count[0]);
        double traceSigma = g.traceSigma();
        // Cochran ch. 2 / METHODS §1: E[T] = tr Σ and E‖g_B − G‖² = tr Σ / B with replacement.
        assertClose(traceSigma, sums[0] / count[0], "E[T] with replacement");
        assertClose(traceSigma / b, sums[1] / count[0], "E||g_B - G||^2 with replacement");
        assertClose(NoiseStatistics.withReplacementVariance(traceSigma, b), sums[1] / count[0], "formula tr S / B");
        // METHODS §2: E‖g_B‖² = ‖G‖² + tr Σ/B, so ‖g_B‖² − T/B is unbiased for ‖G‖².
        assertClose(g.normSquaredOfMean(), sums[2] / count[0], "in-batch |G|^2 with replacement");
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void withoutReplacementTraceAndVarianceAreExactOverAllSubsets(long seed) {
        Gradients g = sevenSamples(seed);
        for (int b = 2; b <= g.n; b++) {
            int size = b;
            double[] sums = new double[3];
            int[] count = {0};
            double[] mean = new double[g.p];
            subsets(g.n, b, batch -> {
                double[] block = g.block(batch);
                double t = NoiseStatistics.sampleTrace(block, size, g.p);
                NoiseStatistics.meanGradient(block, null, size, g.p, mean);
                sums[0] += t;
                sums[1] += NoiseStatistics.distanceSquared(mean, g.mean, g.p);
                sums[2] += NoiseStatistics.correctedNormSquared(NoiseStatistics.normSquared(mean, g.p),
                        NoiseStatistics.withoutReplacementVariance(t, size, g.n));
                count[0]++;
            });
            assertEquals(binomial(g.n, b), count[0]);
            double traceSigma = g.traceSigma();
            double traceS2 = g.traceS2();
            double enumerated = sums[1] / count[0];
            // Cochran ch. 2 / METHODS §1: E[T] = tr S², and both forms of the finite-population variance.
            assertClose(traceS2, sums[0] / count[0], "E[T] without replacement, B = " + b);
            assertClose(NoiseStatistics.withoutReplacementVariance(traceS2, b, g.n), enumerated,
                    "(1 - B/n) tr S2 / B, B = " + b);
            assertClose(NoiseStatistics.withoutReplacementVarianceFromSigma(traceSigma, b, g.n), enumerated,
                    "tr S (n - B)/(B (n - 1)), B = " + b);
            assertClose(traceSigma * (g.n - b) / (b * (g.n - 1.0)), enumerated, "written-out formula, B = " + b);
            assertClose(g.normSquaredOfMean(), sums[2] / count[0], "in-batch |G|^2 without replacement, B = " + b);
        }
        // METHODS §1: without replacement, a batch of all n samples has no error.
        assertEquals(0.0, NoiseStatistics.withoutReplacementVariance(g.traceS2(), g.n, g.n));
        assertEquals(0.0, NoiseStatistics.withoutReplacementVarianceFromSigma(g.traceSigma(), g.n, g.n));
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void stratifiedVarianceIsExactOverAllPerStratumSubsets(long seed) {
        // n = 12 in strata of 4 and 8; draws (2, 3) for the general form (Cochran ch. 5).
        LeastSquaresProblem problem = LeastSquaresProblem.gaussian(seed, 12, 2, 0.5);
        Gradients g = Gradients.of(problem.objective(), Cases.gaussianVector(Cases.rng(seed + 2), 3, 1.0));
        int[] first = {0, 1, 2, 3};
        int[] second = {4, 5, 6, 7, 8, 9, 10, 11};
        double[] weights = {4 / 12.0, 8 / 12.0};
        int[] sizes = {4, 8};
        double[] traceS2 = {g.traceS2(first), g.traceS2(second)};
        for (int[] drawn : new int[][] {{2, 3}, {1, 2}, {3, 6}, {4, 1}}) {
            double[] sums = new double[2];
            int[] count = {0};
            forEachStratifiedBatch(first, second, drawn, (a, b) -> {
                double[] meanA = g.meanOf(a);
                double[] meanB = g.meanOf(b);
                double dev = 0;
                for (int c = 0; c < g.p; c++) {
                    double st = weights[0] * meanA[c] + weights[1] * meanB[c];
                    dev += (st - g.mean[c]) * (st - g.mean[c]);
                }
                sums[0] += dev;
                // The estimate the monitor forms: the same formula with within-stratum sample traces T_h.
                if (drawn[0] >= 2 && drawn[1] >= 2) {
                    double[] t = {NoiseStatistics.sampleTrace(g.block(a), a.length, g.p),
                            NoiseStatistics.sampleTrace(g.block(b), b.length, g.p)};
                    sums[1] += NoiseStatistics.stratifiedVariance(weights, drawn, sizes, t, 2);
                }
                count[0]++;
            });
            assertEquals(binomial(4, drawn[0]) * binomial(8, drawn[1]), count[0]);
            double enumerated = sums[0] / count[0];
            assertClose(NoiseStatistics.stratifiedVariance(weights, drawn, sizes, traceS2, 2), enumerated,
                    "sum W_h^2 (1 - n_h/N_h) tr S2_h / n_h, draws " + drawn[0] + "," + drawn[1]);
            if (drawn[0] >= 2 && drawn[1] >= 2) {
                assertClose(enumerated, sums[1] / count[0], "E of the within-stratum estimate");
            }
        }
        // Proportional allocation: B = 3 of N = 12 gives n_h = B W_h = (1, 2) (Cochran ch. 5).
        double[] sum = {0};
        int[] count = {0};
        forEachStratifiedBatch(first, second, new int[] {1, 2}, (a, b) -> {
            double[] meanA = g.meanOf(a);
            double[] meanB = g.meanOf(b);
            for (int c = 0; c < g.p; c++) {
                double st = weights[0] * meanA[c] + weights[1] * meanB[c];
                sum[0] += (st - g.mean[c]) * (st - g.mean[c]);
            }
            count[0]++;
        });
        assertClose(NoiseStatistics.proportionalStratifiedVariance(weights, traceS2, 2, 3, 12), sum[0] / count[0],
                "((1 - B/N)/B) sum W_h tr S2_h");
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void twoBatchEstimatesAreExactOverAllPairsOfBatches(long seed) {
        Gradients g = sevenSamples(seed);
        int small = 2;
        int big = 4;
        List<Double> smallNorms = batchNorms(g, small);
        List<Double> bigNorms = batchNorms(g, big);
        assertEquals(49, smallNorms.size());
        assertEquals(2401, bigNorms.size());
        double normSum = 0;
        double traceSum = 0;
        for (double s : smallNorms) {
            for (double l : bigNorms) {
                normSum += NoiseStatistics.twoBatchNormSquared(s, small, l, big);
                traceSum += NoiseStatistics.twoBatchTrace(s, small, l, big);
            }
        }
        double pairs = (double) smallNorms.size() * bigNorms.size();
        // McCandlish et al. 2018 / METHODS §2: E|G|²_est = |G|², E S_est = tr Σ over independent WR batches.
        assertClose(g.normSquaredOfMean(), normSum / pairs, "E |G|^2 two-batch");
        assertClose(g.traceSigma(), traceSum / pairs, "E S two-batch");
        // The monitor's big-batch correction: E[|G_big|² − tr Σ/B_big] = |G|².
        double corrected = 0;
        for (double l : bigNorms) {
            corrected += NoiseStatistics.correctedNormSquared(l, g.traceSigma() / big);
        }
        assertClose(g.normSquaredOfMean(), corrected / bigNorms.size(), "E |G_big|^2 - tr S / B_big");
    }

    @Test
    void identicalGradientsGiveZeroNoise() {
        // METHODS §2 check; dyadic entries and batch sizes keep the means exact.
        double[] row = {0.5, -1.25, 2.0};
        double[][] same = new double[8][];
        for (int i = 0; i < 8; i++) {
            same[i] = row.clone();
        }
        Gradients g = Gradients.of(same);
        double squared = NoiseStatistics.normSquared(row, 3);
        assertEquals(0.0, NoiseStatistics.twoBatchTrace(squared, 2, squared, 4));
        assertEquals(squared, NoiseStatistics.twoBatchNormSquared(squared, 2, squared, 4));
        assertEquals(0.0, NoiseStatistics.sampleTrace(g.rows, 8, 3));
        assertEquals(0.0, NoiseStatistics.populationTrace(g.rows, 8, 3));
        assertEquals(1, NoiseStatistics.suggestedBatchSize(NoiseStatistics.noiseScale(0.0, squared), 100));
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void scaledTraceIsExactForImportanceSampling(long seed) {
        // METHODS §9 with §1: with draws of probability p_i and scale 1/(n p_i), the scaled rows are
        // i.i.d. with mean G, and T over them has expectation Σ_i p_i ‖g_i/(n p_i) − G‖² (enumerated, B = 2).
        Gradients g = sevenSamples(seed);
        RandomGenerator rng = Cases.rng(seed + 7);
        double[] prob = new double[g.n];
        double total = 0;
        for (int i = 0; i < g.n; i++) {
            prob[i] = 0.2 + rng.nextDouble();
            total += prob[i];
        }
        for (int i = 0; i < g.n; i++) {
            prob[i] /= total;
        }
        double expected = 0;
        for (int i = 0; i < g.n; i++) {
            double s = 1.0 / (g.n * prob[i]);
            for (int c = 0; c < g.p; c++) {
                double d = s * g.component(i, c) - g.mean[c];
                expected += prob[i] * d * d;
            }
        }
        double weighted = 0;
        double[] scales = new double[2];
        for (int i = 0; i < g.n; i++) {
            for (int j = 0; j < g.n; j++) {
                scales[0] = 1.0 / (g.n * prob[i]);
                scales[1] = 1.0 / (g.n * prob[j]);
                weighted += prob[i] * prob[j] * NoiseStatistics.sampleTrace(g.block(new int[] {i, j}), scales, 2, g.p);
            }
        }
        assertClose(expected, weighted, "E[T] of scaled rows under importance sampling");
    }

    @Test
    void populationTraceMatchesTheDefinition() {
        Gradients g = sevenSamples(99);
        assertClose(g.traceSigma(), NoiseStatistics.populationTrace(g.rows, g.n, g.p), "tr Sigma");
        assertClose(g.traceSigma(), NoiseStatistics.traceSigmaFromS2(g.traceS2(), g.n), "(n-1)/n tr S2");
        assertClose(g.traceS2(), NoiseStatistics.traceS2FromSigma(g.traceSigma(), g.n), "n/(n-1) tr Sigma");
    }

    @Test
    void singleRowHasNoSampleTraceAndTheSuggestionIsCapped() {
        assertTrue(Double.isNaN(NoiseStatistics.sampleTrace(new double[] {1, 2}, 1, 2)));
        assertTrue(Double.isNaN(NoiseStatistics.twoBatchTrace(1, 4, 2, 4)));
        assertEquals(40, NoiseStatistics.suggestedBatchSize(1e9, 40));
        assertEquals(13, NoiseStatistics.suggestedBatchSize(12.2, 40));
        assertEquals(1, NoiseStatistics.suggestedBatchSize(Double.NaN, 40));
    }

    @Test
    void invalidSizesAreRejectedNamingTheValues() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> NoiseStatistics.withoutReplacementVariance(1.0, 8, 7));
        assertTrue(e.getMessage().contains("batch size (8)") && e.getMessage().contains("(7)"), e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> NoiseStatistics.withReplacementVariance(1.0, 0));
        assertTrue(e.getMessage().contains("(0)"), e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> NoiseStatistics.sampleTrace(new double[5], 3, 2));
        assertTrue(e.getMessage().contains("rows (3)") && e.getMessage().contains("5"), e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> NoiseStatistics.stratifiedVariance(
                new double[] {0.5, 0.5}, new int[] {3, 1}, new int[] {2, 2}, new double[2], 2));
        assertTrue(e.getMessage().contains("drawn[0] (3)"), e.getMessage());
    }

    @Test
    void objectiveGradientsAverageToTheFullGradient() {
        // Sanity of the test's own side: the mean per-sample gradient is the objective's full gradient.
        LeastSquaresProblem problem = LeastSquaresProblem.gaussian(4, 7, 2, 0.5);
        LinearObjective objective = LinearObjective.of(problem.data, Losses.squared(), Penalty.l2(0.3), true);
        double[] h = {0.3, -0.2, 0.1};
        Gradients g = Gradients.of(objective, h);
        double[] full = new double[3];
        objective.gradient(h, full);
        for (int c = 0; c < 3; c++) {
            assertEquals(full[c], g.mean[c], 1e-14);
        }
    }

    // ---- enumeration helpers --------------------------------------------------------------------

    private static List<Double> batchNorms(Gradients g, int b) {
        List<Double> out = new ArrayList<>();
        double[] mean = new double[g.p];
        tuples(g.n, b, batch -> {
            NoiseStatistics.meanGradient(g.block(batch), null, b, g.p, mean);
            out.add(NoiseStatistics.normSquared(mean, g.p));
        });
        return out;
    }

    /** Every ordered B-tuple of {0 … n−1} (n^B of them). */
    static void tuples(int n, int b, Consumer<int[]> action) {
        int[] idx = new int[b];
        while (true) {
            action.accept(idx.clone());
            int k = b - 1;
            while (k >= 0 && ++idx[k] == n) {
                idx[k] = 0;
                k--;
            }
            if (k < 0) {
                return;
            }
        }
    }

    /** Every B-subset of {0 … n−1} in lexicographic order (C(n, B) of them). */
    static void subsets(int n, int b, Consumer<int[]> action) {
        int[] idx = new int[b];
        for (int k = 0; k < b; k++) {
            idx[k] = k;
        }
        while (true) {
            action.accept(idx.clone());
            int k = b - 1;
            while (k >= 0 && idx[k] == n - b + k) {
                k--;
            }
            if (k < 0) {
                return;
            }
            idx[k]++;
            for (int j = k + 1; j < b; j++) {
                idx[j] = idx[j - 1] + 1;
            }
        }
    }

    private static void forEachStratifiedBatch(int[] first, int[] second, int[] drawn,
                                               java.util.function.BiConsumer<int[], int[]> action) {
        subsets(first.length, drawn[0], a -> subsets(second.length, drawn[1], b -> {
            int[] fa = new int[a.length];
            for (int k = 0; k < a.length; k++) {
                fa[k] = first[a[k]];
            }
            int[] fb = new int[b.length];
            for (int k = 0; k < b.length; k++) {
                fb[k] = second[b[k]];
            }
            action.accept(fa, fb);
        }));
    }

    private static int binomial(int n, int k) {
        long r = 1;
        for (int j = 1; j <= k; j++) {
            r = r * (n - k + j) / j;
        }
        return (int) r;
    }

    private static void assertClose(double expected, double actual, String what) {
        double scale = Math.max(1.0, Math.abs(expected));
        assertTrue(Math.abs(actual - expected) <= TOLERANCE * scale,
                what + ": expected " + expected + ", got " + actual + " (difference " + (actual - expected) + ")");
    }
}
