package dev.riskmin.data;

import dev.riskmin.testing.Cases;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.Arrays;
import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotSame;
import static org.junit.jupiter.api.Assertions.assertSame;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** How a dataset holds what it is given: copies, zero-copy wrapping, the two storage forms and the weights. */
class DatasetStorageTest {

    @Test
    void flatArrayIsWrappedWithoutCopyWhenCopyIsFalse() {
        double[] flat = {1, 2, 3, 4, 5, 6};
        Dataset data = Dataset.builder().flatFeatures(flat, 3, 2, false).targets(new double[]{0, 1, 2}).build();
        assertSame(flat, ((DenseFeatures) data.features()).values());
    }

    @Test
    void flatArrayIsCopiedWhenCopyIsTrue() {
        double[] flat = {1, 2, 3, 4, 5, 6};
        Dataset data = Dataset.builder().flatFeatures(flat, 3, 2, true).targets(new double[]{0, 1, 2}).build();
        double[] stored = ((DenseFeatures) data.features()).values();
        assertNotSame(flat, stored);
        assertArrayEquals(flat, stored);
        flat[4] = 99;
        assertEquals(5.0, data.features().get(2, 0));
    }

    @Test
    void rowsAreCopiedSoLaterChangesToTheInputDoNotReachTheDataset() {
        double[][] x = {{1, 2}, {3, 4}, {5, 6}};
        Dataset data = Dataset.of(x, new double[]{0, 1, 2});
        x[1][0] = 99;
        x[2] = new double[]{7, 8};
        assertEquals(3.0, data.features().get(1, 0));
        assertEquals(5.0, data.features().get(2, 0));
        assertArrayEquals(new double[]{1, 2, 3, 4, 5, 6}, ((DenseFeatures) data.features()).values());
    }

    @Test
    void targetsWeightsAndStrataAreCopied() {
        double[] y = {0.5, 1.5, 2.5};
        double[] w = {1, 2, 3};
        int[] s = {0, 1, 0};
        Dataset data = Dataset.builder().features(new double[][]{{1}, {2}, {3}}).targets(y).weights(w).strata(s).build();
        y[0] = 9;
        w[0] = 9;
        s[0] = 1;
        assertEquals(0.5, data.target(0));
        assertEquals(1.0, data.weight(0));
        assertEquals(0, data.stratum(0));
    }

    @Test
    void sparseArraysAreCopied() {
        int[] rowStart = {0, 1, 2};
        int[] columnIndex = {0, 1};
        double[] values = {3, 4};
        SparseFeatures x = SparseFeatures.of(2, 2, rowStart, columnIndex, values);
        values[0] = 99;
        columnIndex[1] = 0;
        assertEquals(3.0, x.get(0, 0));
        assertEquals(4.0, x.get(1, 1));
    }

    /**
     * The same matrix in both forms gives bit-identical results. Entries, h, g and the scale are
     * small dyadic rationals (k/8 with |k| ≤ 64), so every product and partial sum here is exact
     * and the dense form's four partial sums cannot differ from the sparse left-to-right sum by
     * rounding (exact arithmetic, no source needed).
     */
    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void sparseAndDenseFormsOfOneMatrixAgree(long seed) {
        RandomGenerator rng = Cases.rng(seed);
        int n = 1 + rng.nextInt(12);
        int d = 1 + rng.nextInt(15);
        double density = rng.nextDouble();
        double[][] rows = new double[n][d];
        int[] rowStart = new int[n + 1];
        int[] columnIndex = new int[n * d];
        double[] values = new double[n * d];
        int nnz = 0;
        for (int i = 0; i < n; i++) {
            for (int j = 0; j < d; j++) {
                if (rng.nextDouble() < density) {
                    double v = dyadic(rng);
                    rows[i][j] = v;
                    columnIndex[nnz] = j;
                    values[nnz] = v; // a stored zero is allowed and must behave like an absent one
                    nnz++;
                }
            }
            rowStart[i + 1] = nnz;
        }
        DenseFeatures dense = DenseFeatures.of(rows);
        SparseFeatures sparse = SparseFeatures.of(n, d, rowStart, Arrays.copyOf(columnIndex, nnz),
                Arrays.copyOf(values, nnz));
        assertEquals(nnz, sparse.storedEntries());
        assertEquals((long) n * d, dense.storedEntries());

        int blocks = 1 + rng.nextInt(3);
        int offset = rng.nextInt(2) * d; // also address a later block
        double[] h = new double[blocks * d + d];
        for (int k = 0; k < h.length; k++) {
            h[k] = dyadic(rng);
        }
        for (int i = 0; i < n; i++) {
            for (int j = 0; j < d; j++) {
                assertEquals(dense.get(i, j), sparse.get(i, j), "get(" + i + ", " + j + ")");
            }
            assertArrayEquals(dense.rowCopy(i), sparse.rowCopy(i), "rowCopy(" + i + ")");
            assertEquals(dense.dot(i, h, offset), sparse.dot(i, h, offset), "dot(" + i + ")");
            assertEquals(dense.rowSquaredNorm(i), sparse.rowSquaredNorm(i), "rowSquaredNorm(" + i + ")");
            double scale = dyadic(rng);
            double[] gDense = h.clone();
            double[] gSparse = h.clone();
            dense.addRow(i, scale, gDense, offset);
            sparse.addRow(i, scale, gSparse, offset);
            assertArrayEquals(gDense, gSparse, "addRow(" + i + ")");
        }
    }

