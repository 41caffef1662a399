package dev.riskmin.data;

import dev.riskmin.testing.Cases;
import org.apache.commons.math3.stat.descriptive.moment.Mean;
import org.apache.commons.math3.stat.descriptive.moment.StandardDeviation;
import org.apache.commons.math3.stat.descriptive.moment.Variance;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.function.Executable;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.ArrayList;
import java.util.List;
import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertSame;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

class StandardizerTest {

    // ---- data generation ----

    /** Columns with their own offset and spread; |offset|/spread stays below 100 so 1e-12 is reachable. */
    private static double[][] shiftedColumns(RandomGenerator rng, int n, int d) {
        double[][] x = new double[n][d];
        for (int j = 0; j < d; j++) {
            double spread = Math.exp(rng.nextDouble(-3, 3));
            double offset = spread * rng.nextDouble(-50, 50);
            for (int i = 0; i < n; i++) {
                x[i][j] = offset + spread * rng.nextGaussian();
            }
        }
        return x;
    }

    private static double[] column(FeatureMatrix x, int j) {
        double[] c = new double[x.rows()];
        for (int i = 0; i < c.length; i++) {
            c[i] = x.get(i, j);
        }
        return c;
    }

    private static double[] positiveWeights(RandomGenerator rng, int n) {
        double[] w = new double[n];
        for (int i = 0; i < n; i++) {
            w[i] = rng.nextDouble(0.1, 5);
        }
        return w;
    }

    private static void assertRejected(Executable e, String... fragments) {
        IllegalArgumentException ex = assertThrows(IllegalArgumentException.class, e);
        for (String f : fragments) {
            assertTrue(ex.getMessage().contains(f), () -> "message \"" + ex.getMessage() + "\" should contain \"" + f + "\"");
        }
    }

    // ---- fitted moments against commons-math3 ----

    /**
     * The fitted m and s equal commons-math3 3.6.1 {@code Mean} and {@code StandardDeviation(false)}
     * (population form, divisor n), and the standardized columns have mean 0 and standard deviation 1
     * by the same two commons-math3 statistics.
     */
    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds50")
    void standardizedColumnsHaveMeanZeroAndUnitStandardDeviation(long seed) {
        RandomGenerator rng = Cases.rng(seed);
        int n = 2 + rng.nextInt(200);
        int d = 1 + rng.nextInt(6);
        Dataset data = Dataset.of(shiftedColumns(rng, n, d), new double[n]);
        Standardizer st = Standardizer.fit(data);
        Dataset out = st.apply(data);
        double[] m = st.means();
        double[] s = st.scales();
        for (int j = 0; j < d; j++) {
            double[] raw = column(data.features(), j);
            double[] std = column(out.features(), j);
            // commons-math3 Mean / StandardDeviation(false): the population moments.
            double refMean = new Mean().evaluate(raw);
            double refSd = new StandardDeviation(false).evaluate(raw);
            assertEquals(refMean, m[j], 1e-12 * (Math.abs(refMean) + refSd), "mean of column " + j);
            assertEquals(refSd, s[j], 1e-12 * refSd, "standard deviation of column " + j);
            assertEquals(0.0, new Mean().evaluate(std), 1e-12, "standardized mean of column " + j);
            assertEquals(1.0, new StandardDeviation(false).evaluate(std), 1e-12, "standardized sd of column " + j);
        }
    }

