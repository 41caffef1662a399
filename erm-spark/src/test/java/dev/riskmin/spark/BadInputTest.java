package dev.riskmin.spark;

import dev.riskmin.FitOptions;
import dev.riskmin.loss.Losses;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructType;
import org.junit.jupiter.api.Test;

import java.util.Arrays;
import java.util.List;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Bad input fails with an IllegalArgumentException whose message names the column, or the partition and
 * the row within it, and the value (the project's rule for errors; common practice, no source). Errors found
 * on an executor reach the caller as that same error, not as Spark's job failure.
 */
class BadInputTest {
    private static final StructType SCHEMA = DataTypes.createStructType(List.of(
            DataTypes.createStructField("x0", DataTypes.DoubleType, true),
            DataTypes.createStructField("x1", DataTypes.DoubleType, true),
            DataTypes.createStructField("y", DataTypes.DoubleType, true),
            DataTypes.createStructField("w", DataTypes.DoubleType, true),
            DataTypes.createStructField("name", DataTypes.StringType, true)));
    private static final Columns COLUMNS = Columns.of("y", "x0", "x1");

    /** Four rows in two partitions: partition 0 holds rows 0 and 1, partition 1 rows 2 and 3 (its rows 0 and 1). */
    private static List<Row> rows(Object[] last) {
        return Arrays.asList(RowFactory.create(0.5, 1.0, 1.0, 1.0, "a"), RowFactory.create(-0.5, 2.0, 0.0, 1.0, "b"),
                RowFactory.create(1.5, -1.0, 1.0, 1.0, "c"), RowFactory.create(last));
    }

    private static String convertFails(List<Row> rows, Columns columns) {
        return assertThrows(IllegalArgumentException.class,
                () -> PartitionedData.of(LogisticRows.frameOf(rows, SCHEMA, 2), columns).close()).getMessage();
    }

    @Test
    void aMissingColumnIsNamedWithTheColumnsThatExist() {
        String message = convertFails(rows(new Object[] {0.0, 0.0, 0.0, 1.0, "d"}), Columns.of("y", "x0", "x9"));
        assertTrue(message.contains("column 'x9' is not among the data's columns [x0, x1, y, w, name]"), message);
    }

    @Test
    void aColumnOfTextIsRefusedByName() {
        String message = convertFails(rows(new Object[] {0.0, 0.0, 0.0, 1.0, "d"}), Columns.of("name", "x0", "x1"));
        assertTrue(message.contains("column 'name' (target) has type string, not a number"), message);
    }

    @Test
    void aNullCellIsNamedByPartitionRowAndColumn() {
        String message = convertFails(rows(new Object[] {0.0, null, 0.0, 1.0, "d"}), COLUMNS);
        assertEquals("partition 1, row 1: column 'x1' is null; every feature, target and weight needs a number",
                message);
    }

    @Test
    void aNonFiniteCellIsNamedWithItsValue() {
        String message = convertFails(rows(new Object[] {Double.NaN, 0.0, 0.0, 1.0, "d"}), COLUMNS);
        assertEquals("partition 1, row 1: column 'x0' is NaN; values must be finite", message);
    }

    @Test
    void aCellThatIsNotANumberIsNamedInAnRddOfRows() {
        StructType schema = DataTypes.createStructType(List.of(
                DataTypes.createStructField("x0", DataTypes.DoubleType, true),
                DataTypes.createStructField("x1", DataTypes.DoubleType, true),
                DataTypes.createStructField("y", DataTypes.DoubleType, true)));
        JavaRDD<Row> rdd = LogisticRows.context().parallelize(Arrays.asList(RowFactory.create(0.5, 1.0, 1.0),
                RowFactory.create(-0.5, 2.0, 0.0), RowFactory.create(1.5, "abc", 1.0), RowFactory.create(0.0, 0.0, 1.0)), 2);
        String message = assertThrows(IllegalArgumentException.class, () -> PartitionedData.of(rdd, schema, COLUMNS,
                PartitionedData.EmptyPartitions.REJECT).close()).getMessage();
        assertEquals("partition 1, row 0: column 'x1' holds a String (\"abc\"), not a number", message);
    }

    @Test
    void aNegativeWeightIsNamed() {
        String message = convertFails(rows(new Object[] {0.0, 0.0, 0.0, -2.0, "d"}), COLUMNS.withWeight("w"));
        assertEquals("partition 1, row 1: weight column 'w' holds -2.0; weights must be >= 0", message);
    }

    @Test
    void emptyPartitionsAreNamedUnlessSkipped() {
        List<Row> three = rows(new Object[] {0.0, 0.0, 0.0, 1.0, "d"}).subList(0, 3);
        String message = assertThrows(IllegalArgumentException.class,
                () -> PartitionedData.of(LogisticRows.frameOf(three, SCHEMA, 5), COLUMNS).close()).getMessage();
        // parallelize puts 3 rows in 5 slices at [0, 0.6), [0.6, 1.2), ...: partitions 0 and 2 stay empty.
        assertTrue(message.startsWith("2 of 5 partitions hold no rows (partitions 0, 2)"), message);
        try (PartitionedData data = PartitionedData.of(LogisticRows.frameOf(three, SCHEMA, 5), COLUMNS,
                PartitionedData.EmptyPartitions.SKIP)) {
            assertEquals(3, data.size());
            assertEquals(0, data.partitionSizes()[0]);
            double[] g = new double[3];
            double value = DistributedMinimizer.builder().loss(Losses::logistic).build().gradient(data, new double[3], g);
            assertEquals(Math.log(2), value, 1e-15); // ℓ(0, y) = log 2 for every label (from the loss's formula)
        }
    }

    @Test
    void anArrayOfTheWrongLengthIsNamed() {
        StructType schema = DataTypes.createStructType(List.of(
                DataTypes.createStructField("features", DataTypes.createArrayType(DataTypes.DoubleType), true),
                DataTypes.createStructField("y", DataTypes.DoubleType, true)));
        List<Row> rows = Arrays.asList(RowFactory.create(new double[] {1, 2}, 1.0),
                RowFactory.create(new double[] {1, 2, 3}, 0.0));
        String message = assertThrows(IllegalArgumentException.class, () -> PartitionedData.of(
                LogisticRows.frameOf(rows, schema, 1), Columns.array("y", "features")).close()).getMessage();
        assertEquals("partition 0, row 1: column 'features' holds 3 values, but the partition's row 0 holds 2", message);
        String across = assertThrows(IllegalArgumentException.class, () -> PartitionedData.of(
                LogisticRows.frameOf(rows, schema, 2), Columns.array("y", "features")).close()).getMessage();
        assertEquals("partition 1's rows hold 3 features and partition 0's hold 2 (column 'features'); every row needs "
                + "the same number", across);
    }

    @Test
    void aTargetOutsideTheLossDomainIsNamedAtTheFit() {
        List<Row> rows = rows(new Object[] {0.0, 0.0, 2.0, 1.0, "d"});
        try (PartitionedData data = PartitionedData.of(LogisticRows.frameOf(rows, SCHEMA, 2), COLUMNS)) {
            DistributedMinimizer logistic = DistributedMinimizer.builder().loss(Losses::logistic).rounds(1).build();
            String message = assertThrows(IllegalArgumentException.class,
                    () -> logistic.fit(data, FitOptions.none())).getMessage();
            assertTrue(message.startsWith("partition 1 (target column 'y', rows counted from 0 within the partition): "
                    + "y[1] (2.0) is not valid for the logistic loss"), message);
        }
    }

    @Test
    void aPartitionSmallerThanTheLocalBatchIsNamed() {
        List<Row> rows = rows(new Object[] {0.0, 0.0, 1.0, 1.0, "d"});
        try (PartitionedData data = PartitionedData.of(LogisticRows.frameOf(rows, SCHEMA, 2), COLUMNS)) {
            DistributedMinimizer local = DistributedMinimizer.builder().loss(Losses::logistic)
                    .strategy(Strategy.localSgd(5)).batchSize(3).build();
            String message = assertThrows(IllegalArgumentException.class,
                    () -> local.fit(data, FitOptions.none())).getMessage();
            assertTrue(message.startsWith("partition 0 holds 2 rows, too few for local batches of 3 under sampling "
                    + "without replacement"), message);
        }
    }
}
