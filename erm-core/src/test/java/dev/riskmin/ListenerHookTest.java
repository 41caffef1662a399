package dev.riskmin;

import dev.riskmin.hook.FitControl;
import dev.riskmin.hook.FitListener;
import dev.riskmin.hook.RunInfo;
import dev.riskmin.hook.StepView;
import dev.riskmin.objective.LinearObjective;
import dev.riskmin.testing.LeastSquaresProblem;
import org.junit.jupiter.api.Test;

import java.util.ArrayList;
import java.util.List;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** The listener hook: what a listener sees, what it may ask, and that a failing one cannot kill a fit. */
class ListenerHookTest {
    private static final LeastSquaresProblem PROBLEM = LeastSquaresProblem.gaussian(3, 200, 4, 0.3);

    @Test
    void throwingListenerIsDetachedAndTheFitFinishesAsWithoutIt() {
        FitListener bomb = new FitListener() {
            @Override
            public void step(StepView view, FitControl control) {
                if (view.step() == 10) {
                    throw new IllegalStateException("boom");
                }
            }
        };
        Minimizer m = Minimizer.builder().epochs(3).seed(5).build();
        Fit with = m.fit(PROBLEM.data, FitOptions.listeners(bomb));
        Fit without = m.fit(PROBLEM.data);
        assertEquals(StopReason.EPOCH_BUDGET, with.stopReason());
        assertEquals(1, with.listenerFailures().size());
        assertTrue(with.listenerFailures().get(0).contains("boom"));
        assertArrayEquals(without.parameters(), with.parameters(), 0.0);
    }

    @Test
    void viewShowsTheBatchGradientThatTheProbeRecomputes() {
        double[] fromView = new double[5];
        double[] fromProbe = new double[5];
        double[] sample = new double[5];
        double[] maxError = {0};
        FitListener check = new FitListener() {
            @Override
            public void step(StepView view, FitControl control) {
                if (view.step() % 37 != 0) {
                    return;
                }
                view.copyBatchGradient(fromView);
                java.util.Arrays.fill(fromProbe, 0);
                for (int k = 0; k < view.batchLength(); k++) {
                    view.probe().sampleGradient(k, sample);
                    for (int j = 0; j < 5; j++) {
                        fromProbe[j] += sample[j] * view.batchScale(k) / view.batchLength();
                    }
                }
                for (int j = 0; j < 5; j++) {
                    maxError[0] = Math.max(maxError[0], Math.abs(fromView[j] - fromProbe[j]));
                }
            }
        };
        Minimizer.builder().batchSize(8).epochs(2).build().fit(PROBLEM.data, FitOptions.listeners(check));
        assertTrue(maxError[0] < 1e-12, "max |g_B - mean of probe sample gradients| = " + maxError[0]);
    }

    @Test
    void probeFullGradientEqualsTheObjectivesGradient() {
        double[] probe = new double[5];
        double[] h = new double[5];
        double[] direct = new double[5];
        double[] gap = {0, 0};
        FitListener check = new FitListener() {
            @Override
            public void epochEnded(StepView view, FitControl control) {
                double value = view.probe().fullGradient(probe);
                view.copyParameters(h);
                LinearObjective objective = PROBLEM.objective();
                double expected = objective.gradient(h, direct);
                gap[0] = Math.max(gap[0], Math.abs(value - expected));
                for (int j = 0; j < 5; j++) {
                    gap[1] = Math.max(gap[1], Math.abs(probe[j] - direct[j]));
                }
            }
        };
        Fit fit = Minimizer.builder().epochs(3).build().fit(PROBLEM.data, FitOptions.listeners(check));
        assertEquals(0.0, gap[0], 0.0);
        assertEquals(0.0, gap[1], 0.0);
        assertEquals(3 * 200, fit.probeEvaluations());
    }

    @Test
    void haltStopsBeforeTheParametersMove() {
        double[] seen = new double[5];
        FitListener halter = new FitListener() {
            @Override
            public void step(StepView view, FitControl control) {
                if (view.step() == 42) {
                    view.copyParameters(seen);
                    control.halt(StopReason.CONVERGED, "test says so");
                }
            }
        };
        Fit fit = Minimizer.builder().epochs(5).build().fit(PROBLEM.data, FitOptions.listeners(halter));
        assertEquals(StopReason.CONVERGED, fit.stopReason());
        assertEquals("test says so", fit.stopDetail());
        assertEquals(42, fit.steps());
        assertArrayEquals(seen, fit.parameters(), 0.0);
    }

