package dev.riskmin.spark;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.StopReason;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.loss.Losses;
import dev.riskmin.model.LinearModel;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.step.StepSchedule;
import dev.riskmin.testing.Cases;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructType;
import org.junit.jupiter.api.Test;

import java.util.ArrayList;
import java.util.List;
import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** The usage example of docs/scale-out.md compiles and runs (on generated rows instead of a Parquet file). */
class ScaleOutGuideExampleTest {

    @Test
    void theGuidesExampleRuns() {
        Dataset<Row> rows = clicks(4_000);
        // ---- as in the guide, with 4 partitions for 4,000 rows instead of 64
        Columns columns = Columns.of("clicked", "x1", "x2", "x3").withWeight("w");

        DistributedMinimizer minimizer = DistributedMinimizer.builder()
                .loss(Losses::logistic)
                .penalty(() -> Penalty.l2(1e-3))
                .strategy(Strategy.localSgd(500))
                .batchSize(32)
                .schedule(() -> StepSchedule.stepDecay(0.5, 0.5, 5_000))
                .rounds(40)
                .seed(42)
                .build();

        Diagnostics diagnostics = Diagnostics.standard().build();
        Fit fit;
        LinearModel model;
        try (PartitionedData data = PartitionedData.of(rows.repartition(4), columns)) {
            fit = minimizer.fit(data, FitOptions.listeners(diagnostics));
            model = fit.model();
        }
        // ----
        assertEquals(StopReason.STEP_BUDGET, fit.stopReason());
        assertEquals(40, fit.steps());
        assertTrue(model.coefficients()[0] > 0, "x1 raises the click probability in the generated rows");
        assertTrue(diagnostics.failures().isEmpty(), diagnostics.failures().toString());
    }

    /** Invented click data: P(clicked) = σ(x1 − 0.5 x2 + 0.2), x3 irrelevant, weights in [0.5, 1.5). */
    private static Dataset<Row> clicks(int n) {
        RandomGenerator rng = Cases.rng(91);
        List<Row> list = new ArrayList<>(n);
        for (int i = 0; i < n; i++) {
            double x1 = rng.nextGaussian();
            double x2 = rng.nextGaussian();
            double x3 = rng.nextGaussian();
            double z = x1 - 0.5 * x2 + 0.2;
            double clicked = rng.nextDouble() < 1 / (1 + Math.exp(-z)) ? 1 : 0;
            list.add(RowFactory.create(x1, x2, x3, clicked, 0.5 + rng.nextDouble()));
        }
        StructType schema = DataTypes.createStructType(List.of(
                DataTypes.createStructField("x1", DataTypes.DoubleType, false),
                DataTypes.createStructField("x2", DataTypes.DoubleType, false),
                DataTypes.createStructField("x3", DataTypes.DoubleType, false),
                DataTypes.createStructField("clicked", DataTypes.DoubleType, false),
                DataTypes.createStructField("w", DataTypes.DoubleType, false)));
        return LogisticRows.frameOf(list, schema, 2);
    }
}
