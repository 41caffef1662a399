package dev.riskmin.diagnostics.stopping;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.StopReason;
import dev.riskmin.data.Dataset;
import dev.riskmin.diagnostics.Decision;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.diagnostics.EventFilter;
import dev.riskmin.diagnostics.EventKind;
import dev.riskmin.diagnostics.StoppingEvent;
import dev.riskmin.hook.FitControl;
import dev.riskmin.hook.FitListener;
import dev.riskmin.hook.StepView;
import dev.riskmin.testing.LeastSquaresProblem;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.ArrayList;
import java.util.List;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The held-out test on a constructed run whose held-out loss is U-shaped: training on least squares
 * from h = 0 toward h*, with held-out data on the same features whose targets are those of ½h*, so the
 * held-out loss falls until the path passes near ½h* and rises after. A separate listener records
 * the held-out loss and the parameters at every epoch end.
 */
class HeldOutWorseningCriterionTest {
    private static final int ALLOWED_EPOCHS = 3;

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void restoresExactlyTheParametersOfTheBestEpochAfterTheAllowedEpochsWithoutANewBest(long seed) {
        LeastSquaresProblem problem = LeastSquaresProblem.gaussian(seed, 200, 5, 0.3);
        int d = 5;
        double[] target = new double[200];
        for (int i = 0; i < 200; i++) {
            double z = 0.5 * problem.optimum[d];
            for (int j = 0; j < d; j++) {
                z += 0.5 * problem.optimum[j] * problem.x[i][j];
            }
            target[i] = z;
        }
        Dataset heldOut = Dataset.of(problem.x, target);
        List<Double> losses = new ArrayList<>();
        List<double[]> parameters = new ArrayList<>();
        FitListener recorder = new FitListener() {
            @Override
            public void epochEnded(StepView view, FitControl control) {
                losses.add(view.probe().heldOutLoss());
                double[] h = new double[view.dimension()];
                view.copyParameters(h);
                parameters.add(h);
            }
        };
        List<StoppingEvent> events = new ArrayList<>();
        Diagnostics diagnostics = Diagnostics.builder().monitor(HeldOutWorseningCriterion.of(ALLOWED_EPOCHS, 0.0))
                .subscribe(e -> events.add((StoppingEvent) e), EventFilter.of(EventKind.STOPPING)).build();
        Fit fit = Minimizer.builder().stepSize(5e-4).epochs(200).seed(seed).build().fit(problem.data,
                FitOptions.builder().heldOut(heldOut).listener(recorder).listener(diagnostics).build());

        assertEquals(StopReason.HELD_OUT_WORSENING, fit.stopReason());
        assertEquals("held-out-worsening", diagnostics.summary().stoppedBy);
        int best = 0;
        for (int e = 1; e < losses.size(); e++) {
            if (losses.get(e) < losses.get(best)) {
                best = e;
            }
        }
        assertTrue(best >= 2, "the held-out loss should fall for a while first: best at epoch " + (best + 1));
        assertEquals(best + ALLOWED_EPOCHS + 1, losses.size(), "stops exactly when the allowed epochs run out");
        assertArrayEquals(parameters.get(best), fit.parameters(), 0.0);
        assertEquals(losses.get(best), diagnostics.summary().bestHeldOutLoss, 0.0);
        assertEquals(losses.size(), events.size(), "one event per epoch");
        for (int e = 0; e < events.size(); e++) {
            assertEquals(losses.get(e), events.get(e).statistic(), 0.0);
        }
        StoppingEvent last = events.get(events.size() - 1);
        assertEquals(Decision.STOP_AND_RESTORE, last.decision());
        assertEquals(losses.get(best), last.threshold(), 0.0); // with τ = 0 the value to beat is the best
        assertTrue(fit.stopDetail().contains("epoch " + (best + 1)), fit.stopDetail());
    }

    @Test
    void withoutHeldOutDataTheTestRefusesNamingTheOption() {
        LeastSquaresProblem problem = LeastSquaresProblem.gaussian(2, 100, 3, 0.3);
        Diagnostics diagnostics = Diagnostics.builder().monitor(HeldOutWorseningCriterion.defaults()).build();
        Fit fit;
        try (QuietHost quiet = new QuietHost()) {
            fit = Minimizer.builder().epochs(3).build().fit(problem.data, FitOptions.listeners(diagnostics));
        }
        assertEquals(StopReason.EPOCH_BUDGET, fit.stopReason());
        assertEquals(1, diagnostics.failures().size());
        String failure = diagnostics.failures().get(0);
        assertTrue(failure.contains("IllegalStateException") && failure.contains("FitOptions.heldOut"), failure);
    }
}
