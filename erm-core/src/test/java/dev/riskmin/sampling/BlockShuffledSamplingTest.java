package dev.riskmin.sampling;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.riskmin.data.Dataset;
import dev.riskmin.loss.Losses;
import dev.riskmin.objective.LinearObjective;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.testing.Cases;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.random.RandomGenerator;
import org.apache.commons.math3.stat.inference.ChiSquareTest;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;
import org.junit.jupiter.params.provider.MethodSource;

/**
 * The statistical promises of {@link BlockShuffledSampling}: a permutation per epoch, a uniform
 * marginal at every position of an epoch, unbiased batch gradients, and the batch composition
 * derived in the class documentation (rows of one block share a batch far more often than under
 * uniform sampling without replacement).
 */
class BlockShuffledSamplingTest {

    private static BatchSource start(Sampling sampling, int n, long seed) {
        return sampling.start(SamplingContext.of(n, null, null), Cases.rng(seed));
    }

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

    private static void assertEachRunOfNIsPermutation(int[] stream, int n) {
        for (int start = 0; start + n <= stream.length; start += n) {
            int[] seen = new int[n];
            for (int k = start; k < start + n; k++) {
                seen[stream[k]]++;
            }
            for (int i = 0; i < n; i++) {
                assertEquals(1, seen[i], "sample " + i + " in the run of draws starting at " + start);
            }
        }
    }

