package dev.riskmin;

import dev.riskmin.hook.FitControl;
import dev.riskmin.hook.FitListener;
import dev.riskmin.hook.StepView;
import dev.riskmin.loss.Losses;
import dev.riskmin.method.Averaging;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.sampling.Sampling;
import dev.riskmin.testing.LeastSquaresProblem;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.lang.management.ManagementFactory;
import java.util.List;

import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Nothing is allocated per step in steady state, with or without listeners: the thread's allocated
 * bytes (com.sun.management.ThreadMXBean) over a 100,000-step fit minus those of a 1,000-step fit
 * (the same set-up cost) must be a small constant, not something that grows with the steps.
 */
class AllocationFreeStepTest {
    private static final LeastSquaresProblem PROBLEM = LeastSquaresProblem.gaussian(5, 2000, 10, 0.2);
    private static final com.sun.management.ThreadMXBean THREADS =
            (com.sun.management.ThreadMXBean) ManagementFactory.getThreadMXBean();

    record Case(String name, Minimizer.Builder builder, boolean listener) {
        @Override
        public String toString() {
            return name + (listener ? " with listener" : "");
        }
    }

    static List<Case> cases() {
        return List.of(
                new Case("sgd", Minimizer.builder().stepSize(1e-3), false),
                new Case("sgd", Minimizer.builder().stepSize(1e-3), true),
                new Case("sgd batch 32 with replacement, averaged", Minimizer.builder().stepSize(1e-3).batchSize(32)
                        .sampling(Sampling.withReplacement()).averaging(Averaging.polyakRuppert()), true),
                new Case("nesterov l1", Minimizer.builder().stepSize(1e-3).updateRule(UpdateRule.nesterov(0.9))
                        .penalty(Penalty.l1(1e-3)), true),
                new Case("adam elastic net", Minimizer.builder().stepSize(1e-3).updateRule(UpdateRule.adam())
                        .penalty(Penalty.elasticNet(1e-3, 1e-3)), true),
                new Case("adagrad", Minimizer.builder().stepSize(1e-2).updateRule(UpdateRule.adaGrad()), true),
                new Case("svrg", Minimizer.builder().stepSize(1e-3).updateRule(UpdateRule.svrg()), true),
                new Case("saga huber", Minimizer.builder().stepSize(1e-3).updateRule(UpdateRule.saga())
                        .loss(Losses.huber(1.0)), true),
                new Case("stratified", Minimizer.builder().stepSize(1e-3).batchSize(16)
                        .sampling(Sampling.stratified()), true),
                new Case("importance", Minimizer.builder().stepSize(1e-3).batchSize(4)
                        .sampling(Sampling.importance()), true),
                new Case("block-shuffled with prefetch", Minimizer.builder().stepSize(1e-3).batchSize(3)
                        .sampling(Sampling.blockShuffled(16)), true));
    }

    /** A listener that reads everything the view offers and probes at a cadence. */
    static final class Reader implements FitListener {
        final double[] buffer = new double[11];
        double sink;

        @Override
        public void step(StepView view, FitControl control) {
            sink += view.batchLoss() + view.stepSize() + view.parameter(0) + view.batchGradient(0) + view.batchIndex(0)
                    + view.batchScale(0) + view.epoch() + view.draws();
            if (view.step() % 100 == 0) {
                view.copyParameters(buffer);
                view.copyBatchGradient(buffer);
                sink += view.probe().sampleGradient(0, buffer);
                sink += view.probe().independentBatchGradient(8, buffer);
            }
        }
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("cases")
    void stepsAllocateNothing(Case c) {
        int[] strata = new int[PROBLEM.y.length];
        for (int i = 0; i < strata.length; i++) {
            strata[i] = i % 10 == 0 ? 1 : 0;
        }
        var data = PROBLEM.data.withStrata(strata);
        Minimizer shortRun = c.builder().maxSteps(1_000).explosionFactor(1e300).build();
        Minimizer longRun = c.builder().maxSteps(101_000).explosionFactor(1e300).build();
        // Warm up so that class loading and compilation are not counted.
        for (int k = 0; k < 3; k++) {
            run(longRun, data, c.listener());
        }
        long shortBytes = Long.MAX_VALUE;
        long longBytes = Long.MAX_VALUE;
        for (int k = 0; k < 3; k++) {
            shortBytes = Math.min(shortBytes, run(shortRun, data, c.listener()));
            longBytes = Math.min(longBytes, run(longRun, data, c.listener()));
        }
        long perHundredThousand = longBytes - shortBytes;
        System.out.println("allocation, " + c + ": " + perHundredThousand + " B over 100,000 extra steps ("
                + (perHundredThousand / 100_000.0) + " B/step)");
        assertTrue(perHundredThousand < 4096, c + ": " + perHundredThousand + " B over 100,000 steps");
    }

    private static long run(Minimizer m, dev.riskmin.data.Dataset data, boolean listener) {
        FitOptions options = listener ? FitOptions.listeners(new Reader()) : FitOptions.none();
        long tid = Thread.currentThread().getId();
        long before = THREADS.getThreadAllocatedBytes(tid);
        Fit fit = m.fit(data, options);
        long after = THREADS.getThreadAllocatedBytes(tid);
        assertTrue(fit.steps() > 0);
        return after - before;
    }
}
