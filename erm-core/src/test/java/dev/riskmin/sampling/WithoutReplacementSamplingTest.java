package dev.riskmin.sampling;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
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

class WithoutReplacementSamplingTest {

    /** Draws {@code batches} batches of size B and returns the concatenated indices. */
    private static int[] drawStream(BatchSource source, int batchSize, int batches) {
        int[] batch = new int[batchSize];
        double[] scales = new double[batchSize];
        int[] stream = new int[batchSize * batches];
        for (int b = 0; b < batches; b++) {
            Arrays.fill(scales, Double.NaN);
            source.next(batch, scales, batchSize);
            for (double s : scales) {
                assertEquals(1.0, s, "uniform sampling writes scale 1");
            }
            System.arraycopy(batch, 0, stream, b * batchSize, batchSize);
        }
        return stream;
    }

    private static void assertEachBlockIsPermutation(int[] stream, int n) {
        for (int block = 0; block + n <= stream.length; block += n) {
            int[] seen = new int[n];
            for (int k = block; k < block + n; k++) {
                seen[stream[k]]++;
            }
            for (int i = 0; i < n; i++) {
                assertEquals(1, seen[i], "sample " + i + " in the block of draws starting at " + block);
            }
        }
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void everySampleAppearsOncePerEpochWhenBatchDividesN(long seed) {
        int n = 60;
        int batchSize = 12;
        BatchSource source = Sampling.withoutReplacement().start(SamplingContext.of(n, null, null), Cases.rng(seed));
        int[] stream = drawStream(source, batchSize, 5 * n / batchSize);
        assertEachBlockIsPermutation(stream, n);
        // A fresh shuffle each epoch: five epochs in the same order would be a broken reshuffle.
        assertFalse(Arrays.equals(stream, 0, n, stream, n, 2 * n), "epochs 1 and 2 drew the same order");
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void consecutiveBlocksOfNArePermutationsWhenBatchDoesNotDivideN(long seed) {
        int n = 37;
        int batchSize = 10; // a permutation runs out in the middle of a batch almost every epoch
        BatchSource source = Sampling.withoutReplacement().start(SamplingContext.of(n, null, null), Cases.rng(seed));
        int[] stream = drawStream(source, batchSize, 40); // 400 draws: 10 complete blocks of 37
        assertEachBlockIsPermutation(stream, n);
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void epochMeanOfBatchGradientsEqualsFullGradient(long seed) {
        // Elementary: when every sample appears once per epoch, the mean of the n/B batch means is the
        // full mean; the penalty gradient enters every batch gradient and the full gradient once.
        RandomGenerator rng = Cases.rng(seed);
        int n = 120;
        int d = 5;
        double[][] x = Cases.gaussianMatrix(rng, n, d);
        double[] y = Cases.linearTargets(rng, x, Cases.gaussianVector(rng, d, 1.0), 0.5, 0.3);
        LinearObjective objective = LinearObjective.of(Dataset.of(x, y), Losses.squared(), Penalty.l2(0.05), true);
        double[] h = Cases.gaussianVector(rng, d + 1, 1.0);
        int batchSize = 8;
        BatchSource source = Sampling.withoutReplacement().start(SamplingContext.of(n, null, null), rng);
        int[] batch = new int[batchSize];
        double[] scales = new double[batchSize];
        double[] g = new double[d + 1];
        double[] mean = new double[d + 1];
        int batches = n / batchSize;
        for (int b = 0; b < batches; b++) {
            source.next(batch, scales, batchSize);
            objective.batchGradient(h, batch, scales, 0, batchSize, g);
            for (int j = 0; j <= d; j++) {
                mean[j] += g[j] / batches;
            }
        }
        double[] full = new double[d + 1];
        objective.gradient(h, full);
        assertArrayEquals(full, mean, 1e-12);
    }

    @Test
    void refusesBatchLargerThanN() {
        Sampling sampling = Sampling.withoutReplacement();
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> sampling.checkBatchSize(11, 10));
        assertEquals("batchSize (11) must be <= n (10) without replacement", e.getMessage());
        sampling.checkBatchSize(10, 10);
        BatchSource source = sampling.start(SamplingContext.of(10, null, null), Cases.rng(1));
        IllegalArgumentException inNext = assertThrows(IllegalArgumentException.class,
                () -> source.next(new int[11], new double[11], 11));
        assertEquals("batchSize (11) must be <= n (10) without replacement", inNext.getMessage());
    }

    @Test
    void batchEqualToNIsOnePermutationPerBatch() {
        BatchSource source = Sampling.withoutReplacement().start(SamplingContext.of(9, null, null), Cases.rng(3));
        assertTrue(source.uniformScales());
        assertEachBlockIsPermutation(drawStream(source, 9, 4), 9);
    }
}