    /**
     * With weights, m and s are the weighted mean and weighted population standard deviation:
     * commons-math3 3.6.1 {@code Mean.evaluate(values, weights)} and
     * {@code Variance(false).evaluate(values, weights)} (divisor Σw).
     */
    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds50")
    void weightedStandardizedColumnsHaveWeightedMeanZeroAndUnitStandardDeviation(long seed) {
        RandomGenerator rng = Cases.rng(seed);
        int n = 2 + rng.nextInt(200);
        int d = 1 + rng.nextInt(6);
        double[] w = positiveWeights(rng, n);
        w[rng.nextInt(n)] = 0; // a row of zero weight must not count
        Dataset data = Dataset.builder().features(shiftedColumns(rng, n, d)).targets(new double[n]).weights(w).build();
        Standardizer st = Standardizer.fit(data);
        Dataset out = st.apply(data);
        for (int j = 0; j < d; j++) {
            double[] raw = column(data.features(), j);
            double[] std = column(out.features(), j);
            // commons-math3 weighted Mean and Variance(false) (population form).
            double refMean = new Mean().evaluate(raw, w);
            double refSd = Math.sqrt(new Variance(false).evaluate(raw, w));
            assertEquals(refMean, st.means()[j], 1e-12 * (Math.abs(refMean) + refSd), "mean of column " + j);
            assertEquals(refSd, st.scales()[j], 1e-12 * refSd, "standard deviation of column " + j);
            assertEquals(0.0, new Mean().evaluate(std, w), 1e-12, "standardized mean of column " + j);
            assertEquals(1.0, Math.sqrt(new Variance(false).evaluate(std, w)), 1e-12, "standardized sd of column " + j);
        }
    }

    /**
     * A column with |mean|/sd = 1e6 (values 1e6 + N(0, 1)): the one-pass update keeps 9 or more
     * digits of the standard deviation against commons-math3 {@code StandardDeviation(false)}
     * (which uses the corrected two-pass formula); measured 10.9 digits. The textbook Σx²/n − m²
     * keeps about 3 here (measured 2.7): its error grows like u·(m/s)², the one-pass update's like
     * u·m/s (Chan, Golub &amp; LeVeque 1983; error orders from memory).
     */
    @Test
    void standardDeviationOfALargeOffsetColumnKeepsItsDigits() {
        RandomGenerator rng = Cases.rng(20240611L);
        int n = 10_000;
        double[][] x = new double[n][1];
        double naiveSum = 0;
        double naiveSquares = 0;
        for (int i = 0; i < n; i++) {
            x[i][0] = 1e6 + rng.nextGaussian();
            naiveSum += x[i][0];
            naiveSquares += x[i][0] * x[i][0];
        }
        Standardizer st = Standardizer.fit(Dataset.of(x, new double[n]));
        double[] raw = new double[n];
        for (int i = 0; i < n; i++) {
            raw[i] = x[i][0];
        }
        double ref = new StandardDeviation(false).evaluate(raw); // commons-math3 3.6.1, population form
        double digits = Cases.digits(st.scales()[0], ref);
        assertTrue(digits >= 9, "digits of the standard deviation: " + digits);
        double naive = Math.sqrt(Math.max(0, naiveSquares / n - (naiveSum / n) * (naiveSum / n)));
        assertTrue(Cases.digits(naive, ref) < digits, "the one-pass update should beat the textbook formula");
    }

    // ---- constant columns ----

    @Test
    void constantColumnIsOnlyCentred() {
        double[][] x = {{3.5, 1}, {3.5, 2}, {3.5, 4}, {3.5, 5}};
        Dataset data = Dataset.of(x, new double[4]);
        Standardizer st = Standardizer.fit(data);
        assertEquals(3.5, st.means()[0]);
        assertEquals(1.0, st.scales()[0]);
        Dataset out = st.apply(data);
        for (int i = 0; i < 4; i++) {
            assertEquals(0.0, out.features().get(i, 0));
        }
        double[] row = new double[2];
        st.applyToRow(new double[]{5.5, 3}, row);
        assertEquals(2.0, row[0], "a new value keeps its units after centring");
    }

    @Test
    void columnConstantOnRowsOfPositiveWeightIsOnlyCentred() {
        double[][] x = {{2}, {2}, {100}, {2}};
        Dataset data = Dataset.builder().features(x).targets(new double[4]).weights(new double[]{1, 3, 0, 2}).build();
        Standardizer st = Standardizer.fit(data);
        assertEquals(2.0, st.means()[0]);
        assertEquals(1.0, st.scales()[0]);
    }