    private static double dyadic(RandomGenerator rng) {
        return (rng.nextInt(129) - 64) / 8.0;
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds50")
    void normalizedWeightsHaveMeanOneAndAreProportionalToTheGivenWeights(long seed) {
        RandomGenerator rng = Cases.rng(seed);
        int n = 1 + rng.nextInt(50);
        double magnitude = Math.pow(10, rng.nextInt(61) - 30); // the scale of the weights must not matter
        double[] w = new double[n];
        for (int i = 0; i < n; i++) {
            w[i] = rng.nextDouble() < 0.2 ? 0.0 : magnitude * rng.nextDouble();
        }
        w[rng.nextInt(n)] = magnitude; // not all zero
        Dataset data = Dataset.builder().features(Cases.gaussianMatrix(rng, n, 2)).targets(new double[n]).weights(w)
                .build();
        assertNormalized(data, w);
    }

    @Test
    void subnormalWeightsNormalizeToFiniteValues() {
        double[] w = {Double.MIN_VALUE, 2 * Double.MIN_VALUE, 0, Double.MIN_VALUE};
        Dataset data = Dataset.builder().features(new double[][]{{1}, {2}, {3}, {4}}).targets(new double[4]).weights(w)
                .build();
        assertArrayEquals(new double[]{1, 2, 0, 1}, data.normalizedWeightsView(), 1e-15);
    }

    @Test
    void weightsWhoseSumOverflowsNormalizeToFiniteValues() {
        double big = Double.MAX_VALUE;
        double[] w = {big, big, big / 2, 0};
        Dataset data = Dataset.builder().features(new double[][]{{1}, {2}, {3}, {4}}).targets(new double[4]).weights(w)
                .build();
        assertArrayEquals(new double[]{1.6, 1.6, 0.8, 0}, data.normalizedWeightsView(), 1e-15);
    }

    private static void assertNormalized(Dataset data, double[] w) {
        int n = w.length;
        double sum = 0;
        double total = 0;
        for (int i = 0; i < n; i++) {
            sum += data.normalizedWeight(i);
            total += w[i];
            assertEquals(w[i], data.weight(i));
        }
        assertEquals(1.0, sum / n, 1e-14, "mean of the normalized weights");
        for (int i = 0; i < n; i++) {
            double expected = n * (w[i] / total);
            assertTrue(Math.abs(data.normalizedWeight(i) - expected) <= 1e-14 * Math.max(1.0, expected),
                    "omega[" + i + "] = " + data.normalizedWeight(i) + ", expected " + expected);
        }
    }

    @Test
    void unweightedDataHaveUnitNormalizedWeights() {
        Dataset data = Dataset.of(new double[][]{{1}, {2}}, new double[]{0, 1});
        assertEquals(null, data.normalizedWeightsView());
        assertEquals(1.0, data.normalizedWeight(0));
        assertEquals(1.0, data.weight(1));
    }

    @Test
    void withFeaturesKeepsTargetsWeightsAndStrata() {
        Dataset data = Dataset.builder().features(new double[][]{{1}, {2}, {3}}).labels(new int[]{0, 2, 1})
                .weights(new double[]{1, 2, 3}).strata(new int[]{1, 0, 1}).build();
        Dataset other = data.withFeatures(DenseFeatures.of(new double[][]{{4, 5}, {6, 7}, {8, 9}}));
        assertEquals(2, other.dimension());
        assertEquals(TargetKind.CLASSES, other.targetKind());
        assertEquals(3, other.classes());
        assertArrayEquals(data.targetsView(), other.targetsView());
        assertArrayEquals(data.normalizedWeightsView(), other.normalizedWeightsView());
        assertArrayEquals(new int[]{1, 0, 1}, other.strataCopy());
        assertEquals(2, other.strataCount());
    }
}