    @Test
    void stepSizeScalingAndBatchRequestsTakeEffect() {
        List<Double> steps = new ArrayList<>();
        List<Integer> batches = new ArrayList<>();
        FitListener steer = new FitListener() {
            @Override
            public void step(StepView view, FitControl control) {
                steps.add(view.stepSize());
                batches.add(view.batchLength());
                if (view.step() == 3) {
                    control.scaleStepSize(0.5);
                    control.requestBatchSize(16);
                }
            }
        };
        Fit fit = Minimizer.builder().stepSize(0.01).maxSteps(6).build().fit(PROBLEM.data, FitOptions.listeners(steer));
        assertEquals(List.of(0.01, 0.01, 0.01, 0.01, 0.005, 0.005), steps);
        assertEquals(List.of(1, 1, 1, 1, 16, 16), batches);
        assertEquals(0.5, fit.stepSizeFactor());
        assertEquals(16, fit.finalBatchSize());
        assertEquals(4 + 2 * 16, fit.gradientEvaluations());
    }

    @Test
    void startedAndFinishedAreCalledOnceWithTheRunsFacts() {
        RunInfo[] info = new RunInfo[1];
        Fit[] finished = new Fit[1];
        int[] epochs = {0};
        FitListener l = new FitListener() {
            @Override
            public void started(RunInfo run) {
                info[0] = run;
            }

            @Override
            public void epochEnded(StepView view, FitControl control) {
                epochs[0]++;
            }

            @Override
            public void finished(Fit fit) {
                finished[0] = fit;
            }
        };
        Fit fit = Minimizer.builder().batchSize(10).epochs(4).seed(99).build().fit(PROBLEM.data, FitOptions.listeners(l));
        assertNotNull(info[0]);
        assertEquals(200, info[0].sampleCount());
        assertEquals(5, info[0].dimension());
        assertEquals(80, info[0].plannedSteps());
        assertEquals(99, info[0].seed());
        assertEquals(4, epochs[0]);
        assertTrue(finished[0] == fit);
    }

    @Test
    void restoredParametersReplaceTheFitsOwnAndHeldOutLossIsMeasuredOnTheHeldOutRows() {
        LeastSquaresProblem other = LeastSquaresProblem.gaussian(4, 100, 4, 0.3);
        double[] best = new double[5];
        double[] bestLoss = {Double.POSITIVE_INFINITY};
        double[] expected = {0};
        FitListener keeper = new FitListener() {
            @Override
            public void epochEnded(StepView view, FitControl control) {
                double loss = view.probe().heldOutLoss();
                double[] h = new double[5];
                view.copyParameters(h);
                double direct = 0;
                LinearObjective held = other.objective();
                for (int i = 0; i < 100; i++) {
                    direct += held.sampleLoss(h, i) / 100;
                }
                expected[0] = Math.max(expected[0], Math.abs(direct - loss));
                if (loss < bestLoss[0]) {
                    bestLoss[0] = loss;
                    System.arraycopy(h, 0, best, 0, 5);
                    control.restoreParameters(best);
                }
            }
        };
        Fit fit = Minimizer.builder().epochs(6).build()
                .fit(PROBLEM.data, FitOptions.builder().listener(keeper).heldOut(other.data).build());
        assertEquals(0.0, expected[0], 1e-12);
        assertArrayEquals(best, fit.parameters(), 0.0);
        assertTrue(fit.probeEvaluations() >= 600);
    }

    @Test
    void heldOutLossWithoutHeldOutDataIsAnIllegalState() {
        String[] message = {null};
        FitListener asker = new FitListener() {
            @Override
            public void step(StepView view, FitControl control) {
                if (!view.probe().hasHeldOut()) {
                    try {
                        view.probe().heldOutLoss();
                    } catch (IllegalStateException e) {
                        message[0] = e.getMessage();
                    }
                    control.halt(StopReason.HALTED, "done");
                }
            }
        };
        Minimizer.builder().build().fit(PROBLEM.data, FitOptions.listeners(asker));
        assertTrue(message[0] != null && message[0].contains("heldOut"), message[0]);
    }
}
