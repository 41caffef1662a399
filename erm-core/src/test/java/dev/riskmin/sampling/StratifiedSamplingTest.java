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
import java.util.Arrays;
import java.util.random.RandomGenerator;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

class StratifiedSamplingTest {
    private static final int[] STRATUM_SIZES = {900, 80, 20}; // 90%, 8%, 2% of n = 1000
    private static final int[] BATCH_SIZES = {7, 20, 32, 50, 100, 333};

    /** Strata of the given sizes, labels spread over the rows in a seeded random order. */
    private static int[] strata(RandomGenerator rng) {
        int n = Arrays.stream(STRATUM_SIZES).sum();
        int[] strata = new int[n];
        int k = 0;
        for (int h = 0; h < STRATUM_SIZES.length; h++) {
            for (int j = 0; j < STRATUM_SIZES[h]; j++) {
                strata[k++] = h;
            }
        }
        for (int i = n - 1; i > 0; i--) {
            int j = rng.nextInt(i + 1);
            int swap = strata[i];
            strata[i] = strata[j];
            strata[j] = swap;
        }
        return strata;
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void everyBatchHoldsEveryStratumWithinOneOfItsProportionalCount(long seed) {
        RandomGenerator rng = Cases.rng(seed);
        int[] strata = strata(rng);
        int n = strata.length;
        int batches = 2000;
        for (int batchSize : BATCH_SIZES) {
            BatchSource source = Sampling.stratified().start(SamplingContext.of(n, strata, null), rng);
            int[] batch = new int[batchSize];
            double[] scales = new double[batchSize];
            double[] meanCount = new double[STRATUM_SIZES.length];
            for (int b = 0; b < batches; b++) {
                Arrays.fill(batch, -1);
                source.next(batch, scales, batchSize);
                int[] count = new int[STRATUM_SIZES.length];
                for (int k = 0; k < batchSize; k++) {
                    count[strata[batch[k]]]++;
                }
                for (int h = 0; h < STRATUM_SIZES.length; h++) {
                    double proportional = (double) batchSize * STRATUM_SIZES[h] / n; // B W_h
                    assertTrue(Math.abs(count[h] - proportional) <= 1.0, "B=" + batchSize + ", batch " + b
                            + ": stratum " + h + " has " + count[h] + " draws, proportional count " + proportional);
                    meanCount[h] += (double) count[h] / batches;
                }
                for (int k = 0; k < batchSize; k++) {
                    // Cochran ch. 5 scale B W_h / n_h where every batch holds the stratum; 1 where it may be absent.
                    int h = strata[batch[k]];
                    double proportional = (double) batchSize * STRATUM_SIZES[h] / n;
                    double expected = proportional >= 1 ? proportional / count[h] : 1.0;
                    assertEquals(expected, scales[k], 1e-12, "scale of a stratum-" + h + " draw, B=" + batchSize);
                }
            }
            for (int h = 0; h < STRATUM_SIZES.length; h++) {
                // The count is ⌊B W_h⌋ or one more, the extra with probability r_h, so its batch average
                // must sit within 5 standard errors sqrt(r_h (1 − r_h)/batches) of B W_h (CLT).
                double proportional = (double) batchSize * STRATUM_SIZES[h] / n;
                double r = proportional - Math.floor(proportional);
                double standardError = Math.sqrt(r * (1 - r) / batches);
                assertTrue(Math.abs(meanCount[h] - proportional) <= 5 * standardError + 1e-9, "B=" + batchSize
                        + ", stratum " + h + ": mean count " + meanCount[h] + " vs " + proportional);
            }
        }
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void drawsWithinAStratumRunThroughPermutationsOfItsMembers(long seed) {
        RandomGenerator rng = Cases.rng(seed);
        int[] strata = strata(rng);
        int n = strata.length;
        int batchSize = 32;
        BatchSource source = Sampling.stratified().start(SamplingContext.of(n, strata, null), rng);
        int[][] stream = new int[STRATUM_SIZES.length][2000 * batchSize];
        int[] length = new int[STRATUM_SIZES.length];
        int[] batch = new int[batchSize];
        double[] scales = new double[batchSize];
        for (int b = 0; b < 2000; b++) {
            source.next(batch, scales, batchSize);
            for (int k = 0; k < batchSize; k++) {
                int h = strata[batch[k]];
                stream[h][length[h]++] = batch[k];
            }
        }
        for (int h = 0; h < STRATUM_SIZES.length; h++) {
            int size = STRATUM_SIZES[h];
            assertTrue(length[h] >= 2 * size, "stratum " + h + " drawn only " + length[h] + " times");
            for (int block = 0; block + size <= length[h]; block += size) {
                boolean[] seen = new boolean[n];
                for (int k = block; k < block + size; k++) {
                    int i = stream[h][k];
                    assertEquals(h, strata[i]);
                    assertFalse(seen[i], "stratum " + h + ": sample " + i + " twice in the block at " + block);
                    seen[i] = true;
                }
            }
        }
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void scaledBatchMeansAreUnbiased(long seed) {
        // The strata differ in their features and targets, so each stratum has its own mean gradient;
        // the scaled batch mean must average to the full gradient G within 5 standard errors per
        // coordinate over many batches (CLT; unbiasedness of the stratified estimator, Cochran ch. 5).
        RandomGenerator rng = Cases.rng(seed);
        int[] strata = strata(rng);
        int n = strata.length;
        int d = 3;
        double[][] x = new double[n][d];
        double[] y = new double[n];
        double[] shift = {0.0, 3.0, -6.0};
        double[] intercept = {0.0, 5.0, -20.0};
        for (int i = 0; i < n; i++) {
            int h = strata[i];
            double z = intercept[h];
            for (int j = 0; j < d; j++) {
                x[i][j] = shift[h] + rng.nextGaussian();
                z += (j + 1) * x[i][j];
            }
            y[i] = z + rng.nextGaussian();
        }
        LinearObjective objective = LinearObjective.of(Dataset.of(x, y), Losses.squared(), Penalty.none(), true);
        int p = d + 1;
        double[] h = Cases.gaussianVector(rng, p, 0.5);
        double[] full = new double[p];
        objective.gradient(h, full);
        for (int batchSize : new int[] {20, 50}) { // B = 20 leaves the 2% stratum out of most batches
            BatchSource source = Sampling.stratified().start(SamplingContext.of(n, strata, null), rng);
            int batches = 10_000;
            int[] batch = new int[batchSize];
            double[] scales = new double[batchSize];
            double[] g = new double[p];
            double[] sum = new double[p];
            double[] sumSquares = new double[p];
            for (int b = 0; b < batches; b++) {
                source.next(batch, scales, batchSize);
                objective.batchGradient(h, batch, scales, 0, batchSize, g);
                for (int j = 0; j < p; j++) {
                    sum[j] += g[j];
                    sumSquares[j] += g[j] * g[j];
                }
            }
            for (int j = 0; j < p; j++) {
                double mean = sum[j] / batches;
                double variance = (sumSquares[j] - batches * mean * mean) / (batches - 1);
                double standardError = Math.sqrt(variance / batches);
                assertTrue(Math.abs(mean - full[j]) <= 5 * standardError, "B=" + batchSize + ", coordinate " + j
                        + ": mean " + mean + " vs full gradient " + full[j] + ", standard error " + standardError);
            }
        }
    }

    @Test
    void refusesMissingStrata() {
        Sampling sampling = Sampling.stratified();
        assertTrue(sampling.needsStrata());
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> sampling.start(SamplingContext.of(10, null, null), Cases.rng(1)));
        assertEquals("stratified sampling needs strata: give them in the dataset or use class labels", e.getMessage());
    }

    @Test
    void refusesStrataWithGapsOrNegativeLabels() {
        Sampling sampling = Sampling.stratified();
        IllegalArgumentException gap = assertThrows(IllegalArgumentException.class,
                () -> sampling.start(SamplingContext.of(4, new int[] {0, 2, 2, 0}, null), Cases.rng(1)));
        assertEquals("stratum 1 is empty: strata must be numbered 0..2 without gaps", gap.getMessage());
        IllegalArgumentException negative = assertThrows(IllegalArgumentException.class,
                () -> sampling.start(SamplingContext.of(3, new int[] {0, -1, 0}, null), Cases.rng(1)));
        assertEquals("strata[1] (-1) must be in [0, 3): strata are numbered 0..S-1 without gaps", negative.getMessage());
    }

    @Test
    void refusesBatchLargerThanN() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> Sampling.stratified().checkBatchSize(101, 100));
        assertEquals("batchSize (101) must be <= n (100) for stratified sampling", e.getMessage());
    }

    @Test
    void oneStratumHasUniformScales() {
        BatchSource source = Sampling.stratified().start(SamplingContext.of(6, new int[6], null), Cases.rng(2));
        assertTrue(source.uniformScales());
        double[] scales = new double[4];
        source.next(new int[4], scales, 4);
        for (double s : scales) {
            assertEquals(1.0, s);
        }
    }
}
