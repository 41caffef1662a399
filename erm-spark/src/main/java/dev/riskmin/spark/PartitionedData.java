package dev.riskmin.spark;

import dev.riskmin.spark.PartitionBlock.BlockFacts;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.api.java.JavaSparkContext;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.types.StructType;
import org.apache.spark.storage.StorageLevel;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;

/**
 * Rows held by Spark, converted once into cached blocks of the core's dense layout — one flat row-major
 * array of features, the targets and the weights per partition — ready for any number of fits, one after
 * another or at the same time from several threads (close it after the last). Converting reads every cell once and checks it (see {@link Columns}); the blocks stay cached
 * (in memory, spilling to disk) until {@link #close()}.
 *
 * <p>Rows are numbered globally in partition order: row i of partition k has global index
 * o<sub>k</sub> + i, with o<sub>k</sub> the rows of the partitions before k. Sample weights enter each
 * partition's share π<sub>k</sub> = W<sub>k</sub>/W of the objective (W<sub>k</sub> the partition's weight
 * sum, or its row count when unweighted), so that
 * L(h) = Σ<sub>k</sub> π<sub>k</sub> L<sub>k</sub>(h) is exactly the objective of all rows together with
 * weights normalized to mean one.
 */
public final class PartitionedData implements AutoCloseable {

    /** What to do with partitions that hold no rows. */
    public enum EmptyPartitions {
        /** Refuse them with an error naming the partitions (the default). */
        REJECT,
        /** Leave them out of every round (they hold nothing to contribute). */
        SKIP
    }

    private final JavaRDD<PartitionBlock> blocks;
    private final JavaSparkContext context;
    private final Columns columns;
    private final int[] rows;
    private final double[] weightSums;
    private final long[] offsets;
    private final long size;
    private final int dimension;
    private final double totalWeight;
    private boolean closed;

    private PartitionedData(JavaRDD<PartitionBlock> blocks, Columns columns, int[] rows, double[] weightSums,
                            int dimension) {
        this.blocks = blocks;
        this.context = JavaSparkContext.fromSparkContext(blocks.context());
        this.columns = columns;
        this.rows = rows;
        this.weightSums = weightSums;
        this.dimension = dimension;
        this.offsets = new long[rows.length];
        long n = 0;
        double w = 0;
        for (int k = 0; k < rows.length; k++) {
            offsets[k] = n;
            n += rows[k];
            w += weightSums[k];
        }
        this.size = n;
        this.totalWeight = w;
    }

    /** Converts a Dataset's rows, refusing empty partitions. */
    public static PartitionedData of(Dataset<Row> rows, Columns columns) {
        return of(rows, columns, EmptyPartitions.REJECT);
    }

    /**
     * Converts a Dataset's rows (its current partitioning is kept: repartition first to choose the
     * number of blocks).
     *
     * @throws IllegalArgumentException naming the column if a column is missing or not numeric; naming the
     *                                  partition, row and column if a cell is null, not a number or not
     *                                  finite, an array has the wrong length or a weight is negative; naming
     *                                  the partitions if some are empty (under {@link EmptyPartitions#REJECT})
     *                                  or all are
     */
    public static PartitionedData of(Dataset<Row> rows, Columns columns, EmptyPartitions empty) {
        if (rows == null || columns == null || empty == null) {
            throw new NullPointerException("rows, columns and the empty-partition policy must not be null");
        }
        return of(rows.javaRDD(), rows.schema(), columns, empty);
    }

    /**
     * Converts an RDD of rows laid out as {@code schema} says (each row's values in the schema's order).
     *
     * @throws IllegalArgumentException as {@link #of(Dataset, Columns, EmptyPartitions)}, and naming the
     *                                  partition and row if a row has fewer values than the schema
     */
    public static PartitionedData of(JavaRDD<Row> rows, StructType schema, Columns columns, EmptyPartitions empty) {
        if (rows == null || schema == null || columns == null || empty == null) {
            throw new NullPointerException("rows, schema, columns and the empty-partition policy must not be null");
        }
        RowConversion conversion = RowConversion.resolve(schema, columns);
        JavaRDD<PartitionBlock> blocks = rows.mapPartitionsWithIndex(conversion::convert, true);
        blocks.setName("riskmin blocks of " + columns);
        blocks.persist(StorageLevel.MEMORY_AND_DISK());
        try {
            List<BlockFacts> facts = blocks.map(PartitionBlock::facts).collect();
            return check(blocks, columns, facts, rows.getNumPartitions(), empty);
        } catch (Exception e) {
            blocks.unpersist(false);
            throw SparkFailures.rethrow(e);
        }
    }