    private static int circularDistance(int i, int j, int n) {
        int a = Math.abs(i - j);
        return Math.min(a, n - a);
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void everySampleAppearsOncePerEpochWhenBatchDividesN(long seed) {
        int n = 120;
        int batchSize = 12; // blocks of 16: seven full ones and a partial one of 8
        int[] stream = drawStream(start(Sampling.blockShuffled(16), n, seed), batchSize, 5 * n / batchSize);
        assertEachRunOfNIsPermutation(stream, n);
        assertFalse(Arrays.equals(stream, 0, n, stream, n, 2 * n), "epochs 1 and 2 drew the same order");
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void consecutiveRunsOfNArePermutationsWhenBatchDoesNotDivideN(long seed) {
        int n = 37;
        int batchSize = 10; // an epoch runs out in the middle of a batch almost every time
        for (int blockRows : new int[] {1, 5, 36, 37, 64}) {
            int[] stream = drawStream(start(Sampling.blockShuffled(blockRows), n, seed), batchSize, 40);
            assertEachRunOfNIsPermutation(stream, n); // 400 draws: 10 complete runs of 37
        }
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void blocksAreRunsOfConsecutiveRowsWithARandomRotation(long seed) {
        // With m dividing n each slot [s m, (s+1) m) of an epoch holds one block: m rows that are
        // consecutive modulo n. The block boundaries move with the epoch's rotation.
        int n = 96;
        int m = 8;
        int epochs = 40;
        int[] stream = drawStream(start(Sampling.blockShuffled(m), n, seed), n, epochs);
        boolean[] boundaryResidues = new boolean[m];
        for (int e = 0; e < epochs; e++) {
            for (int s = 0; s < n / m; s++) {
                int[] block = Arrays.copyOfRange(stream, e * n + s * m, e * n + (s + 1) * m);
                // The block's first row is the one whose predecessor (mod n) is not in the block.
                int first = -1;
                for (int i : block) {
                    int previous = i == 0 ? n - 1 : i - 1;
                    if (Arrays.stream(block).noneMatch(v -> v == previous)) {
                        assertEquals(-1, first, "epoch " + e + " slot " + s + " is not one run: " + Arrays.toString(block));
                        first = i;
                    }
                }
                for (int j = 0; j < m; j++) {
                    int want = (first + j) % n;
                    assertTrue(Arrays.stream(block).anyMatch(v -> v == want),
                            "epoch " + e + " slot " + s + " misses row " + want + ": " + Arrays.toString(block));
                }
                boundaryResidues[first % m] = true;
            }
        }
        int residues = 0;
        for (boolean r : boundaryResidues) {
            residues += r ? 1 : 0;
        }
        assertTrue(residues > 1, "every epoch cut the blocks at the same boundaries");
    }

    @ParameterizedTest(name = "seed={0}, n={1}, blockRows={2}")
    @CsvSource({"31, 17, 8", "32, 16, 4", "33, 20, 6", "34, 5, 2"})
    void everyPositionOfAnEpochIsUniform(long seed, int n, int blockRows) {
        // Derived in the class documentation: the row at epoch position k is (o + J_k) mod n with the
        // rotation o uniform and independent of J_k, so P(row = i) = 1/n for every k, even with a partial
        // block (n = 17, m = 8: without the rotation, position 0 would hold row 16 with probability 1/3).
        // Pearson chi-square goodness of fit per position at alpha = 0.001 (commons-math3
        // ChiSquareTest; fixed seeds).
        int epochs = 20_000;
        BatchSource source = start(Sampling.blockShuffled(blockRows), n, seed);
        long[][] counts = new long[n][n];
        int[] epoch = new int[n];
        double[] scales = new double[n];
        for (int e = 0; e < epochs; e++) {
            source.next(epoch, scales, n);
            for (int k = 0; k < n; k++) {
                counts[k][epoch[k]]++;
            }
        }
        double[] uniform = new double[n];
        Arrays.fill(uniform, 1.0 / n);
        ChiSquareTest test = new ChiSquareTest();
        for (int k = 0; k < n; k++) {
            assertFalse(test.chiSquareTest(uniform, counts[k], 0.001),
                    "position " + k + " rejects uniformity: p-value " + test.chiSquareTest(uniform, counts[k]));
        }
    }

    /** E[S] for a batch covering epoch positions [from, from + B): exact, from the pair probabilities. */
    private static double derivedNearPairs(int from, int batchSize, int n, int m) {
        int q = n / m;
        double across = (m - 1.0) / ((q - 1.0) * m);
        double expected = 0;
        for (int k = from; k < from + batchSize; k++) {
            for (int l = k + 1; l < from + batchSize; l++) {
                expected += k / m == l / m ? 1.0 : across;
            }
        }
        return expected;
    }

    /** S: the pairs of a batch whose rows lie within circular distance m − 1 (could share a block). */
    private static int nearPairs(int[] batch, int batchSize, int n, int m) {
        int count = 0;
        for (int k = 0; k < batchSize; k++) {
            for (int l = k + 1; l < batchSize; l++) {
                if (circularDistance(batch[k], batch[l], n) < m) {
                    count++;
                }
            }
        }
        return count;
    }

    @Test
    void rowsOfOneBlockShareBatchesAtTheDerivedRate() {
        // Batch composition (derived in the class documentation, m | n, q = n/m blocks): two positions of
        // one epoch hold rows within circular distance m − 1 with probability 1 in the same block slot and
        // (m − 1)/((q − 1) m) across slots; under uniform sampling without replacement the probability is
        // 2(m − 1)/(n − 1) for every pair (elementary: 2(m − 1) such partners among n − 1 other rows).
        // The measured mean of S per batch must match each derived value within 5 standard errors (CLT).
        int n = 960;
        int m = 16;
        int batchSize = 24; // divides n, not a multiple of m: slots straddle batches
        int batches = 20_000;
        BatchSource block = start(Sampling.blockShuffled(m), n, 41);
        BatchSource uniform = start(Sampling.withoutReplacement(), n, 42);
        int[] batch = new int[batchSize];
        double[] scales = new double[batchSize];
        double blockDeviation = 0;
        double blockDeviationSquares = 0;
        double blockMean = 0;
        double derivedBlockMean = 0;
        double uniformSum = 0;
        double uniformSquares = 0;
        for (int b = 0; b < batches; b++) {
            int from = (b * batchSize) % n;
            double derived = derivedNearPairs(from, batchSize, n, m);
            block.next(batch, scales, batchSize);
            int s = nearPairs(batch, batchSize, n, m);
            blockDeviation += s - derived;
            blockDeviationSquares += (s - derived) * (s - derived);
            blockMean += (double) s / batches;
            derivedBlockMean += derived / batches;
            uniform.next(batch, scales, batchSize);
            int u = nearPairs(batch, batchSize, n, m);
            uniformSum += u;
            uniformSquares += (double) u * u;
        }
        double meanDeviation = blockDeviation / batches;
        double blockError = Math.sqrt((blockDeviationSquares / batches - meanDeviation * meanDeviation) / (batches - 1));
        assertTrue(Math.abs(meanDeviation) <= 5 * blockError,
                "block scheme: measured " + blockMean + " near pairs per batch, derived " + derivedBlockMean
                        + ", standard error " + blockError);

        double pairs = batchSize * (batchSize - 1) / 2.0;
        double derivedUniform = pairs * 2.0 * (m - 1) / (n - 1);
        double uniformMean = uniformSum / batches;
        double uniformError = Math.sqrt((uniformSquares / batches - uniformMean * uniformMean) / (batches - 1));
        assertTrue(Math.abs(uniformMean - derivedUniform) <= 5 * uniformError,
                "without replacement: measured " + uniformMean + ", derived " + derivedUniform + ", standard error "
                        + uniformError);
        assertTrue(blockMean > 10 * derivedUniform, "the block scheme should concentrate neighbouring rows");
        System.out.printf("near pairs (circular distance < %d) per batch of %d: block-shuffled %.3f (derived %.3f),"
                        + " uniform without replacement %.3f (derived %.3f)%n", m, batchSize, blockMean,
                derivedBlockMean, uniformMean, derivedUniform);
    }

    /** A least-squares objective whose features drift with the row index, so that position bias would show. */
    private static LinearObjective drifting(RandomGenerator rng, int n, int d) {
        double[][] x = Cases.gaussianMatrix(rng, n, d);
        for (int i = 0; i < n; i++) {
            double t = (double) i / n;
            for (int j = 0; j < d; j++) {
                x[i][j] += 4 * t * t * (j + 1);
            }
        }
        double[] y = Cases.linearTargets(rng, x, Cases.gaussianVector(rng, d, 1.0), 0.5, 0.3);
        return LinearObjective.of(Dataset.of(x, y), Losses.squared(), Penalty.l2(0.05), true);
    }

    @Test
    void batchGradientIsUnbiasedAtEveryBatchOfTheEpoch() {
        // Every position is uniform (derived above), so each batch gradient has expectation G, the full
        // gradient. Batch b of epoch e is independent across epochs: the mean over epochs at a fixed b must
        // sit within 5 standard errors of G per coordinate (CLT). n = 210, m = 64 leaves a partial block.
        RandomGenerator rng = Cases.rng(51);
        int n = 210;
        int d = 3;
        int p = d + 1;
        LinearObjective objective = drifting(rng, n, d);
        double[] h = Cases.gaussianVector(rng, p, 0.5);
        double[] full = new double[p];
        objective.gradient(h, full);
        int batchSize = 30;
        int slots = n / batchSize;
        int epochs = 4000;
        BatchSource source = start(Sampling.blockShuffled(64), n, 52);
        int[] batch = new int[batchSize];
        double[] scales = new double[batchSize];
        double[] g = new double[p];
        double[][] sum = new double[slots][p];
        double[][] squares = new double[slots][p];
        for (int e = 0; e < epochs; e++) {
            for (int b = 0; b < slots; b++) {
                source.next(batch, scales, batchSize);
                objective.batchGradient(h, batch, null, 0, batchSize, g);
                for (int j = 0; j < p; j++) {
                    sum[b][j] += g[j];
                    squares[b][j] += g[j] * g[j];
                }
            }
        }
        for (int b = 0; b < slots; b++) {
            for (int j = 0; j < p; j++) {
                double mean = sum[b][j] / epochs;
                double variance = (squares[b][j] - epochs * mean * mean) / (epochs - 1);
                double standardError = Math.sqrt(variance / epochs);
                assertTrue(Math.abs(mean - full[j]) <= 5 * standardError, "batch " + b + ", coordinate " + j
                        + ": mean " + mean + " vs full gradient " + full[j] + ", standard error " + standardError);
            }
        }
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void epochMeanOfBatchGradientsEqualsFullGradient(long seed) {
        // Elementary: each epoch is a permutation, so with B | n the mean of its n/B batch means is the
        // full mean; the penalty gradient enters every batch gradient and the full gradient once.
        RandomGenerator rng = Cases.rng(seed);
        int n = 120;
        int d = 5;
        LinearObjective objective = drifting(rng, n, d);
        double[] h = Cases.gaussianVector(rng, d + 1, 1.0);
        int batchSize = 8;
        BatchSource source = Sampling.blockShuffled(7).start(SamplingContext.of(n, null, null), rng);
        int[] batch = new int[batchSize];
        double[] scales = new double[batchSize];
        double[] g = new double[d + 1];
        double[] full = new double[d + 1];
        objective.gradient(h, full);
        for (int epoch = 0; epoch < 3; epoch++) {
            double[] mean = new double[d + 1];
            int batches = n / batchSize;
            for (int b = 0; b < batches; b++) {
                source.next(batch, scales, batchSize);
                objective.batchGradient(h, batch, scales, 0, batchSize, g);
                for (int j = 0; j <= d; j++) {
                    mean[j] += g[j] / batches;
                }
            }
            for (int j = 0; j <= d; j++) {
                assertEquals(full[j], mean[j], 1e-12 * Math.max(1.0, Math.abs(full[j])), "epoch " + epoch + ", coordinate " + j);
            }
        }
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void prefetchesEachBlockBeforeDrawingFromIt(long seed) {
        // The prefetcher sees each block's rows (two ranges when the block wraps past row n − 1) before
        // the first of them is drawn, and the ranges of one epoch cover every row exactly once.
        int n = 50;
        int m = 8; // six full blocks and one of 2
        List<int[]> calls = new ArrayList<>();
        SamplingContext context = SamplingContext.of(n, null, null).withPrefetcher((from, to) -> {
            assertTrue(0 <= from && from < to && to <= n, "range [" + from + ", " + to + ")");
            calls.add(new int[] {from, to});
        });
        BatchSource source = Sampling.blockShuffled(m).start(context, Cases.rng(seed));
        int[] draw = new int[1];
        double[] scale = new double[1];
        List<int[]> block = new ArrayList<>();
        int[] covered = new int[n];
        for (int k = 0; k < 10 * n; k++) {
            calls.clear();
            source.next(draw, scale, 1);
            if (!calls.isEmpty()) {
                assertTrue(calls.size() <= 2, "one block, at most two ranges: " + calls.size());
                block = new ArrayList<>(calls);
                for (int[] range : calls) {
                    for (int i = range[0]; i < range[1]; i++) {
                        covered[i]++;
                    }
                }
            }
            int row = draw[0];
            assertTrue(block.stream().anyMatch(r -> r[0] <= row && row < r[1]), "row " + row + " drawn at " + k
                    + " was not prefetched with its block");
            if ((k + 1) % n == 0) {
                for (int i = 0; i < n; i++) {
                    assertEquals((k + 1) / n, covered[i], "row " + i + " prefetched once per epoch");
                }
            }
        }
        assertThrows(NullPointerException.class, () -> SamplingContext.of(n, null, null).withPrefetcher(null));
    }

    @Test
    void sameSeedGivesSameBatchesAcrossBlockSizes() {
        for (int m : new int[] {1, 3, 64}) {
            int[] a = drawStream(start(Sampling.blockShuffled(m), 50, 7), 9, 30);
            int[] b = drawStream(start(Sampling.blockShuffled(m), 50, 7), 9, 30);
            int[] c = drawStream(start(Sampling.blockShuffled(m), 50, 8), 9, 30);
            assertArrayEquals(a, b, "blockRows " + m);
            assertFalse(Arrays.equals(a, c), "blockRows " + m + ": another seed gave the same batches");
        }
    }

    @Test
    void singleSampleAndBatchOfN() {
        assertArrayEquals(new int[] {0, 0, 0}, drawStream(start(Sampling.blockShuffled(), 1, 3), 1, 3));
        BatchSource source = start(Sampling.blockShuffled(4), 9, 3);
        assertTrue(source.uniformScales());
        assertEachRunOfNIsPermutation(drawStream(source, 9, 5), 9);
    }

    @Test
    void refusesBadBlockRowsAndBatchLargerThanN() {
        IllegalArgumentException rows = assertThrows(IllegalArgumentException.class, () -> Sampling.blockShuffled(0));
        assertEquals("blockRows (0) must be >= 1", rows.getMessage());
        Sampling sampling = Sampling.blockShuffled();
        IllegalArgumentException check = assertThrows(IllegalArgumentException.class, () -> sampling.checkBatchSize(11, 10));
        assertEquals("batchSize (11) must be <= n (10) for block-shuffled sampling", check.getMessage());
        BatchSource source = start(sampling, 10, 1);
        IllegalArgumentException inNext = assertThrows(IllegalArgumentException.class,
                () -> source.next(new int[11], new double[11], 11));
        assertEquals("batchSize (11) must be <= n (10) for block-shuffled sampling", inNext.getMessage());
    }

    @Test
    void configurationsCompareByBlockRows() {
        assertEquals(Sampling.blockShuffled(), Sampling.blockShuffled(BlockShuffledSampling.DEFAULT_BLOCK_ROWS));
        assertEquals(Sampling.blockShuffled().hashCode(), Sampling.blockShuffled(64).hashCode());
        assertNotEquals(Sampling.blockShuffled(), Sampling.blockShuffled(32));
        assertEquals("block-shuffled(blockRows=32)", Sampling.blockShuffled(32).name());
        assertEquals(32, ((BlockShuffledSampling) Sampling.blockShuffled(32)).blockRows());
        assertFalse(Sampling.blockShuffled().independentDraws());
    }
}
