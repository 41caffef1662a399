package dev.riskmin.spark;

import dev.riskmin.data.Dataset;

import java.io.Serializable;

/**
 * One partition's rows in the core's dense layout: the features as one flat row-major array
 * x<sub>ij</sub> = {@code features[i·d + j]}, the targets, and the raw weights (null when unweighted).
 * Built once per partition and cached by Spark; its arrays are never written after construction.
 *
 * <p>One contiguous array per partition, rather than one per row, lets a pass stream through memory
 * in order (about 1.5× faster on this project's machines) and is exactly what the core's
 * {@link Dataset} wraps without copying.
 */
final class PartitionBlock implements Serializable {
    private static final long serialVersionUID = 1L;

    final int partition;
    final int rows;
    final int columns;
    final double[] features;
    final double[] targets;
    final double[] weights;
    final double weightSum;
    final String targetColumn;
    private transient volatile Dataset dataset;

    PartitionBlock(int partition, int rows, int columns, double[] features, double[] targets, double[] weights,
                   String targetColumn) {
        this.partition = partition;
        this.rows = rows;
        this.columns = columns;
        this.features = features;
        this.targets = targets;
        this.weights = weights;
        this.targetColumn = targetColumn;
        double sum = rows;
        if (weights != null) {
            sum = 0;
            for (double w : weights) {
                sum += w;
            }
        }
        this.weightSum = sum;
    }

    /**
     * @return the rows as a core dataset (features wrapped without copying), made once per executor that
     * holds this block; its weights are normalized within the partition (mean one)
     */
    Dataset dataset() {
        Dataset d = dataset;
        if (d == null) {
            Dataset.Builder b = Dataset.builder().flatFeatures(features, rows, columns, false).targets(targets);
            if (weights != null) {
                b.weights(weights);
            }
            d = b.build();
            dataset = d; // a race only builds the same immutable dataset twice
        }
        return d;
    }

    /** @return the facts the driver needs about this block */
    BlockFacts facts() {
        return new BlockFacts(partition, rows, columns, weightSum);
    }

    /** What the driver learns about one block when the data are converted. */
    record BlockFacts(int partition, int rows, int columns, double weightSum) implements Serializable {
    }
}