    private static PartitionedData check(JavaRDD<PartitionBlock> blocks, Columns columns, List<BlockFacts> facts,
                                         int partitions, EmptyPartitions empty) {
        int[] rows = new int[partitions];
        double[] weights = new double[partitions];
        int dimension = -1;
        int first = -1;
        for (BlockFacts f : facts) {
            rows[f.partition()] = f.rows();
            weights[f.partition()] = f.weightSum();
            if (dimension < 0) {
                dimension = f.columns();
                first = f.partition();
            } else if (f.columns() != dimension) {
                throw new IllegalArgumentException("partition " + f.partition() + "'s rows hold " + f.columns()
                        + " features and partition " + first + "'s hold " + dimension + " (column '"
                        + columns.features().get(0) + "'); every row needs the same number");
            }
        }
        if (facts.isEmpty()) {
            throw new IllegalArgumentException("the data hold no rows in any of their " + partitions + " partitions");
        }
        if (empty == EmptyPartitions.REJECT && facts.size() < partitions) {
            List<Integer> none = new ArrayList<>();
            for (int k = 0; k < partitions && none.size() < 10; k++) {
                if (rows[k] == 0) {
                    none.add(k);
                }
            }
            throw new IllegalArgumentException((partitions - facts.size()) + " of " + partitions
                    + " partitions hold no rows (partition" + (none.size() > 1 ? "s " : " ") + joined(none)
                    + (partitions - facts.size() > none.size() ? ", ..." : "") + "); repartition the data "
                    + "(e.g. rows.repartition(k)) or convert with EmptyPartitions.SKIP, which leaves empty "
                    + "partitions out of every round");
        }
        return new PartitionedData(blocks, columns, rows, weights, dimension);
    }

    private static String joined(List<Integer> list) {
        StringBuilder s = new StringBuilder();
        for (int i = 0; i < list.size(); i++) {
            s.append(i == 0 ? "" : ", ").append(list.get(i));
        }
        return s.toString();
    }

    /** @return n, the number of rows */
    public long size() {
        return size;
    }

    /** @return d, the number of features */
    public int dimension() {
        return dimension;
    }

    /** @return the number of partitions, empty ones included */
    public int partitions() {
        return rows.length;
    }

    /** @return n<sub>k</sub> for each partition (0 for an empty one); a copy */
    public int[] partitionSizes() {
        return rows.clone();
    }

    /** @return the columns the rows were read from */
    public Columns columns() {
        return columns;
    }

    /** @return whether the rows carry sample weights */
    public boolean weighted() {
        return columns.weight() != null;
    }

    /** Releases the cached blocks; later fits on this object fail. Calling it again does nothing. */
    @Override
    public void close() {
        if (!closed) {
            closed = true;
            blocks.unpersist(false);
        }
    }

    // ---- for the driver ---------------------------------------------------------------------------

    JavaRDD<PartitionBlock> blocks() {
        if (closed) {
            throw new IllegalStateException("these partitioned data were closed; convert the rows again");
        }
        return blocks;
    }

    JavaSparkContext context() {
        return context;
    }

    int rows(int partition) {
        return rows[partition];
    }

    long offset(int partition) {
        return offsets[partition];
    }

    /** @return π<sub>k</sub> = W<sub>k</sub>/W for every partition (0 for an empty one) */
    double[] shares() {
        double[] share = new double[rows.length];
        for (int k = 0; k < share.length; k++) {
            share[k] = weightSums[k] / totalWeight;
        }
        return share;
    }

    /** @return the number of partitions that hold rows */
    int filledPartitions() {
        int count = 0;
        for (int r : rows) {
            count += r > 0 ? 1 : 0;
        }
        return count;
    }

    @Override
    public String toString() {
        return "PartitionedData[n=" + size + ", d=" + dimension + ", partitions=" + rows.length + ", rows per partition "
                + (rows.length <= 16 ? Arrays.toString(rows) : "from " + Arrays.stream(rows).min().orElse(0) + " to "
                + Arrays.stream(rows).max().orElse(0)) + "]";
    }
}
