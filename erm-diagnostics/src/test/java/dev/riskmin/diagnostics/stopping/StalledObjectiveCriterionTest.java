package dev.riskmin.diagnostics.stopping;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.StopReason;
import dev.riskmin.diagnostics.Decision;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.diagnostics.EventFilter;
import dev.riskmin.diagnostics.EventKind;
import dev.riskmin.diagnostics.StoppingEvent;
import dev.riskmin.hook.FitControl;
import dev.riskmin.hook.FitListener;
import dev.riskmin.hook.StepView;
import dev.riskmin.testing.LeastSquaresProblem;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.ArrayList;
import java.util.List;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The stalled-objective test on noisy least squares with a constant step, which falls and then
 * plateaus at the noise ball: it must stop at the first epoch where the rule holds (recomputed here
 * from the objective recorded by a separate listener) and not before, with the recorded figures in its
 * events.
 */
class StalledObjectiveCriterionTest {
    private static final int WINDOW = 3;
    private static final double TOLERANCE = 1e-3;

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void stopsAtTheFirstEpochWithoutProgressOverTheWindow(long seed) {
        LeastSquaresProblem problem = LeastSquaresProblem.gaussian(seed, 500, 5, 1.0);
        List<Double> objectives = new ArrayList<>();
        FitListener recorder = new FitListener() {
            @Override
            public void epochEnded(StepView view, FitControl control) {
                objectives.add(view.probe().objective());
            }
        };
        List<StoppingEvent> events = new ArrayList<>();
        Diagnostics diagnostics = Diagnostics.builder().monitor(StalledObjectiveCriterion.of(WINDOW, TOLERANCE))
                .subscribe(e -> events.add((StoppingEvent) e), EventFilter.of(EventKind.STOPPING)).build();
        Fit fit = Minimizer.builder().stepSize(0.002).epochs(300).seed(seed).build()
                .fit(problem.data, FitOptions.builder().listener(recorder).listener(diagnostics).build());

        assertEquals(StopReason.NO_PROGRESS, fit.stopReason());
        assertEquals("stalled-objective", diagnostics.summary().stoppedBy);
        assertEquals(objectives.size(), events.size(), "one event per epoch");
        int progressEpochs = 0;
        for (int e = 0; e < objectives.size(); e++) {
            StoppingEvent event = events.get(e);
            assertEquals(TOLERANCE, event.threshold(), 0.0);
            if (e < WINDOW) {
                assertTrue(Double.isNaN(event.statistic()), "window filling at epoch " + (e + 1));
                assertEquals(Decision.CONTINUE, event.decision());
                continue;
            }
            double before = Double.POSITIVE_INFINITY;
            for (int k = 0; k <= e - WINDOW; k++) {
                before = Math.min(before, objectives.get(k));
            }
            double window = Double.POSITIVE_INFINITY;
            for (int k = e - WINDOW + 1; k <= e; k++) {
                window = Math.min(window, objectives.get(k));
            }
            double improvement = (before - window) / Math.abs(before);
            assertEquals(improvement, event.statistic(), 1e-12);
            boolean last = e == objectives.size() - 1;
            assertEquals(last, improvement < TOLERANCE, "epoch " + (e + 1) + ": improvement " + improvement);
            assertEquals(last ? Decision.STOP : Decision.CONTINUE, event.decision());
            progressEpochs += last ? 0 : 1;
        }
        assertTrue(progressEpochs >= 2, "the objective should fall for a while first: " + objectives);
        assertEquals(objectives.get(objectives.size() - 1), diagnostics.summary().latestObjective, 1e-12);
    }
}