    @Test
    void allZeroSparseColumnGetsUnitScale() {
        SparseFeatures x = SparseFeatures.of(3, 3, new int[]{0, 1, 1, 2}, new int[]{0, 2}, new double[]{4, -3});
        Standardizer st = Standardizer.fit(Dataset.builder().features(x).targets(new double[3]).build());
        assertEquals(1.0, st.scales()[1]);
        assertFalse(st.centres());
    }

    // ---- sparse features ----

    /**
     * Sparse features are scaled by the weighted root mean square (commons-math3 weighted
     * {@code Mean} of the squares) and never centred: the stored pattern is unchanged, zeros stay
     * zero, and every column then has unit second moment.
     */
    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds50")
    void sparseScalingKeepsZerosZeroAndGivesUnitSecondMoment(long seed) {
        RandomGenerator rng = Cases.rng(seed);
        int n = 1 + rng.nextInt(40);
        int d = 1 + rng.nextInt(8);
        List<Integer> cols = new ArrayList<>();
        List<Double> vals = new ArrayList<>();
        int[] rowStart = new int[n + 1];
        for (int i = 0; i < n; i++) {
            for (int j = 0; j < d; j++) {
                if (rng.nextDouble() < 0.3) {
                    cols.add(j);
                    vals.add(3 + 2 * rng.nextGaussian()); // far from zero mean on purpose
                }
            }
            rowStart[i + 1] = cols.size();
        }
        int[] columnIndex = cols.stream().mapToInt(Integer::intValue).toArray();
        double[] values = vals.stream().mapToDouble(Double::doubleValue).toArray();
        double[] w = positiveWeights(rng, n);
        Dataset data = Dataset.builder().sparseFeatures(n, d, rowStart, columnIndex, values).targets(new double[n])
                .weights(w).build();
        Standardizer st = Standardizer.fit(data);
        Dataset out = st.apply(data);
        assertArrayEquals(new double[d], st.means());
        SparseFeatures sp = (SparseFeatures) out.features();
        assertArrayEquals(rowStart, sp.rowStart());
        assertArrayEquals(columnIndex, sp.columnIndex());
        for (int j = 0; j < d; j++) {
            double[] squares = column(data.features(), j);
            double[] scaledSquares = column(sp, j);
            for (int i = 0; i < n; i++) {
                if (squares[i] == 0) {
                    assertEquals(0.0, scaledSquares[i], "x'[" + i + ", " + j + "]");
                }
                squares[i] *= squares[i];
                scaledSquares[i] *= scaledSquares[i];
            }
            // commons-math3 weighted Mean of x²: the weighted mean square.
            double meanSquare = new Mean().evaluate(squares, w);
            double expected = meanSquare > 0 ? Math.sqrt(meanSquare) : 1.0;
            assertEquals(expected, st.scales()[j], 1e-13 * expected, "scale of column " + j);
            if (meanSquare > 0) {
                assertEquals(1.0, new Mean().evaluate(scaledSquares, w), 1e-12, "second moment of column " + j);
            }
        }
    }

    @Test
    void fitScalingOnDenseDataDoesNotCentre() {
        double[][] x = {{1, 0}, {3, 0}, {-1, 0}};
        Standardizer st = Standardizer.fitScaling(Dataset.of(x, new double[3]));
        assertFalse(st.centres());
        assertArrayEquals(new double[]{0, 0}, st.means());
        assertArrayEquals(new double[]{Math.sqrt(11.0 / 3.0), 1.0}, st.scales(), 1e-15);
    }

    @Test
    void centringStandardizerRefusesSparseFeaturesNamingTheColumn() {
        Standardizer st = Standardizer.of(new double[]{0, 2.5}, new double[]{1, 1});
        Dataset sparse = Dataset.builder().sparseFeatures(1, 2, new int[]{0, 1}, new int[]{1}, new double[]{1})
                .targets(new double[1]).build();
        assertRejected(() -> st.apply(sparse), "means[1] = 2.5", "dense");
    }

