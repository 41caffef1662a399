package dev.riskmin;

import dev.riskmin.loss.Losses;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.testing.LeastSquaresProblem;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.List;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** An absurd step size stops every update rule with DIVERGED and finite parameters, never NaN weights. */
class DivergenceGuardTest {
    private static final LeastSquaresProblem PROBLEM = LeastSquaresProblem.gaussian(11, 300, 4, 0.5);

    static List<UpdateRule> rules() {
        return List.of(UpdateRule.sgd(), UpdateRule.heavyBall(0.9), UpdateRule.nesterov(0.9), UpdateRule.svrg(),
                UpdateRule.saga());
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("rules")
    void absurdStepDivergesWithFiniteParameters(UpdateRule rule) {
        Fit fit = Minimizer.builder().updateRule(rule).stepSize(1e6).epochs(50).build().fit(PROBLEM.data);
        assertEquals(StopReason.DIVERGED, fit.stopReason(), fit.toString());
        assertTrue(FitBudgetsTest.allFinite(fit.parameters()), fit.toString());
        assertTrue(FitBudgetsTest.allFinite(fit.lastIterate()));
        assertTrue(fit.model().intercept() == fit.parameters()[4]);
        assertTrue(fit.stopDetail().length() > 10, fit.stopDetail());
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("rules")
    void logisticLossDivergesOnlyThroughExplosionAndStaysFinite(UpdateRule rule) {
        double[] labels = new double[PROBLEM.y.length];
        for (int i = 0; i < labels.length; i++) {
            labels[i] = PROBLEM.y[i] > 0.5 ? 1 : 0;
        }
        Fit fit = Minimizer.builder().loss(Losses.logistic()).updateRule(rule).stepSize(1e200).epochs(5).build()
                .fit(PROBLEM.x, labels);
        assertTrue(FitBudgetsTest.allFinite(fit.parameters()), fit.toString());
    }
}
