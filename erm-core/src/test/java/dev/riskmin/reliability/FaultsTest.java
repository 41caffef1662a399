package dev.riskmin.reliability;

import dev.riskmin.CancellationToken;
import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.StopReason;
import dev.riskmin.hook.FitControl;
import dev.riskmin.hook.FitListener;
import dev.riskmin.hook.RunInfo;
import dev.riskmin.hook.StepView;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.sampling.Sampling;
import dev.riskmin.testing.LeastSquaresProblem;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.Arguments;
import org.junit.jupiter.params.provider.MethodSource;

import java.io.IOException;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.Set;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;
import java.util.function.Supplier;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Faults during a fit end it in the promised state, with the promised reason, on the caller's
 * thread and without leaving a thread behind: a listener that throws anything (checked exceptions
 * and assertion errors included) in any callback; an interrupt from another thread; one
 * cancellation token serving several fits; an exhausted time budget on every update rule. (A
 * listener throwing an unchecked exception in {@code step}, one cancellation and one time budget are
 * also in {@code ListenerHookTest} and {@code FitBudgetsTest}; requests too large for memory are in
 * {@link OutOfMemorySizedRequestsTest}.)
 */
class FaultsTest {
    private static final LeastSquaresProblem PROBLEM = LeastSquaresProblem.gaussian(31, 400, 5, 0.3);

    enum Where { STARTED, STEP, EPOCH_ENDED, FINISHED }

    static List<Arguments> throwers() {
        List<Arguments> out = new ArrayList<>();
        List<Supplier<Throwable>> kinds = List.of(() -> new IllegalStateException("unchecked (test)"),
                () -> new IOException("checked (test)"), () -> new AssertionError("assertion (test)"));
        for (Where where : Where.values()) {
            for (Supplier<Throwable> kind : kinds) {
                out.add(Arguments.of(where, kind.get().getClass().getSimpleName(), kind));
            }
        }
        return out;
    }

    /** A listener that throws {@code kind} once, at {@code where} (at step 25 for the step callbacks). */
    static FitListener thrower(Where where, Supplier<Throwable> kind) {
        return new FitListener() {
            @Override
            public void started(RunInfo run) {
                if (where == Where.STARTED) {
                    throw HostileCase.sneaky(kind.get());
                }
            }

            @Override
            public void step(StepView view, FitControl control) {
                if (where == Where.STEP && view.step() == 25) {
                    throw HostileCase.sneaky(kind.get());
                }
            }

            @Override
            public void epochEnded(StepView view, FitControl control) {
                if (where == Where.EPOCH_ENDED) {
                    throw HostileCase.sneaky(kind.get());
                }
            }

            @Override
            public void finished(Fit fit) {
                if (where == Where.FINISHED) {
                    throw HostileCase.sneaky(kind.get());
                }
            }
        };
    }

    @ParameterizedTest(name = "{0}, {1}")
    @MethodSource("throwers")
    void listenerThrowingAnywhereIsDetachedAndTheFitEndsAsWithoutIt(Where where, String kindName,
                                                                     Supplier<Throwable> kind) {
        Minimizer m = Minimizer.builder().updateRule(UpdateRule.svrg()).batchSize(4).epochs(3).seed(5).build();
        Fit without = m.fit(PROBLEM.data);
        List<Long> later = new ArrayList<>();
        FitListener witness = new FitListener() { // listed after the thrower: it must keep receiving events
            @Override
            public void step(StepView view, FitControl control) {
                later.add(view.step());
            }
        };
        Fit with = m.fit(PROBLEM.data, FitOptions.builder().listener(thrower(where, kind)).listener(witness).build());
        assertEquals(StopReason.EPOCH_BUDGET, with.stopReason(), with.toString());
        assertArrayEquals(without.parameters(), with.parameters(), 0.0);
        assertEquals(with.steps(), later.size(), "the other listener saw every step");
        if (where == Where.FINISHED) {
            assertTrue(with.listenerFailures().isEmpty(), "finished() comes after the fit is built; only logged");
        } else {
            assertEquals(1, with.listenerFailures().size(), with.listenerFailures().toString());
            String line = with.listenerFailures().get(0);
            assertTrue(line.contains(kindName) && line.contains("(test)"), line);
        }
    }

    /** Documented: errors other than assertion errors are not swallowed (the JVM may be in trouble). */
    @Test
    void listenerErrorOtherThanAssertionReachesTheCaller() {
        FitListener overflow = thrower(Where.STEP, () -> new StackOverflowError("deep (test)"));
        assertThrows(StackOverflowError.class,
                () -> Minimizer.builder().epochs(1).build().fit(PROBLEM.data, FitOptions.listeners(overflow)));
    }

    @Test
    void interruptFromAnotherThreadStopsTheFitWithTheFlagLeftSet() throws Exception {
        ResourceCheck before = ResourceCheck.snapshot();
        CountDownLatch running = new CountDownLatch(1);
        FitListener signal = new FitListener() {
            @Override
            public void step(StepView view, FitControl control) {
                if (view.step() == 100) {
                    running.countDown();
                }
            }
        };
        Fit[] fit = new Fit[1];
        boolean[] flag = new boolean[1];
        Thread fitter = new Thread(() -> {
            fit[0] = Minimizer.builder().epochs(1e9).timeLimit(Duration.ofSeconds(20)).build()
                    .fit(PROBLEM.data, FitOptions.listeners(signal));
            flag[0] = Thread.currentThread().isInterrupted();
        }, "interrupted-fitter");
        fitter.start();
        assertTrue(running.await(20, TimeUnit.SECONDS));
        fitter.interrupt();
        fitter.join(20_000);
        assertEquals(StopReason.INTERRUPTED, fit[0].stopReason(), fit[0].toString());
        assertTrue(flag[0], "the interrupt flag is left set for the caller");
        assertTrue(fit[0].steps() >= 100 && fit[0].wallTime().toSeconds() < 20, fit[0].toString());
        assertTrue(HostileOutcome.allFinite(fit[0].parameters()));
        before.assertNothingLeft("an interrupted fit");
    }