    // ---- the parameter maps ----

    private static Dataset randomData(RandomGenerator rng, int n, int d) {
        double[][] x = shiftedColumns(rng, n, d);
        if (d > 1 && rng.nextDouble() < 0.3) {
            int j = rng.nextInt(d);
            for (double[] row : x) {
                row[j] = 7.25; // a constant column
            }
        }
        Dataset.Builder b = Dataset.builder().features(x).targets(new double[n]);
        if (rng.nextBoolean()) {
            b.weights(positiveWeights(rng, n));
        }
        return b.build();
    }

    /**
     * For random h' the decision values w'·x' + b' on standardized rows equal w·x + b on original
     * rows with (w, b) = toOriginalScale(h'). Exact algebra (the identity in the class javadoc); the
     * tolerance is 1e-12 relative to Σ|terms| = |b'| + Σ|w'_j|(|x_j| + |m_j|)/s_j, the size of the
     * numbers being added, because z itself may be near zero.
     */
    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void decisionValuesAgreeOnBothScales(long seed) {
        RandomGenerator rng = Cases.rng(seed);
        int n = 2 + rng.nextInt(30);
        int d = 1 + rng.nextInt(8);
        Dataset data = randomData(rng, n, d);
        Standardizer st = Standardizer.fit(data);
        FeatureMatrix std = st.apply(data).features();
        for (int blocks : new int[]{1, 3}) {
            double[] hStd = Cases.gaussianVector(rng, blocks * (d + 1), 2.0);
            double[] h = st.toOriginalScale(hStd, blocks, true);
            assertDecisionValuesAgree(data.features(), std, st, hStd, h, blocks, true);
        }
    }

    /** Without intercept a scaling-only standardizer maps exactly too (same identity, m = 0). */
    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds50")
    void decisionValuesAgreeOnBothScalesWithoutIntercept(long seed) {
        RandomGenerator rng = Cases.rng(seed);
        int n = 2 + rng.nextInt(30);
        int d = 1 + rng.nextInt(8);
        Dataset data = randomData(rng, n, d);
        Standardizer st = Standardizer.fitScaling(data);
        FeatureMatrix std = st.apply(data).features();
        for (int blocks : new int[]{1, 3}) {
            double[] hStd = Cases.gaussianVector(rng, blocks * d, 2.0);
            double[] h = st.toOriginalScale(hStd, blocks, false);
            assertDecisionValuesAgree(data.features(), std, st, hStd, h, blocks, false);
        }
    }

    private static void assertDecisionValuesAgree(FeatureMatrix raw, FeatureMatrix std, Standardizer st, double[] hStd,
                                                  double[] h, int blocks, boolean intercept) {
        int d = raw.columns();
        int stride = intercept ? d + 1 : d;
        double[] m = st.means();
        double[] s = st.scales();
        for (int i = 0; i < raw.rows(); i++) {
            for (int k = 0; k < blocks; k++) {
                int base = k * stride;
                double zStd = std.dot(i, hStd, base) + (intercept ? hStd[base + d] : 0);
                double z = raw.dot(i, h, base) + (intercept ? h[base + d] : 0);
                double size = intercept ? Math.abs(hStd[base + d]) : 0;
                for (int j = 0; j < d; j++) {
                    size += Math.abs(hStd[base + j]) * (Math.abs(raw.get(i, j)) + Math.abs(m[j])) / s[j];
                }
                assertEquals(zStd, z, 1e-12 * size, "row " + i + ", block " + k);
            }
        }
    }

