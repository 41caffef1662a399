package dev.riskmin.data;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.function.Executable;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Every bad input is refused at construction with an {@link IllegalArgumentException} whose
 * message names the place (row, column, option) and the value. One test per case; the messages
 * are our own wording, so the fragments checked are the names and numbers, not whole sentences.
 */
class DatasetValidationTest {

    private static final double[] Y3 = {1, 2, 3};

    private static void assertRejected(Executable build, String... fragments) {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, build);
        String message = e.getMessage();
        for (String fragment : fragments) {
            assertTrue(message != null && message.contains(fragment),
                    () -> "message \"" + message + "\" should contain \"" + fragment + "\"");
        }
    }

    private static double[][] rows3x3() {
        return new double[][]{{1, 2, 3}, {4, 5, 6}, {7, 8, 9}};
    }

    // ---- non-finite features ----

    @ParameterizedTest(name = "value={0}")
    @ValueSource(doubles = {Double.NaN, Double.POSITIVE_INFINITY, Double.NEGATIVE_INFINITY})
    void nonFiniteFeatureInRowsIsRejectedNamingRowColumnAndValue(double bad) {
        double[][] x = rows3x3();
        x[1][2] = bad;
        assertRejected(() -> Dataset.of(x, Y3), "x[1, 2]", String.valueOf(bad));
    }

    @ParameterizedTest(name = "value={0}")
    @ValueSource(doubles = {Double.NaN, Double.POSITIVE_INFINITY, Double.NEGATIVE_INFINITY})
    void nonFiniteFeatureInFlatArrayIsRejectedNamingRowColumnAndValue(double bad) {
        double[] flat = {1, 2, 3, 4, 5, 6};
        flat[3] = bad; // row 1, column 0 with 3 columns
        assertRejected(() -> Dataset.builder().flatFeatures(flat, 2, 3, false).targets(new double[]{0, 1}).build(),
                "x[1, 0]", String.valueOf(bad));
    }

    @ParameterizedTest(name = "value={0}")
    @ValueSource(doubles = {Double.NaN, Double.POSITIVE_INFINITY, Double.NEGATIVE_INFINITY})
    void nonFiniteFeatureInSparseRowsIsRejectedNamingRowColumnAndValue(double bad) {
        // row 0: (0, 1.0); row 1: (2, bad)
        assertRejected(() -> SparseFeatures.of(2, 4, new int[]{0, 1, 2}, new int[]{0, 2}, new double[]{1.0, bad}),
                "x[1, 2]", String.valueOf(bad));
    }

    // ---- shape of dense rows ----

    @Test
    void raggedShortRowIsRejectedNamingRowAndLengths() {
        double[][] x = {{1, 2, 3}, {4, 5, 6}, {7, 8}};
        assertRejected(() -> Dataset.of(x, Y3), "row 2", "2 columns", "row 0 has 3");
    }

    @Test
    void raggedLongRowIsRejectedNamingRowAndLengths() {
        double[][] x = {{1, 2}, {4, 5, 6}, {7, 8}};
        assertRejected(() -> Dataset.of(x, Y3), "row 1", "3 columns", "row 0 has 2");
    }

    @Test
    void nullFirstRowIsRejectedNamingTheRow() {
        double[][] x = {null, {4, 5, 6}, {7, 8, 9}};
        assertRejected(() -> Dataset.of(x, Y3), "row 0 is null");
    }

    @Test
    void nullLaterRowIsRejectedNamingTheRow() {
        double[][] x = {{1, 2, 3}, {4, 5, 6}, null};
        assertRejected(() -> Dataset.of(x, Y3), "row 2 is null");
    }

    // ---- empty data ----

    @Test
    void rowsWithoutAnyRowAreRejected() {
        assertRejected(() -> Dataset.of(new double[0][], new double[0]), "no rows");
    }

    @Test
    void rowsWithoutAnyColumnAreRejected() {
        assertRejected(() -> Dataset.of(new double[][]{{}, {}}, new double[]{1, 2}), "row 0", "no columns");
    }

    @Test
    void flatFeaturesWithZeroRowsAreRejectedNamingRows() {
        assertRejected(() -> DenseFeatures.ofFlat(new double[0], 0, 3, true), "rows (0)");
    }

    @Test
    void flatFeaturesWithZeroColumnsAreRejectedNamingColumns() {
        assertRejected(() -> DenseFeatures.ofFlat(new double[0], 3, 0, true), "columns (0)");
    }

    @Test
    void sparseFeaturesWithZeroRowsAreRejectedNamingRows() {
        assertRejected(() -> SparseFeatures.of(0, 3, new int[]{0}, new int[0], new double[0]), "rows (0)");
    }

    @Test
    void sparseFeaturesWithZeroColumnsAreRejectedNamingColumns() {
        assertRejected(() -> SparseFeatures.of(1, 0, new int[]{0, 0}, new int[0], new double[0]), "columns (0)");
    }

    // ---- flat array size ----

    @Test
    void flatArrayOfWrongSizeIsRejectedNamingAllSizes() {
        assertRejected(() -> DenseFeatures.ofFlat(new double[5], 2, 3, true), "5 entries", "rows (2)",
                "columns (3)", "= 6");
    }

    // ---- targets ----

    @Test
    void targetsOfWrongLengthAreRejectedNamingBothLengths() {
        assertRejected(() -> Dataset.of(rows3x3(), new double[]{1, 2}), "targets have 2", "3 rows");
    }

    @Test
    void labelsOfWrongLengthAreRejectedNamingBothLengths() {
        assertRejected(() -> Dataset.of(rows3x3(), new int[]{0, 1, 0, 1}), "targets have 4", "3 rows");
    }

    @ParameterizedTest(name = "value={0}")
    @ValueSource(doubles = {Double.NaN, Double.POSITIVE_INFINITY, Double.NEGATIVE_INFINITY})
    void nonFiniteTargetIsRejectedNamingRowAndValue(double bad) {
        assertRejected(() -> Dataset.of(rows3x3(), new double[]{1, bad, 3}), "y[1]", String.valueOf(bad));
    }

    // ---- weights ----

    @Test
    void weightsOfWrongLengthAreRejectedNamingBothLengths() {
        assertRejected(() -> Dataset.builder().features(rows3x3()).targets(Y3).weights(new double[]{1, 1}).build(),
                "weights have 2", "3 rows");
    }

    @Test
    void negativeWeightIsRejectedNamingRowAndValue() {
        assertRejected(() -> Dataset.builder().features(rows3x3()).targets(Y3).weights(new double[]{1, -0.5, 1})
                .build(), "weights[1]", "-0.5");
    }

    @Test
    void nanWeightIsRejectedNamingRowAndValue() {
        assertRejected(() -> Dataset.builder().features(rows3x3()).targets(Y3).weights(new double[]{1, 1, Double.NaN})
                .build(), "weights[2]", "NaN");
    }

    @Test
    void infiniteWeightIsRejectedNamingRowAndValue() {
        assertRejected(() -> Dataset.builder().features(rows3x3()).targets(Y3)
                .weights(new double[]{Double.POSITIVE_INFINITY, 1, 1}).build(), "weights[0]", "Infinity");
    }

    @Test
    void allZeroWeightsAreRejectedNamingTheRowCount() {
        assertRejected(() -> Dataset.builder().features(rows3x3()).targets(Y3).weights(new double[]{0, 0, 0}).build(),
                "all zero", "3 rows");
    }

    // ---- class labels ----

    @Test
    void negativeLabelIsRejectedNamingRowAndLabel() {
        assertRejected(() -> Dataset.builder().features(rows3x3()).labels(new int[]{0, -1, 1}, 3).build(),
                "labels[1]", "(-1)", "[0, 3)");
    }

    @Test
    void negativeLabelWithInferredClassCountIsRejectedNamingRowAndLabel() {
        assertRejected(() -> Dataset.of(rows3x3(), new int[]{0, 1, -2}), "labels[2]", "(-2)");
    }

    @Test
    void labelEqualToClassCountIsRejectedNamingRowAndLabel() {
        assertRejected(() -> Dataset.builder().features(rows3x3()).labels(new int[]{0, 3, 1}, 3).build(),
                "labels[1]", "(3)", "[0, 3)");
    }

    @Test
    void oneClassIsRejectedNamingTheOption() {
        assertRejected(() -> Dataset.builder().features(rows3x3()).labels(new int[]{0, 0, 0}, 1).build(),
                "classes (1)", ">= 2");
    }

    @Test
    void zeroClassesAreRejectedNamingTheOption() {
        assertRejected(() -> Dataset.builder().features(rows3x3()).labels(new int[]{0, 0, 0}, 0).build(),
                "classes (0)");
    }

    // ---- compressed sparse rows ----

    @Test
    void rowStartOfWrongLengthIsRejectedNamingLengths() {
        assertRejected(() -> SparseFeatures.of(3, 2, new int[]{0, 1, 2}, new int[]{0, 1}, new double[]{1, 2}),
                "rowStart has 3", "rows + 1 = 4");
    }

    @Test
    void rowStartNotStartingAtZeroIsRejectedNamingTheValue() {
        assertRejected(() -> SparseFeatures.of(2, 2, new int[]{1, 1, 2}, new int[]{0, 1}, new double[]{1, 2}),
                "rowStart[0] (1)");
    }

    @Test
    void decreasingRowStartIsRejectedNamingBothPointers() {
        assertRejected(() -> SparseFeatures.of(3, 2, new int[]{0, 2, 1, 3}, new int[]{0, 1, 0}, new double[]{1, 2, 3}),
                "rowStart[2] (1)", "rowStart[1] (2)");
    }

    @Test
    void rowStartBeyondTheEntriesInTheMiddleIsRejectedNamingBothPointers() {
        // The middle pointer (5) exceeds the 3 entries; the last pointer is right. Reading row 0 first
        // would run past the arrays, so the pointers must be checked before any entry.
        assertRejected(() -> SparseFeatures.of(2, 3, new int[]{0, 5, 3}, new int[]{0, 1, 2}, new double[]{1, 2, 3}),
                "rowStart[2] (3)", "rowStart[1] (5)");
    }

    @Test
    void lastRowStartDifferentFromEntryCountIsRejectedNamingBoth() {
        assertRejected(() -> SparseFeatures.of(2, 2, new int[]{0, 1, 3}, new int[]{0, 1}, new double[]{1, 2}),
                "rowStart[2] (3)", "(2)");
    }

    @Test
    void columnIndexAtColumnCountIsRejectedNamingRowAndIndex() {
        assertRejected(() -> SparseFeatures.of(2, 3, new int[]{0, 1, 2}, new int[]{0, 3}, new double[]{1, 2}),
                "row 1", "column index 3", "[0, 3)");
    }

    @Test
    void negativeColumnIndexIsRejectedNamingRowAndIndex() {
        assertRejected(() -> SparseFeatures.of(2, 3, new int[]{0, 1, 2}, new int[]{-1, 0}, new double[]{1, 2}),
                "row 0", "column index -1");
    }

    @Test
    void repeatedColumnIndexIsRejectedNamingRowAndIndices() {
        assertRejected(() -> SparseFeatures.of(1, 3, new int[]{0, 2}, new int[]{1, 1}, new double[]{1, 2}),
                "row 0", "1 follows 1");
    }

    @Test
    void decreasingColumnIndexIsRejectedNamingRowAndIndices() {
        assertRejected(() -> SparseFeatures.of(2, 3, new int[]{0, 1, 3}, new int[]{0, 2, 0}, new double[]{1, 2, 3}),
                "row 1", "0 follows 2");
    }

    @Test
    void columnIndicesAndValuesOfDifferentLengthAreRejectedNamingBoth() {
        assertRejected(() -> SparseFeatures.of(1, 3, new int[]{0, 2}, new int[]{0, 1, 2}, new double[]{1, 2}),
                "columnIndex has 3", "values has 2");
    }

    // ---- strata ----

    @Test
    void strataWithAGapAreRejectedNamingTheEmptyStratum() {
        assertRejected(() -> Dataset.builder().features(rows3x3()).targets(Y3).strata(new int[]{0, 2, 2}).build(),
                "stratum 1 is empty", "0..2");
    }

    @Test
    void negativeStratumIsRejectedNamingRowAndValue() {
        assertRejected(() -> Dataset.builder().features(rows3x3()).targets(Y3).strata(new int[]{0, -1, 1}).build(),
                "strata[1] (-1)");
    }

    @Test
    void strataOfWrongLengthAreRejectedNamingBothLengths() {
        assertRejected(() -> Dataset.builder().features(rows3x3()).targets(Y3).strata(new int[]{0, 1}).build(),
                "strata have 2", "3 rows");
    }

    @Test
    void replacementFeaturesWithOtherRowCountAreRejectedNamingBothCounts() {
        Dataset data = Dataset.of(rows3x3(), Y3);
        assertRejected(() -> data.withFeatures(DenseFeatures.of(new double[][]{{1}, {2}})), "targets have 3",
                "2 rows");
    }
}
