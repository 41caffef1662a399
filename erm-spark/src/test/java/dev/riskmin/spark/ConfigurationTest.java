package dev.riskmin.spark;

import dev.riskmin.FitOptions;
import dev.riskmin.loss.Loss;
import dev.riskmin.loss.Losses;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.sampling.Sampling;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Configurations a distributed fit cannot run are refused with a message that names the option and says
 * what to do (the project's rule for errors; common practice, no source).
 */
class ConfigurationTest {
    private static final LogisticRows ROWS = LogisticRows.generate(61, 2_000, 3);
    private static PartitionedData data;

    @BeforeAll
    static void convert() {
        data = PartitionedData.of(ROWS.frame(2), ROWS.columns());
    }

    @AfterAll
    static void release() {
        data.close();
    }

    /** Not serializable: a recipe that captures it cannot travel to the executors. */
    private static final class Unshippable {
        final Loss loss = Losses.logistic();
    }

    @Test
    void aRecipeThatCannotTravelIsNamed() {
        Unshippable holder = new Unshippable();
        String message = assertThrows(IllegalArgumentException.class,
                () -> DistributedMinimizer.builder().loss(() -> holder.loss).build()).getMessage();
        assertTrue(message.startsWith("the loss recipe cannot be serialized (java.io.NotSerializableException: "
                + "dev.riskmin.spark.ConfigurationTest$Unshippable)"), message);
    }

    @Test
    void sequentialSamplingIsRefused() {
        String message = assertThrows(IllegalArgumentException.class,
                () -> DistributedMinimizer.builder().sampling(Sampling::sequential).build()).getMessage();
        assertTrue(message.startsWith("sampling sequential would restart at row 0 of every partition"), message);
    }

    @Test
    void sagaCannotRunOnTheDriver() {
        DistributedMinimizer saga = DistributedMinimizer.builder().loss(Losses::logistic).updateRule(UpdateRule::saga)
                .rounds(1).build();
        String message = assertThrows(IllegalStateException.class, () -> saga.fit(data, FitOptions.none()))
                .getMessage();
        assertTrue(message.startsWith("update rule saga asks the driver for row 0's own gradient"), message);
    }

    @Test
    void aLossWithoutSmoothnessNeedsASchedule() {
        DistributedMinimizer hinge = DistributedMinimizer.builder().loss(Losses::hinge).rounds(1).build();
        String message = assertThrows(IllegalArgumentException.class, () -> hinge.fit(data, FitOptions.none()))
                .getMessage();
        assertTrue(message.startsWith("the hinge loss has no finite smoothness constant"), message);
        assertTrue(message.endsWith("set schedule(...) or stepSize(...)"), message);
        assertEquals(1, DistributedMinimizer.builder().loss(Losses::hinge).stepSize(0.1).rounds(1).build()
                .fit(data, FitOptions.none()).steps());
    }

    @Test
    void startingParametersAndHeldOutDataMustMatchTheRows() {
        DistributedMinimizer minimizer = DistributedMinimizer.builder().loss(Losses::logistic).rounds(1).build();
        String start = assertThrows(IllegalArgumentException.class, () -> minimizer.fit(data,
                FitOptions.builder().initialParameters(new double[3]).build())).getMessage();
        assertEquals("parameters have 3 entries, the problem has 4", start);
        String held = assertThrows(IllegalArgumentException.class, () -> minimizer.fit(data,
                FitOptions.builder().heldOut(LogisticRows.generate(62, 50, 2).dataset()).build())).getMessage();
        assertEquals("held-out data have 2 features, the training data 3", held);
    }

    @Test
    void columnsNeedDistinctNonEmptyNames() {
        assertEquals("column 'x0' is named twice (features[1]); each column has one role",
                assertThrows(IllegalArgumentException.class, () -> Columns.of("y", "x0", "x0")).getMessage());
        assertEquals("column 'y' already has a role; the weight needs its own",
                assertThrows(IllegalArgumentException.class, () -> Columns.of("y", "x0").withWeight("y")).getMessage());
        assertEquals("target column name () must not be empty",
                assertThrows(IllegalArgumentException.class, () -> Columns.of("", "x0")).getMessage());
    }

    @Test
    void closedDataCannotBeFitted() {
        PartitionedData closed = PartitionedData.of(ROWS.frame(2), ROWS.columns());
        closed.close();
        closed.close();
        String message = assertThrows(IllegalStateException.class, () -> DistributedMinimizer.builder()
                .penalty(() -> Penalty.l2(1.0)).build().fit(closed, FitOptions.none())).getMessage();
        assertEquals("these partitioned data were closed; convert the rows again", message);
    }
}