    /** fromOriginalScale(toOriginalScale(h')) = h', to 1e-12 relative to the size of the terms. */
    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void fromOriginalScaleInvertsToOriginalScale(long seed) {
        RandomGenerator rng = Cases.rng(seed);
        int d = 1 + rng.nextInt(8);
        Dataset data = randomData(rng, 2 + rng.nextInt(30), d);
        Standardizer st = Standardizer.fit(data);
        double[] m = st.means();
        double[] s = st.scales();
        int blocks = 1 + rng.nextInt(3);
        double[] hStd = Cases.gaussianVector(rng, blocks * (d + 1), 2.0);
        double[] h = st.toOriginalScale(hStd, blocks, true);
        double[] back = st.fromOriginalScale(h, blocks, true);
        double[] again = st.toOriginalScale(back, blocks, true);
        for (int k = 0; k < blocks; k++) {
            int base = k * (d + 1);
            double size = Math.abs(hStd[base + d]);
            for (int j = 0; j < d; j++) {
                assertEquals(hStd[base + j], back[base + j], 1e-15 * Math.abs(hStd[base + j]), "w'[" + k + ", " + j + "]");
                assertEquals(h[base + j], again[base + j], 1e-15 * Math.abs(h[base + j]), "w[" + k + ", " + j + "]");
                size += Math.abs(hStd[base + j] * m[j] / s[j]);
            }
            assertEquals(hStd[base + d], back[base + d], 1e-12 * size, "b'[" + k + "]");
            assertEquals(h[base + d], again[base + d], 1e-12 * size, "b[" + k + "]");
        }
    }

    @Test
    void parameterMapsMatchHandComputedValues() {
        // m = (1, -2), s = (2, 0.5): w = (4/2, 3/0.5) = (2, 6); b = 1 - (2·1 + 6·(-2)) = 11.
        Standardizer st = Standardizer.of(new double[]{1, -2}, new double[]{2, 0.5});
        assertArrayEquals(new double[]{2, 6, 11}, st.toOriginalScale(new double[]{4, 3, 1}, 1, true));
        assertArrayEquals(new double[]{4, 3, 1}, st.fromOriginalScale(new double[]{2, 6, 11}, 1, true));
    }

    @Test
    void mapWithoutInterceptRefusesCentringNamingOptionAndColumn() {
        Standardizer st = Standardizer.of(new double[]{0, 0, -1.5}, new double[]{1, 2, 3});
        assertRejected(() -> st.toOriginalScale(new double[3], 1, false), "intercept (false)", "column 2",
                "means[2] = -1.5");
        assertRejected(() -> st.fromOriginalScale(new double[3], 1, false), "intercept (false)", "column 2");
    }

    @Test
    void mapRejectsWrongParameterLengthNamingTheSizes() {
        Standardizer st = Standardizer.of(new double[]{0, 1}, new double[]{1, 2});
        assertRejected(() -> st.toOriginalScale(new double[8], 3, true), "h has 8", "blocks (3)", "= 9");
        assertRejected(() -> st.fromOriginalScale(new double[3], 2, true), "h has 3", "blocks (2)", "= 6");
    }

    @Test
    void mapRejectsBlockCountBelowOne() {
        Standardizer st = Standardizer.of(new double[]{0}, new double[]{1});
        assertRejected(() -> st.toOriginalScale(new double[0], 0, true), "blocks (0)");
    }

    // ---- rows, copies, restored parameters, failures ----

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void applyToRowMatchesTheAppliedDatasetAndWorksInPlace(long seed) {
        RandomGenerator rng = Cases.rng(seed);
        int n = 2 + rng.nextInt(20);
        int d = 1 + rng.nextInt(6);
        Dataset data = randomData(rng, n, d);
        Standardizer st = Standardizer.fit(data);
        FeatureMatrix std = st.apply(data).features();
        double[] out = new double[d];
        for (int i = 0; i < n; i++) {
            double[] row = data.features().rowCopy(i);
            st.applyToRow(row, out);
            assertArrayEquals(std.rowCopy(i), out, "row " + i);
            st.applyToRow(row, row);
            assertArrayEquals(out, row, "row " + i + " in place");
        }
    }

