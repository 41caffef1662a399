package dev.riskmin.diagnostics.stopping;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.StopReason;
import dev.riskmin.diagnostics.Decision;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.diagnostics.EventFilter;
import dev.riskmin.diagnostics.EventKind;
import dev.riskmin.diagnostics.Monitor;
import dev.riskmin.diagnostics.StoppingEvent;
import dev.riskmin.hook.FitControl;
import dev.riskmin.hook.FitListener;
import dev.riskmin.hook.StepView;
import dev.riskmin.sampling.Sampling;
import org.junit.jupiter.api.Test;

import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * With their default action the stationarity tests cut the step and go on: every cut is a
 * {@link Decision#CUT_STEP} event, counted in the run summary, multiplies the step size the fit applies
 * by the test's factor, and starts a new phase (burn-in, or minimum count of values) before the next.
 */
class StepSizeCutsTest {

    @Test
    void pflugHalvesTheStepAndRestartsItsBurnIn() {
        NoiseBallProblem q = NoiseBallProblem.of(41, 2000, 50, 1.0, 1.0, 0.08, 64, 20.0);
        long burnIn = 10;
        Run run = run(q, 0.08, 64, PflugCriterion.defaults().withBurnIn(burnIn, 0.0), (long) (40 * q.transientSteps));
        assertCutsConsistent(run, 0.5);
        for (int k = 1; k < run.cuts.size(); k++) {
            assertTrue(run.cuts.get(k).step() - run.cuts.get(k - 1).step() >= burnIn, "burn-in restarted");
        }
    }

    @Test
    void fluctuationDissipationCutsByItsFactorAndClearsItsWindow() {
        NoiseBallProblem q = NoiseBallProblem.of(43, 2000, 4, 1.0, 0.15, 0.05, 16, 100.0);
        Run run = run(q, 0.05, 16, FluctuationDissipationCriterion.defaults(), (long) (20 * q.transientSteps));
        assertCutsConsistent(run, FluctuationDissipationCriterion.DEFAULT_CUT_FACTOR);
        // After a cut the count restarts: the tests of the next 1,000 steps have too few values (NaN
        // statistic), the first one after them has a statistic again.
        long cut = run.cuts().get(0).step();
        boolean testedAgain = false;
        for (StoppingEvent e : run.events()) {
            long since = e.step() - cut;
            if (since > 0 && since < FluctuationDissipationCriterion.DEFAULT_MIN_SAMPLES) {
                assertTrue(Double.isNaN(e.statistic()) && e.decision() == Decision.CONTINUE, e.toString());
            } else if (since >= FluctuationDissipationCriterion.DEFAULT_MIN_SAMPLES && !testedAgain) {
                assertTrue(Double.isFinite(e.statistic()), e.toString());
                testedAgain = true;
            }
        }
        assertTrue(testedAgain, "no test after the cut within the budget");
    }

    record Run(Fit fit, Diagnostics diagnostics, List<StoppingEvent> events, List<StoppingEvent> cuts,
               Map<Long, Double> steps) {
    }

    private static Run run(NoiseBallProblem q, double step, int batch, Monitor test, long budget) {
        List<StoppingEvent> events = new ArrayList<>();
        List<StoppingEvent> cuts = new ArrayList<>();
        Map<Long, Double> steps = new HashMap<>();
        FitListener stepSizes = new FitListener() {
            @Override
            public void step(StepView view, FitControl control) {
                steps.put(view.step(), view.stepSize());
            }
        };
        Diagnostics diagnostics = Diagnostics.builder().monitor(test).subscribe(e -> {
            events.add((StoppingEvent) e);
            if (((StoppingEvent) e).decision() == Decision.CUT_STEP) {
                cuts.add((StoppingEvent) e);
            }
        }, EventFilter.of(EventKind.STOPPING)).build();
        // The recorder comes after the diagnostics, so it sees the step size of a cut step already cut.
        Fit fit = Minimizer.builder().stepSize(step).batchSize(batch).sampling(Sampling.withReplacement())
                .maxSteps(budget).seed(7).build()
                .fit(q.data, FitOptions.builder().initialParameters(q.start).listener(diagnostics).listener(stepSizes)
                        .build());
        return new Run(fit, diagnostics, events, cuts, steps);
    }

    private static void assertCutsConsistent(Run run, double factor) {
        assertEquals(StopReason.STEP_BUDGET, run.fit().stopReason());
        int n = run.cuts().size();
        assertTrue(n >= 1, "no cut in the budget");
        assertEquals(n, run.diagnostics().summary().stepCuts);
        assertEquals(Math.pow(factor, n), run.fit().stepSizeFactor(), 1e-12);
        double first = run.steps().get(0L);
        for (int k = 0; k < n; k++) {
            long at = run.cuts().get(k).step();
            assertEquals(first * Math.pow(factor, k + 1), run.steps().get(at), 1e-12 * first, "step size after cut " + k);
        }
    }
}
