package dev.riskmin.spark;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.StopReason;
import dev.riskmin.diagnostics.AngleEvent;
import dev.riskmin.diagnostics.DiagnosticEvent;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.diagnostics.LossEvent;
import dev.riskmin.diagnostics.NoiseEvent;
import dev.riskmin.diagnostics.StoppingEvent;
import dev.riskmin.diagnostics.estimator.AngleMonitor;
import dev.riskmin.diagnostics.estimator.Cadence;
import dev.riskmin.diagnostics.estimator.LossMonitor;
import dev.riskmin.diagnostics.estimator.NoiseMonitor;
import dev.riskmin.diagnostics.stopping.GradientNormCriterion;
import dev.riskmin.loss.Losses;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.objective.LinearObjective;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.reference.NewtonSolver;
import dev.riskmin.step.StepSchedule;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

import java.util.ArrayList;
import java.util.List;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Every strategy reaches within 1e-4 relative objective of the exact optimum (Newton's method on the same
 * rows, the core's reference solver) on a generated logistic problem of 20,000 rows in 4 partitions, with
 * the core's diagnostics attached on the driver: their noise, angle, loss and stopping events arrive with
 * finite figures, and so do the round reports. Each test prints the time per round next to the in-memory
 * minimizer doing the same work on the same rows.
 */
class StrategyConvergenceTest {
    private static final double L2 = 1e-3;
    private static final LogisticRows ROWS = LogisticRows.generate(31, 20_000, 10, 0.5);
    private static PartitionedData data;
    private static double[] optimum;
    private static double best;

    @BeforeAll
    static void prepare() {
        optimum = NewtonSolver.logistic().withL2(L2).solve(ROWS.dataset()).parameters();
        best = LinearObjective.of(ROWS.dataset(), Losses.logistic(), Penalty.l2(L2), true).value(optimum);
        data = PartitionedData.of(ROWS.frame(4), ROWS.columns());
    }

    @AfterAll
    static void release() {
        data.close();
    }

    @Test
    void miniBatchReachesTheOptimum() {
        DistributedMinimizer distributed = DistributedMinimizer.builder()
                .loss(Losses::logistic).penalty(() -> Penalty.l2(L2))
                .strategy(Strategy.miniBatch()).batchSize(4_000)
                .schedule(() -> StepSchedule.stepDecay(3.0, 0.5, 8)).rounds(50).seed(1).build();
        Minimizer inMemory = Minimizer.builder()
                .loss(Losses.logistic()).penalty(Penalty.l2(L2)).batchSize(4_000)
                .schedule(StepSchedule.stepDecay(3.0, 0.5, 8)).maxSteps(50).seed(1).build();
        check(distributed, inMemory, GradientNormCriterion.relative(1e-9).everySteps(10), StopReason.STEP_BUDGET);
    }

    @Test
    void localSgdReachesTheOptimum() {
        DistributedMinimizer distributed = DistributedMinimizer.builder()
                .loss(Losses::logistic).penalty(() -> Penalty.l2(L2))
                .strategy(Strategy.localSgd(100)).batchSize(25)
                .schedule(() -> StepSchedule.stepDecay(1.0, 0.5, 300)).rounds(30).seed(1).build();
        // The same work in memory: 4 partitions x 100 local steps of 25 rows per round.
        Minimizer inMemory = Minimizer.builder()
                .loss(Losses.logistic()).penalty(Penalty.l2(L2)).batchSize(25)
                .schedule(StepSchedule.stepDecay(1.0, 0.5, 1_200)).maxSteps(30 * 400).seed(1).build();
        check(distributed, inMemory, GradientNormCriterion.relative(1e-9).everySteps(10), StopReason.STEP_BUDGET);
    }

    @Test
    void svrgRoundsReachTheOptimumAndTheGradientTestStopsThem() {
        DistributedMinimizer distributed = DistributedMinimizer.builder()
                .loss(Losses::logistic).penalty(() -> Penalty.l2(L2))
                .strategy(Strategy.svrg(250)).batchSize(20).stepSize(0.05).rounds(20).seed(1).build();
        // The same work in memory: SVRG with a snapshot every epoch of 20-row batches.
        Minimizer inMemory = Minimizer.builder()
                .loss(Losses.logistic()).penalty(Penalty.l2(L2)).batchSize(20).updateRule(UpdateRule.svrg())
                .stepSize(0.05).epochs(10).seed(1).build();
        check(distributed, inMemory, GradientNormCriterion.relative(1e-6).everySteps(1), StopReason.CONVERGED);
    }

    private static void check(DistributedMinimizer distributed, Minimizer inMemory, GradientNormCriterion criterion,
                              StopReason expected) {
        List<DiagnosticEvent> events = new ArrayList<>();
        Diagnostics diagnostics = Diagnostics.builder()
                .monitor(NoiseMonitor.every(5))
                .monitor(AngleMonitor.certified(optimum, best).withCadence(Cadence.every(5)))
                .monitor(LossMonitor.defaults())
                .monitor(criterion)
                .subscribe(events::add)
                .build();
        List<RoundReport> reports = new ArrayList<>();
        RoundListener rounds = new RoundListener() {
            @Override
            public void roundEnded(RoundReport report) {
                reports.add(report);
            }
        };
        long start = System.nanoTime();
        Fit fit = distributed.fit(data, FitOptions.listeners(diagnostics, rounds));
        long nanos = System.nanoTime() - start;
        long memoryStart = System.nanoTime();
        Fit memory = inMemory.fit(ROWS.dataset());
        long memoryNanos = System.nanoTime() - memoryStart;

        double gap = (fit.finalObjective() - best) / best;
        System.out.printf("%s: %d rounds, %.1f ms per round (in memory the same work: %.2f ms per round-equivalent, "
                        + "relative gap %.1e); relative gap %.1e, stopped by %s%n",
                distributed.strategy().name(), fit.steps(), nanos / 1e6 / fit.steps(),
                memoryNanos / 1e6 / fit.steps(), (memory.finalObjective() - best) / best, gap, fit.stopReason());
        assertEquals(expected, fit.stopReason(), fit.stopDetail());
        assertTrue(gap >= -1e-12 && gap <= 1e-4, "relative gap to the optimum " + gap);
        assertTrue(fit.listenerFailures().isEmpty(), fit.listenerFailures().toString());
        assertTrue(diagnostics.failures().isEmpty(), diagnostics.failures().toString());

        List<NoiseEvent> noise = ofType(events, NoiseEvent.class);
        List<AngleEvent> angles = ofType(events, AngleEvent.class);
        List<LossEvent> losses = ofType(events, LossEvent.class);
        List<StoppingEvent> stops = ofType(events, StoppingEvent.class);
        assertFalse(noise.isEmpty() || angles.isEmpty() || losses.isEmpty() || stops.isEmpty(),
                "events: noise " + noise.size() + ", angle " + angles.size() + ", loss " + losses.size() + ", stopping "
                        + stops.size());
        for (NoiseEvent e : noise) {
            assertTrue(Double.isFinite(e.traceCovariance()) && Double.isFinite(e.batchMeanVariance())
                    && Double.isFinite(e.gradientNormSquared()) && Double.isFinite(e.noiseScale()), e.toString());
        }
        for (AngleEvent e : angles) {
            assertTrue(Double.isFinite(e.cosine()) && Double.isFinite(e.suboptimality())
                    && Double.isFinite(e.angleToOptimum()), e.toString());
        }
        for (LossEvent e : losses) {
            assertTrue(Double.isFinite(e.batchLoss()) && Double.isFinite(e.stepSize()), e.toString());
        }
        for (StoppingEvent e : stops) {
            assertTrue(Double.isFinite(e.statistic()), e.toString());
        }
        assertEquals(fit.steps() + (expected == StopReason.CONVERGED ? 1 : 0), reports.size());
        for (RoundReport r : reports) {
            assertTrue(Double.isFinite(r.batchLoss()) && Double.isFinite(r.batchGradientNorm())
                    && Double.isFinite(r.noiseTrace()) && Double.isFinite(r.batchMeanVariance())
                    && Double.isFinite(r.gradientSpread()) && r.roundNanos() > 0, r.toString());
            if (!distributed.strategy().name().startsWith("mini-batch")) {
                assertTrue(Double.isFinite(r.localModelSpread()), r.toString());
            }
            if (distributed.strategy().name().startsWith("local SGD")) {
                assertTrue(Double.isFinite(r.localObjective()), r.toString());
            }
        }
        assertTrue(diagnostics.verdict() != null);
    }

    private static <T> List<T> ofType(List<DiagnosticEvent> events, Class<T> type) {
        List<T> out = new ArrayList<>();
        for (DiagnosticEvent e : events) {
            if (type.isInstance(e)) {
                out.add(type.cast(e));
            }
        }
        return out;
    }
}