    @Test
    void applyKeepsTargetsWeightsAndStrata() {
        Dataset data = Dataset.builder().features(new double[][]{{1, 5}, {2, 6}, {4, 9}}).labels(new int[]{2, 0, 1})
                .weights(new double[]{1, 2, 1}).strata(new int[]{0, 1, 1}).build();
        Dataset out = Standardizer.fit(data).apply(data);
        assertArrayEquals(data.targetsView(), out.targetsView());
        assertEquals(3, out.classes());
        assertArrayEquals(data.normalizedWeightsView(), out.normalizedWeightsView());
        assertArrayEquals(new int[]{0, 1, 1}, out.strataCopy());
    }

    @Test
    void dataAreNotChangedByApply() {
        double[] flat = {1, 2, 3, 4};
        Dataset data = Dataset.builder().flatFeatures(flat, 2, 2, false).targets(new double[2]).build();
        Dataset out = Standardizer.fit(data).apply(data);
        assertArrayEquals(new double[]{1, 2, 3, 4}, flat);
        assertSame(flat, ((DenseFeatures) data.features()).values());
        assertEquals(-1.0, out.features().get(0, 0));
    }

    @Test
    void meansAndScalesAreCopies() {
        Standardizer st = Standardizer.of(new double[]{1, 2}, new double[]{3, 4});
        st.means()[0] = 99;
        st.scales()[1] = 99;
        assertArrayEquals(new double[]{1, 2}, st.means());
        assertArrayEquals(new double[]{3, 4}, st.scales());
    }

    @Test
    void restoredParametersAreCopiedIn() {
        double[] m = {1, 2};
        double[] s = {3, 4};
        Standardizer st = Standardizer.of(m, s);
        m[0] = 99;
        s[0] = 99;
        assertArrayEquals(new double[]{1, 2}, st.means());
        assertArrayEquals(new double[]{3, 4}, st.scales());
    }

    @Test
    void restoredParametersRejectNonFiniteMeanNamingTheIndex() {
        assertRejected(() -> Standardizer.of(new double[]{0, Double.NaN}, new double[]{1, 1}), "means[1] (NaN)");
    }

    @Test
    void restoredParametersRejectZeroScaleNamingTheIndex() {
        assertRejected(() -> Standardizer.of(new double[]{0, 0}, new double[]{0.0, 1}), "scales[0] (0.0)");
    }

    @Test
    void restoredParametersRejectLengthMismatchNamingBoth() {
        assertRejected(() -> Standardizer.of(new double[]{0, 0}, new double[]{1}), "means have 2", "scales have 1");
    }

    @Test
    void applyRejectsOtherColumnCountNamingBoth() {
        Standardizer st = Standardizer.of(new double[]{0, 0}, new double[]{1, 1});
        assertRejected(() -> st.apply(Dataset.of(new double[][]{{1, 2, 3}}, new double[1])), "3 columns", "fitted on 2");
    }

    @Test
    void applyToRowRejectsWrongLengthsNamingThem() {
        Standardizer st = Standardizer.of(new double[]{0, 0}, new double[]{1, 1});
        assertRejected(() -> st.applyToRow(new double[3], new double[2]), "x has 3", "out has 2", "2 columns");
    }

    @Test
    void columnWhoseSpreadOverflowsIsRejectedNamingTheColumn() {
        double[][] x = {{0, 1e200}, {1, -1e200}, {2, 1e200}};
        assertRejected(() -> Standardizer.fit(Dataset.of(x, new double[3])), "column 1", "overflows");
    }

    @Test
    void sparseColumnWhoseSquaresOverflowIsRejectedNamingTheColumn() {
        Dataset data = Dataset.builder().sparseFeatures(2, 3, new int[]{0, 1, 2}, new int[]{2, 2},
                new double[]{1e200, 1}).targets(new double[2]).build();
        assertRejected(() -> Standardizer.fit(data), "column 2", "overflows");
    }
}