    @Test
    void fitStartedWithTheInterruptFlagSetStopsBeforeTheFirstStep() {
        Thread.currentThread().interrupt();
        Fit fit;
        try {
            fit = Minimizer.builder().epochs(5).build().fit(PROBLEM.data);
        } finally {
            assertTrue(Thread.interrupted(), "flag still set (and cleared here for the other tests)");
        }
        assertEquals(StopReason.INTERRUPTED, fit.stopReason());
        assertEquals(0, fit.steps());
        assertArrayEquals(new double[6], fit.parameters(), 0.0);
    }

    @Test
    void oneTokenCancelsEveryFitWatchingIt() throws Exception {
        ResourceCheck before = ResourceCheck.snapshot();
        CancellationToken token = new CancellationToken();
        int fits = 4;
        CountDownLatch running = new CountDownLatch(fits);
        Fit[] results = new Fit[fits];
        List<Thread> threads = new ArrayList<>();
        for (int k = 0; k < fits; k++) {
            int index = k;
            FitListener signal = new FitListener() {
                @Override
                public void step(StepView view, FitControl control) {
                    if (view.step() == 50) {
                        running.countDown();
                    }
                }
            };
            Thread t = new Thread(() -> results[index] = Minimizer.builder().updateRule(EveryLoss.rules().get(index))
                    .stepSize(1e-3).epochs(1e9).timeLimit(Duration.ofSeconds(20)).seed(index).build()
                    .fit(PROBLEM.data, FitOptions.builder().listener(signal).cancellation(token).build()),
                    "cancelled-fitter-" + k);
            threads.add(t);
            t.start();
        }
        assertTrue(running.await(20, TimeUnit.SECONDS));
        token.cancel();
        for (Thread t : threads) {
            t.join(20_000);
        }
        for (Fit fit : results) {
            assertEquals(StopReason.CANCELLED, fit.stopReason(), fit.toString());
            assertTrue(fit.stopDetail().contains("cancelled"), fit.stopDetail());
            assertTrue(HostileOutcome.allFinite(fit.parameters()));
            assertTrue(fit.wallTime().toSeconds() < 20);
        }
        before.assertNothingLeft("cancelled fits");
    }

    /** The budget is checked before every step, so it is overshot by at most one step (SVRG: a snapshot of n). */
    @Test
    void exhaustedTimeBudgetStopsEveryUpdateRuleWithinOneStep() {
        LeastSquaresProblem large = LeastSquaresProblem.gaussian(32, 20_000, 10, 0.3);
        long limitMillis = 60;
        double worstOvershoot = 0;
        for (UpdateRule rule : EveryLoss.rules()) {
            Fit fit = Minimizer.builder().updateRule(rule).sampling(Sampling.withReplacement()).batchSize(64)
                    .stepSize(1e-4).epochs(1e9).timeLimit(Duration.ofMillis(limitMillis)).build().fit(large.data);
            assertEquals(StopReason.TIME_BUDGET, fit.stopReason(), rule.name() + ": " + fit);
            assertTrue(HostileOutcome.allFinite(fit.parameters()));
            double overshoot = fit.wallTime().toNanos() / 1e6 - limitMillis;
            assertTrue(overshoot >= 0, rule.name() + " stopped early: " + fit);
            worstOvershoot = Math.max(worstOvershoot, overshoot);
        }
        System.out.printf(java.util.Locale.ROOT, "time budget of %d ms: worst overshoot %.1f ms over %d update rules%n",
                limitMillis, worstOvershoot, EveryLoss.rules().size());
        // Common practice, no source: a step here costs well under a millisecond; 500 ms leaves room
        // for a collection pause on a busy machine.
        assertTrue(worstOvershoot < 500, "worst overshoot " + worstOvershoot + " ms");
    }

    /** The whole fit runs on the caller's thread: a listener sees no thread the fit started. */
    @Test
    void aFitStartsNoThread() throws InterruptedException {
        Minimizer m = Minimizer.builder().updateRule(UpdateRule.svrg()).sampling(Sampling.importance()).batchSize(8)
                .epochs(2).build();
        m.fit(PROBLEM.data); // warm-up: classes loaded once
        ResourceCheck before = ResourceCheck.snapshot();
        List<Set<Thread>> during = new ArrayList<>();
        FitListener look = new FitListener() {
            @Override
            public void step(StepView view, FitControl control) {
                if (view.step() == 20) {
                    during.add(ResourceCheck.liveThreads());
                }
            }
        };
        m.fit(PROBLEM.data, FitOptions.listeners(look));
        Set<Thread> now = ResourceCheck.liveThreads();
        assertEquals(1, during.size());
        assertEquals(before.threadCount(), during.get(0).size(), "threads while fitting: " + during.get(0));
        assertEquals(before.threadCount(), now.size());
        before.assertNothingLeft("a fit");
    }
}
