package dev.riskmin.spark;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.loss.Losses;
import dev.riskmin.objective.LinearObjective;
import dev.riskmin.penalty.Penalty;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * With 9 partitions the aggregation tree has a level of its own (fan-in 3 at depth 2), where Spark's
 * shuffle delivers summaries in any order; the tree adds them in partition order, so two fits with the
 * same seed agree bit for bit, and its gradient still equals the in-memory one to 1e-12 relative.
 */
class ReproducibilityTest {
    private static final LogisticRows ROWS = LogisticRows.generate(51, 9_000, 5);
    private static PartitionedData data;

    @BeforeAll
    static void convert() {
        data = PartitionedData.of(ROWS.frame(9), ROWS.columns());
    }

    @AfterAll
    static void release() {
        data.close();
    }

    @Test
    void theSameSeedGivesTheSameBitsWhateverTheOrderOfArrival() {
        for (Strategy strategy : new Strategy[] {Strategy.miniBatch(), Strategy.localSgd(20)}) {
            DistributedMinimizer minimizer = DistributedMinimizer.builder()
                    .loss(Losses::logistic).penalty(() -> Penalty.l2(1e-2)).strategy(strategy)
                    .batchSize(strategy == Strategy.miniBatch() ? 600 : 5).stepSize(0.5).rounds(3).seed(99).build();
            Fit first = minimizer.fit(data, FitOptions.none());
            Fit second = minimizer.fit(data, FitOptions.none());
            assertArrayEquals(first.parameters(), second.parameters(), strategy.name());
            assertEquals(3, first.steps(), strategy.name());
        }
    }

    @Test
    void aTreeWithALevelStillGivesTheInMemoryGradient() {
        double[] h = {0.3, -0.2, 0.1, 0.5, -0.4, 0.05};
        double[] expected = new double[h.length];
        LinearObjective.of(ROWS.dataset(), Losses.logistic(), Penalty.l2(1e-2), true).gradient(h, expected);
        double[] actual = new double[h.length];
        DistributedMinimizer.builder().loss(Losses::logistic).penalty(() -> Penalty.l2(1e-2)).build()
                .gradient(data, h, actual);
        double diff = 0;
        double norm = 0;
        for (int j = 0; j < h.length; j++) {
            diff += (actual[j] - expected[j]) * (actual[j] - expected[j]);
            norm += expected[j] * expected[j];
        }
        // The same sums regrouped differ only by rounding (common practice, no source).
        assertTrue(Math.sqrt(diff / norm) <= 1e-12, "relative error " + Math.sqrt(diff / norm));
    }
}
