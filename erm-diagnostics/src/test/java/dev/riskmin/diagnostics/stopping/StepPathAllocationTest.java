package dev.riskmin.diagnostics.stopping;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.data.Dataset;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.diagnostics.Monitor;
import dev.riskmin.diagnostics.StepContext;
import dev.riskmin.hook.RunInfo;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.testing.LeastSquaresProblem;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.lang.management.ManagementFactory;
import java.util.List;
import java.util.function.Supplier;

import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Each stopping test's per-step path allocates nothing: the thread's allocated bytes
 * (com.sun.management.ThreadMXBean) are read around every {@link Monitor#step} call of a real fit,
 * after three warm-up fits, and summed over the calls that published no event (the calls that
 * evaluate publish, and may allocate their event). The sum must stay below a small constant that no
 * per-step allocation could meet.
 */
class StepPathAllocationTest {
    private static final com.sun.management.ThreadMXBean THREADS =
            (com.sun.management.ThreadMXBean) ManagementFactory.getThreadMXBean();
    private static final LeastSquaresProblem PROBLEM = LeastSquaresProblem.gaussian(5, 2000, 10, 0.5);

    record Case(String name, Supplier<Monitor> monitor, UpdateRule rule) {
        @Override
        public String toString() {
            return name;
        }
    }

    static List<Case> cases() {
        return List.of(
                new Case("gradient norm", () -> GradientNormCriterion.absolute(1e-12), UpdateRule.sgd()),
                new Case("stalled objective", () -> StalledObjectiveCriterion.of(1000, 1e-12), UpdateRule.sgd()),
                new Case("held-out worsening", () -> HeldOutWorseningCriterion.of(1000, 0.0), UpdateRule.sgd()),
                new Case("pflug", PflugCriterion::defaults, UpdateRule.sgd()),
                new Case("pflug, pair stride 3", () -> PflugCriterion.defaults().pairStride(3), UpdateRule.sgd()),
                new Case("fluctuation-dissipation", FluctuationDissipationCriterion::defaults, UpdateRule.sgd()),
                new Case("fluctuation-dissipation, heavy ball", FluctuationDissipationCriterion::defaults,
                        UpdateRule.heavyBall(0.5)),
                new Case("norm test", NormTestCriterion::defaults, UpdateRule.sgd()));
    }

    /** Measures the step calls of the monitor it wraps. */
    static final class Metered implements Monitor {
        final Monitor inner;
        long events;
        long quietBytes;
        long quietCalls;

        Metered(Monitor inner) {
            this.inner = inner;
        }

        @Override
        public void started(RunInfo run, StepContext context) {
            inner.started(run, context);
        }

        @Override
        public void step(StepContext context) {
            long published = events;
            long before = THREADS.getCurrentThreadAllocatedBytes();
            inner.step(context);
            long after = THREADS.getCurrentThreadAllocatedBytes();
            if (events == published) {
                quietBytes += after - before;
                quietCalls++;
            }
        }

        @Override
        public void epochEnded(StepContext context) {
            inner.epochEnded(context);
        }

        @Override
        public String name() {
            return inner.name();
        }
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("cases")
    void quietStepsAllocateNothing(Case c) {
        Dataset heldOut = Dataset.of(PROBLEM.x, PROBLEM.y);
        Minimizer minimizer = Minimizer.builder().stepSize(1e-3).batchSize(4).updateRule(c.rule()).maxSteps(5000).seed(1)
                .build();
        Metered measured = null;
        for (int run = 0; run < 4; run++) { // three warm-up fits, then the measured one
            Metered metered = new Metered(c.monitor().get());
            Diagnostics diagnostics = Diagnostics.builder().monitor(metered).subscribe(e -> metered.events++).build();
            Fit fit = minimizer.fit(PROBLEM.data, FitOptions.builder().heldOut(heldOut).listener(diagnostics).build());
            assertTrue(diagnostics.failures().isEmpty(), diagnostics.failures().toString());
            assertTrue(fit.steps() > 1000);
            measured = metered;
        }
        assertTrue(measured.quietCalls > 4000, c + ": only " + measured.quietCalls + " quiet steps");
        // One allocation per step would be at least 16 bytes a step, over 64,000 bytes in all; the JVM
        // itself occasionally charges a few hundred bytes to the thread (a deoptimization, a TLAB retired
        // at a safepoint), so the bound is a constant well below that, not zero.
        assertTrue(measured.quietBytes < 2048, c + ": " + measured.quietBytes + " bytes over " + measured.quietCalls
                + " quiet steps");
    }
}
