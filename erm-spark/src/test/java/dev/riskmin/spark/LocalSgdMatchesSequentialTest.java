package dev.riskmin.spark;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.loss.Losses;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.sampling.Sampling;
import dev.riskmin.step.StepSchedule;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;

/**
 * Local SGD on one partition for one round is the core's sequential path: a partition's local run is the
 * core's Minimizer over the partition's rows with the seed s(seed, 0, 0) = seed, so the parameters agree
 * bit for bit with Minimizer.fit on the same rows and seed (METHODS §10: "k = 1 equals SGD"). A second
 * round continues from the first round's parameters with the seed s(seed, 1, 0) and the schedule read
 * from local step H on.
 */
class LocalSgdMatchesSequentialTest {
    private static final LogisticRows ROWS = LogisticRows.generate(21, 20_000, 8);
    private static PartitionedData onePartition;

    @BeforeAll
    static void convert() {
        onePartition = PartitionedData.of(ROWS.frame(1), ROWS.columns());
    }

    @AfterAll
    static void release() {
        onePartition.close();
    }

    @Test
    void plainSgdWithL2AndDefaultStepMatchesBitForBit() {
        DistributedMinimizer distributed = DistributedMinimizer.builder()
                .loss(Losses::logistic).penalty(() -> Penalty.l2(1e-3))
                .strategy(Strategy.localSgd(3_000)).batchSize(4).rounds(1).seed(7).build();
        Minimizer sequential = Minimizer.builder()
                .loss(Losses.logistic()).penalty(Penalty.l2(1e-3))
                .batchSize(4).maxSteps(3_000).seed(7).build();
        assertSame(sequential.fit(ROWS.dataset()), distributed.fit(onePartition, FitOptions.none()));
    }

    @Test
    void adamWithElasticNetAndReplacementMatchesBitForBit() {
        DistributedMinimizer distributed = DistributedMinimizer.builder()
                .loss(Losses::logistic).penalty(() -> Penalty.elasticNet(1e-3, 1e-3))
                .updateRule(UpdateRule::adam).sampling(Sampling::withReplacement).stepSize(0.01)
                .strategy(Strategy.localSgd(2_000)).batchSize(16).rounds(1).seed(-3).build();
        Minimizer sequential = Minimizer.builder()
                .loss(Losses.logistic()).penalty(Penalty.elasticNet(1e-3, 1e-3))
                .updateRule(UpdateRule.adam()).sampling(Sampling.withReplacement()).stepSize(0.01)
                .batchSize(16).maxSteps(2_000).seed(-3).build();
        assertSame(sequential.fit(ROWS.dataset()), distributed.fit(onePartition, FitOptions.none()));
    }

    @Test
    void nesterovWithStratifiedBatchesAndDecayMatchesBitForBit() {
        DistributedMinimizer distributed = DistributedMinimizer.builder()
                .loss(Losses::logistic).updateRule(() -> UpdateRule.nesterov(0.9))
                .sampling(Sampling::stratified).schedule(() -> StepSchedule.inverseTime(0.05, 1e-2))
                .strategy(Strategy.localSgd(1_500)).batchSize(10).rounds(1).seed(123_456_789L).build();
        Minimizer sequential = Minimizer.builder()
                .loss(Losses.logistic()).updateRule(UpdateRule.nesterov(0.9))
                .sampling(Sampling.stratified()).schedule(StepSchedule.inverseTime(0.05, 1e-2))
                .batchSize(10).maxSteps(1_500).seed(123_456_789L).build();
        assertSame(sequential.fit(ROWS.dataset()), distributed.fit(onePartition, FitOptions.none()));
    }

    @Test
    void theSecondRoundContinuesWithTheDerivedSeedAndShiftedSchedule() {
        int h = 800;
        DistributedMinimizer distributed = DistributedMinimizer.builder()
                .loss(Losses::logistic).schedule(() -> StepSchedule.inverseTime(0.2, 1e-2))
                .strategy(Strategy.localSgd(h)).batchSize(8).rounds(2).seed(42).build();
        Fit first = Minimizer.builder()
                .loss(Losses.logistic()).schedule(StepSchedule.inverseTime(0.2, 1e-2))
                .batchSize(8).maxSteps(h).seed(42).build().fit(ROWS.dataset());
        StepSchedule base = StepSchedule.inverseTime(0.2, 1e-2);
        Fit second = Minimizer.builder()
                .loss(Losses.logistic()).schedule(t -> base.stepSize(h + t))
                .batchSize(8).maxSteps(h).seed(DistributedMinimizer.partitionSeed(42, 1, 0)).build()
                .fit(ROWS.dataset(), FitOptions.builder().initialParameters(first.parameters()).build());
        Fit fit = distributed.fit(onePartition, FitOptions.none());
        assertArrayEquals(second.parameters(), fit.parameters());
        assertEquals(2, fit.steps());
    }

    private static void assertSame(Fit sequential, Fit distributed) {
        // Bit for bit: assertArrayEquals on doubles compares bit patterns (JUnit 5 documentation).
        assertArrayEquals(sequential.parameters(), distributed.parameters());
        assertArrayEquals(sequential.model().coefficients(), distributed.model().coefficients());
        assertEquals(sequential.gradientEvaluations() + 0.0, distributed.gradientEvaluations()
                - distributed.finalBatchSize(), 0.0, "the distributed round adds one batch for its summary");
    }
}
