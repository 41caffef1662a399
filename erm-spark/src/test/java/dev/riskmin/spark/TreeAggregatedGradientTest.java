package dev.riskmin.spark;

import dev.riskmin.loss.Losses;
import dev.riskmin.objective.LinearObjective;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.testing.Cases;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.Test;

import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The tree-aggregated gradient and objective equal the in-memory ones (the core's LinearObjective over the
 * same rows) to 1e-12 relative, whatever the partitioning and with weights: the distributed sum only
 * regroups the same terms.
 */
class TreeAggregatedGradientTest {
    private static final LogisticRows ROWS = LogisticRows.generate(11, 20_000, 10);
    private static final DistributedMinimizer MINIMIZER = DistributedMinimizer.builder()
            .loss(Losses::logistic)
            .penalty(() -> Penalty.elasticNet(1e-3, 1e-2))
            .build();
    private static double worst;

    @AfterAll
    static void report() {
        System.out.printf("tree-aggregated gradient: largest relative error %.1e over 1-7 partitions, weighted or not%n",
                worst);
    }

    @Test
    void oneContiguousPartitionAgrees() {
        check(ROWS, ROWS.frame(1), ROWS.columns(), 1);
    }

    @Test
    void sevenContiguousPartitionsAgree() {
        check(ROWS, ROWS.frame(7), ROWS.columns(), 2);
    }

    @Test
    void shuffledUnevenPartitionsAgree() {
        check(ROWS, ROWS.frame(3).repartition(5), ROWS.columns(), 3);
    }

    @Test
    void weightedRowsAgree() {
        LogisticRows weighted = ROWS.weighted();
        check(weighted, weighted.frame(4), weighted.columns(), 4);
    }

    @Test
    void anArrayColumnAgrees() {
        check(ROWS, ROWS.arrayFrame(3), Columns.array("y", "features"), 5);
    }

    private static void check(LogisticRows rows, Dataset<Row> frame, Columns columns, long seed) {
        RandomGenerator rng = Cases.rng(seed);
        double[] h = Cases.gaussianVector(rng, rows.dimension() + 1, 0.5);
        LinearObjective inMemory = LinearObjective.of(rows.dataset(), Losses.logistic(), Penalty.elasticNet(1e-3, 1e-2),
                true);
        double[] expected = new double[h.length];
        double expectedValue = inMemory.gradient(h, expected);
        double[] actual = new double[h.length];
        double actualValue;
        try (PartitionedData data = PartitionedData.of(frame, columns)) {
            actualValue = MINIMIZER.gradient(data, h, actual);
            assertEquals(rows.size(), data.size());
        }
        double diff = 0;
        double norm = 0;
        for (int j = 0; j < h.length; j++) {
            diff += (actual[j] - expected[j]) * (actual[j] - expected[j]);
            norm += expected[j] * expected[j];
        }
        double relative = Math.sqrt(diff / norm);
        double valueRelative = Math.abs(actualValue - expectedValue) / Math.abs(expectedValue);
        worst = Math.max(worst, Math.max(relative, valueRelative));
        // The bound: the same sums regrouped differ only by rounding (common practice, no source).
        assertTrue(relative <= 1e-12, "gradient relative error " + relative);
        assertTrue(valueRelative <= 1e-12, "objective relative error " + valueRelative);
    }
}
