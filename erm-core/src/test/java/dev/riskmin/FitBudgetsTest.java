package dev.riskmin;

import dev.riskmin.hook.FitControl;
import dev.riskmin.hook.FitListener;
import dev.riskmin.hook.StepView;
import dev.riskmin.testing.LeastSquaresProblem;
import org.junit.jupiter.api.Test;

import java.time.Duration;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** Each budget stops the fit with its own reason and the promised counters. */
class FitBudgetsTest {
    private static final LeastSquaresProblem PROBLEM = LeastSquaresProblem.gaussian(7, 500, 5, 0.1);

    @Test
    void stepBudgetStopsAfterExactlyThatManySteps() {
        Fit fit = Minimizer.builder().maxSteps(1234).batchSize(3).build().fit(PROBLEM.data);
        assertEquals(StopReason.STEP_BUDGET, fit.stopReason());
        assertEquals(1234, fit.steps());
        assertEquals(1234 * 3, fit.gradientEvaluations());
        assertEquals(1234 * 3 / 500.0, fit.epochs(), 1e-12);
    }

    @Test
    void epochBudgetCountsPassesOfNDraws() {
        Fit fit = Minimizer.builder().epochs(3).batchSize(10).build().fit(PROBLEM.data);
        assertEquals(StopReason.EPOCH_BUDGET, fit.stopReason());
        assertEquals(150, fit.steps());
        assertEquals(3.0, fit.epochs(), 1e-12);
    }

    @Test
    void defaultBudgetIsTenEpochs() {
        Fit fit = Minimizer.builder().build().fit(PROBLEM.data);
        assertEquals(StopReason.EPOCH_BUDGET, fit.stopReason());
        assertEquals(10.0, fit.epochs(), 1e-12);
    }

    @Test
    void evaluationBudgetCountsPerSampleGradients() {
        Fit fit = Minimizer.builder().maxGradientEvaluations(1000).batchSize(7).build().fit(PROBLEM.data);
        assertEquals(StopReason.EVALUATION_BUDGET, fit.stopReason());
        assertTrue(fit.gradientEvaluations() >= 1000 && fit.gradientEvaluations() < 1007, fit.toString());
    }

    @Test
    void timeBudgetStopsALongFit() {
        Fit fit = Minimizer.builder().epochs(1e9).timeLimit(Duration.ofMillis(150)).build().fit(PROBLEM.data);
        assertEquals(StopReason.TIME_BUDGET, fit.stopReason());
        assertTrue(fit.wallTime().toMillis() >= 150, fit.toString());
    }

    @Test
    void cancellationFromAnotherThreadStopsTheFit() throws Exception {
        CancellationToken token = new CancellationToken();
        Thread canceller = new Thread(() -> {
            try {
                Thread.sleep(50);
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
            }
            token.cancel();
        });
        canceller.start();
        Fit fit = Minimizer.builder().epochs(1e9).build()
                .fit(PROBLEM.data, FitOptions.builder().cancellation(token).build());
        canceller.join();
        assertEquals(StopReason.CANCELLED, fit.stopReason());
        assertTrue(allFinite(fit.parameters()));
    }

    @Test
    void interruptStopsTheFitAndLeavesTheFlagSet() {
        FitListener interrupter = new FitListener() {
            @Override
            public void step(StepView view, FitControl control) {
                if (view.step() == 100) {
                    Thread.currentThread().interrupt();
                }
            }
        };
        Fit fit = Minimizer.builder().epochs(1e9).build().fit(PROBLEM.data, FitOptions.listeners(interrupter));
        boolean flag = Thread.interrupted(); // clears it for the other tests
        assertTrue(flag, "the interrupt flag must stay set");
        assertEquals(StopReason.INTERRUPTED, fit.stopReason());
        assertEquals(101, fit.steps());
    }

    static boolean allFinite(double[] v) {
        for (double x : v) {
            if (!Double.isFinite(x)) {
                return false;
            }
        }
        return true;
    }
}
