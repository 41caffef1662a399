package dev.riskmin.reliability;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.StopReason;
import dev.riskmin.hook.FitControl;
import dev.riskmin.hook.FitListener;
import dev.riskmin.hook.StepView;
import dev.riskmin.sampling.Sampling;
import dev.riskmin.step.StepSchedule;
import dev.riskmin.testing.Cases;
import org.junit.jupiter.api.Test;

import java.util.ArrayList;
import java.util.List;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The failures {@link HostileInputTest} found, each reduced to its smallest form, so that the fix
 * stays fixed whatever the generator draws. Each test names the seed that first showed it. (The
 * listener's checked exception, the requests too large for memory and the huge class label are
 * in {@link FaultsTest} and {@link OutOfMemorySizedRequestsTest}; absurd steps on Lipschitz losses
 * in {@link DivergenceOnEveryLossAndRuleTest}.)
 */
class FoundByHostileInputTest {

    /** Seed −379137753786873860: λ ε<sub>0</sub> overflowed and ∞ · 0 gave a NaN step at t = 0. */
    @Test
    void inverseTimeWhoseLambdaTimesStepOverflowsGivesTheInitialStepAtZero() {
        StepSchedule s = StepSchedule.inverseTime(2.3213196888499406, Double.MAX_VALUE);
        assertEquals(2.3213196888499406, s.stepSize(0), 0.0);
        assertEquals(0.0, s.stepSize(1), 0.0); // ε0 / (1 + ∞) = 0: the exact value underflows
    }

    /** Seed −4570315876724764327: (max − min)(1 + cos)/2 + min overflowed near the largest double. */
    @Test
    void cosineRestartsNearTheLargestDoubleStayFiniteAndWithinTheirRange() {
        double min = 7.551052761987862E307;
        StepSchedule s = StepSchedule.cosineRestarts(Double.MAX_VALUE, min, 47, 2.4814647280756668);
        for (long t = 0; t < 500; t++) {
            double eps = s.stepSize(t);
            assertTrue(eps >= min && eps <= Double.MAX_VALUE, "t = " + t + ": " + eps);
        }
        assertEquals(Double.MAX_VALUE, s.stepSize(0), 0.0);
        // An ordinary range is unchanged by the reordering (halving is exact): the textbook formula.
        StepSchedule plain = StepSchedule.cosineRestarts(0.5, 0.01, 10, 1.0);
        for (long t = 0; t < 30; t++) {
            double expected = 0.01 + (0.5 - 0.01) * (1 + Math.cos(Math.PI * (t % 10) / 10.0)) * 0.5;
            assertEquals(expected, plain.stepSize(t), 0.0, "t = " + t);
        }
    }

    /**
     * Seeds 2400488760195359219 and −2827049467534282513: huge starting parameters on standardized
     * features overflowed on the standardized scale, and the fit ended in "coefficients[0] is
     * -Infinity" from the model it could not build. Now the mapping is refused, naming the parameter.
     */
    @Test
    void startingParametersThatOverflowOnTheStandardizedScaleAreRefusedNamingThem() {
        double[][] x = Cases.gaussianMatrix(Cases.rng(5), 20, 2);
        for (double[] row : x) {
            row[0] *= 1e150;
        }
        double[] y = new double[20];
        FitOptions options = FitOptions.builder().initialParameters(new double[] {2e299, 0, 0}).build();
        Minimizer m = Minimizer.builder().standardize(true).epochs(1).build();
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> m.fit(dev.riskmin.data.Dataset.of(x, y), options));
        assertTrue(e.getMessage().contains("h[0] (2.0E299)") && e.getMessage().contains("column 0"), e.getMessage());
    }

    /**
     * Seed −7972690036749289967: a listener's step-size factor carried a valid schedule past the
     * largest double, and the fit threw an IllegalStateException blaming the schedule. Now the fit
     * stops with DIVERGED, naming both figures; a factor that would overflow the current step is
     * refused to the listener.
     */
    @Test
    void stepSizeThatTheListenersFactorsCarryToInfinityStopsTheFitAsDiverged() {
        List<String> refusals = new ArrayList<>();
        FitListener booster = new FitListener() {
            @Override
            public void step(StepView view, FitControl control) {
                if (view.step() == 0) {
                    control.scaleStepSize(1e300);
                    control.scaleStepSize(1e8); // this step: 1 x 1e308 fits; the warm-up's next step, 2 x 1e308, will not
                    try {
                        control.scaleStepSize(10);
                    } catch (IllegalArgumentException e) {
                        refusals.add(e.getMessage());
                    }
                }
            }
        };
        StepSchedule warmUp = StepSchedule.warmUp(StepSchedule.constant(100), 100); // 1 at t = 0, 2 at t = 1
        double[][] x = Cases.gaussianMatrix(Cases.rng(6), 30, 2);
        // Zero targets: the squared loss's gradient is zero at h = 0, so h stays finite whatever the step.
        Fit fit = Minimizer.builder().schedule(warmUp).epochs(1).build()
                .fit(dev.riskmin.data.Dataset.of(x, new double[30]), FitOptions.listeners(booster));
        assertEquals(1, refusals.size(), refusals.toString());
        assertTrue(refusals.get(0).contains("step-size factor (10.0)"), refusals.get(0));
        assertEquals(StopReason.DIVERGED, fit.stopReason(), fit.toString());
        assertTrue(fit.stopDetail().contains("the step size overflowed at step"), fit.stopDetail());
        assertTrue(HostileOutcome.allFinite(fit.parameters()));
    }

    /**
     * Seed −3983906101979527869: finite parameters whose decision values overflow (∞ − ∞ in w·x)
     * ended a fit with a NaN objective and a budget reason. Now that is DIVERGED.
     */
    @Test
    void fitWhoseObjectiveIsNotFiniteAtTheReturnedParametersIsDiverged() {
        double[][] x = {{1, 1}, {Double.MAX_VALUE, -Double.MAX_VALUE}};
        double[] y = {1, 0};
        // One step on row 0 moves h to (2, 2) (squared loss, step 2); row 1 then has w·x = ∞ − ∞.
        Fit fit = Minimizer.builder().intercept(false).sampling(Sampling.sequential()).stepSize(2).maxSteps(1)
                .build().fit(x, y);
        assertEquals(StopReason.DIVERGED, fit.stopReason(), fit.toString());
        assertTrue(fit.stopDetail().startsWith("the objective at the returned parameters is NaN"), fit.stopDetail());
        assertTrue(fit.stopDetail().contains("STEP_BUDGET"), "the budget that ended the loop is kept in the detail");
        assertEquals(2.0, fit.parameters()[0], 0.0);
    }
}
