package dev.riskmin.diagnostics.estimator;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.data.Dataset;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.diagnostics.Monitor;
import dev.riskmin.sampling.Sampling;
import dev.riskmin.testing.LeastSquaresProblem;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.lang.management.ManagementFactory;
import java.util.List;
import java.util.Locale;
import java.util.function.Supplier;

import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The monitors' per-step paths allocate nothing: hosted by {@link Diagnostics} with no subscribers
 * and a large cadence (so the only probes are at step 0 of both runs), the thread's allocated bytes
 * (com.sun.management.ThreadMXBean) over a 101,000-step fit minus those of a 1,000-step fit must
 * be a small constant (the method of erm-core's AllocationFreeStepTest). A second check lets the
 * default budgets probe and bounds the allocation per published event (the event record itself).
 */
class EstimatorAllocationTest {
    private static final LeastSquaresProblem PROBLEM = LeastSquaresProblem.gaussian(5, 2000, 10, 0.2);
    private static final Dataset DATA = withStrata();
    private static final int[] STRATA = DATA.strataCopy();
    private static final long LARGE = 1_000_000;
    private static final com.sun.management.ThreadMXBean THREADS =
            (com.sun.management.ThreadMXBean) ManagementFactory.getThreadMXBean();

    record Case(String name, Minimizer.Builder builder, Supplier<List<Monitor>> monitors) {
        @Override
        public String toString() {
            return name;
        }
    }

    static List<Case> quiet() {
        return List.of(
                new Case("noise, sgd B=1", Minimizer.builder().stepSize(1e-3),
                        () -> List.of(NoiseMonitor.every(LARGE))),
                new Case("noise, B=32 with replacement", Minimizer.builder().stepSize(1e-3).batchSize(32)
                        .sampling(Sampling.withReplacement()), () -> List.of(NoiseMonitor.every(LARGE))),
                new Case("noise, importance B=4", Minimizer.builder().stepSize(1e-3).batchSize(4)
                        .sampling(Sampling.importance()), () -> List.of(NoiseMonitor.every(LARGE))),
                new Case("noise, stratified B=16 with strata", Minimizer.builder().stepSize(1e-3).batchSize(16)
                        .sampling(Sampling.stratified()), () -> List.of(NoiseMonitor.every(LARGE).withStrata(STRATA))),
                new Case("angle", Minimizer.builder().stepSize(1e-3).batchSize(8),
                        () -> List.of(AngleMonitor.every(LARGE))),
                new Case("angle, certified", Minimizer.builder().stepSize(1e-3).batchSize(8),
                        () -> List.of(AngleMonitor.certified(PROBLEM.optimum, PROBLEM.optimalObjective)
                                .withCadence(Cadence.every(LARGE)))),
                new Case("loss", Minimizer.builder().stepSize(1e-3).batchSize(8),
                        () -> List.of(LossMonitor.defaults().withObjectiveCadence(Cadence.every(LARGE))
                                .withHeldOutCadence(Cadence.every(LARGE)).withReportEvery(LARGE))),
                new Case("all three", Minimizer.builder().stepSize(1e-3).batchSize(8),
                        () -> List.of(NoiseMonitor.every(LARGE), AngleMonitor.every(LARGE),
                                LossMonitor.defaults().withObjectiveCadence(Cadence.every(LARGE))
                                        .withReportEvery(LARGE))));
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("quiet")
    void perStepPathsAllocateNothing(Case c) {
        long extra = extraBytes(c);
        System.out.println(String.format(Locale.ROOT, "estimator allocation, %s: %d B over 100,000 extra steps", c,
                extra));
        assertTrue(extra < 4096, c + ": " + extra + " B over 100,000 steps");
    }

    static List<Case> budgeted() {
        return List.of(new Case("default budgets, B=8", Minimizer.builder().stepSize(1e-3).batchSize(8),
                () -> List.of(NoiseMonitor.defaults(), AngleMonitor.defaults(), LossMonitor.defaults())));
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("budgeted")
    void probesAllocateOnlyTheirEvents(Case c) {
        long[] events = new long[1];
        Minimizer shortRun = c.builder().maxSteps(1_000).explosionFactor(1e300).build();
        Minimizer longRun = c.builder().maxSteps(101_000).explosionFactor(1e300).build();
        for (int k = 0; k < 2; k++) {
            run(longRun, c, null);
        }
        long shortBytes = Long.MAX_VALUE;
        long longBytes = Long.MAX_VALUE;
        long shortEvents = 0;
        long longEvents = 0;
        for (int k = 0; k < 3; k++) {
            events[0] = 0;
            shortBytes = Math.min(shortBytes, run(shortRun, c, events));
            shortEvents = events[0];
            events[0] = 0;
            longBytes = Math.min(longBytes, run(longRun, c, events));
            longEvents = events[0];
        }
        long extraEvents = longEvents - shortEvents;
        long extra = longBytes - shortBytes;
        System.out.println(String.format(Locale.ROOT,
                "estimator allocation, %s: %d B for %d extra events (%.1f B each)",
                c, extra, extraEvents, (double) extra / Math.max(1, extraEvents)));
        assertTrue(extraEvents > 100, "the budgets should probe: " + extraEvents + " events");
        assertTrue(extra < 4096 + 160 * extraEvents, extra + " B for " + extraEvents + " events");
    }

    private static long extraBytes(Case c) {
        Minimizer shortRun = c.builder().maxSteps(1_000).explosionFactor(1e300).build();
        Minimizer longRun = c.builder().maxSteps(101_000).explosionFactor(1e300).build();
        for (int k = 0; k < 2; k++) {
            run(longRun, c, null);
        }
        long shortBytes = Long.MAX_VALUE;
        long longBytes = Long.MAX_VALUE;
        for (int k = 0; k < 3; k++) {
            shortBytes = Math.min(shortBytes, run(shortRun, c, null));
            longBytes = Math.min(longBytes, run(longRun, c, null));
        }
        return longBytes - shortBytes;
    }

    /** @param events null for no subscriber, else a counter the subscriber increments */
    private static long run(Minimizer m, Case c, long[] events) {
        Diagnostics.Builder host = Diagnostics.builder();
        for (Monitor monitor : c.monitors().get()) {
            host.monitor(monitor);
        }
        if (events != null) {
            host.subscribe(e -> events[0]++);
        }
        Diagnostics diagnostics = host.build();
        FitOptions options = FitOptions.listeners(diagnostics);
        long tid = Thread.currentThread().getId();
        long before = THREADS.getThreadAllocatedBytes(tid);
        Fit fit = m.fit(DATA, options);
        long after = THREADS.getThreadAllocatedBytes(tid);
        assertTrue(fit.steps() > 0);
        assertTrue(diagnostics.failures().isEmpty(), diagnostics.failures().toString());
        return after - before;
    }

    private static Dataset withStrata() {
        int[] strata = new int[PROBLEM.y.length];
        for (int i = 0; i < strata.length; i++) {
            strata[i] = i % 10 == 0 ? 1 : 0;
        }
        return PROBLEM.data.withStrata(strata);
    }
}
