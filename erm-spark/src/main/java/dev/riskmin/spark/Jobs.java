package dev.riskmin.spark;

import dev.riskmin.spark.PartitionWork.SampleRows;
import dev.riskmin.spark.PartitionWork.Shares;
import org.apache.spark.api.java.JavaPairRDD;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.api.java.function.Function;
import scala.Tuple2;

import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;

/**
 * The Spark jobs of a distributed fit. Each builds its closure here, in a static context, from values
 * only — the plan, the point, the shares — so that a task never drags the driver's loop, its listeners or
 * anything else unserializable along. A failing job is rethrown as the error it stands for
 * ({@link SparkFailures}).
 */
final class Jobs {
    private Jobs() {
    }

    static RoundSummary full(JavaRDD<PartitionBlock> blocks, Plan plan, double[] point, Shares shares,
                             boolean smoothness, int depth) {
        double[] at = point.clone();
        return aggregate(blocks, block -> PartitionWork.full(block, plan, at, shares, smoothness),
                depth);
    }

    static RoundSummary batch(JavaRDD<PartitionBlock> blocks, Plan plan, double[] point, long round, int[] allocation,
                              int total, Shares shares, int depth) {
        double[] at = point.clone();
        return aggregate(blocks,
                block -> PartitionWork.batch(block, plan, at, round, allocation, total, shares),
                depth);
    }

    static RoundSummary localSgd(JavaRDD<PartitionBlock> blocks, Plan plan, double[] point, long round, int localSteps,
                                 int batchSize, double stepFactor, int total, Shares shares, int depth) {
        double[] at = point.clone();
        return aggregate(blocks, block -> PartitionWork.localSgd(block, plan, at, round, localSteps,
                batchSize, stepFactor, total, shares), depth);
    }

    static RoundSummary svrg(JavaRDD<PartitionBlock> blocks, Plan plan, double[] anchor, double[] anchorGradient,
                             long round, int innerSteps, int batchSize, double stepFactor, int total, Shares shares,
                             int depth) {
        double[] at = anchor.clone();
        double[] mu = anchorGradient.clone();
        return aggregate(blocks, block -> PartitionWork.localSvrg(block, plan, at, mu, round,
                innerSteps, batchSize, stepFactor, total, shares), depth);
    }

    static RoundSummary independent(JavaRDD<PartitionBlock> blocks, Plan plan, double[] point, int[] counts, long call,
                                    Shares shares, int depth) {
        double[] at = point.clone();
        return aggregate(blocks,
                block -> PartitionWork.independent(block, plan, at, counts, call, shares), depth);
    }

    /** @param local the local row indices per partition (null where the partition has none) */
    static List<SampleRows> sampleRows(JavaRDD<PartitionBlock> blocks, Plan plan, double[] point, int[][] local,
                                       Shares shares) {
        double[] at = point.clone();
        try {
            return blocks.filter(block -> local[block.partition] != null)
                    .map(block -> PartitionWork.sampleRows(block, plan, at, local[block.partition], shares))
                    .collect();
        } catch (Exception e) {
            throw SparkFailures.rethrow(e);
        }
    }

    /**
     * Tree aggregation of the partitions' summaries in a fixed order. The tree has the shape of Spark's own
     * {@code treeAggregate} (fan-in s = max(⌈P<sup>1/depth</sup>⌉, 2), a level added while the summaries
     * outnumber s + ⌈P/s⌉), but every node adds its children in the order of their partition indices,
     * where Spark's would add them in the order they arrive. Floating-point addition is not associative, so
     * this is what makes a fit with several partitions reproducible bit for bit.
     */
    private static RoundSummary aggregate(JavaRDD<PartitionBlock> blocks, Function<PartitionBlock, RoundSummary> work,
                                          int depth) {
        try {
            JavaPairRDD<Integer, RoundSummary> level =
                    blocks.mapToPair(block -> new Tuple2<>(block.partition, work.call(block)));
            int count = blocks.getNumPartitions();
            int scale = Math.max((int) Math.ceil(Math.pow(count, 1.0 / depth)), 2);
            while (count > scale + (int) Math.ceil((double) count / scale)) {
                count /= scale;
                int buckets = count;
                level = level.mapToPair(node -> new Tuple2<>(node._1() % buckets, node))
                        .groupByKey(buckets)
                        .mapToPair(group -> new Tuple2<>(group._1(), inOrder(group._2())));
            }
            return inOrder(level.collect());
        } catch (Exception e) {
            throw SparkFailures.rethrow(e);
        }
    }

    /** Adds the summaries in the order of their keys into a fresh summary. */
    static RoundSummary inOrder(Iterable<Tuple2<Integer, RoundSummary>> nodes) {
        List<Tuple2<Integer, RoundSummary>> sorted = new ArrayList<>();
        nodes.forEach(sorted::add);
        sorted.sort(Comparator.comparingInt(Tuple2::_1));
        RoundSummary total = new RoundSummary();
        for (Tuple2<Integer, RoundSummary> node : sorted) {
            total.merge(node._2());
        }
        return total;
    }
}
