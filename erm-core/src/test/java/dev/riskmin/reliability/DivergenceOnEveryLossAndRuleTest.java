package dev.riskmin.reliability;

import dev.riskmin.Fit;
import dev.riskmin.StopReason;
import dev.riskmin.method.UpdateRule;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.Arguments;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.ArrayList;
import java.util.List;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * An absurd step size — 10<sup>3</sup>, 10<sup>6</sup> and 10<sup>300</sup>, against safe steps of about
 * 0.1 to 1 on these data (|x<sub>ij</sub>| ~ 1, losses ~ 1) — stops every loss under every update rule
 * with {@link StopReason#DIVERGED}, a detail that names the step, and finite parameters (the last
 * finite ones: no averaging here, so they are the last iterate). The Lipschitz losses (absolute,
 * pinball, ε-insensitive, hinge, logistic) never blow up; they are caught by the end-of-fit check
 * of the fit loop. The squared loss under five rules at 10<sup>6</sup> is also in
 * {@code DivergenceGuardTest}.
 */
class DivergenceOnEveryLossAndRuleTest {

    static List<Arguments> grid() {
        List<Arguments> out = new ArrayList<>();
        for (double step : new double[] {1e3, 1e6, 1e300}) {
            for (EveryLoss.Case c : EveryLoss.cases(3)) {
                for (UpdateRule rule : EveryLoss.rules()) {
                    out.add(Arguments.of(c, rule, step));
                }
            }
        }
        return out;
    }

    @ParameterizedTest(name = "{0}, {1}, step {2}")
    @MethodSource("grid")
    void absurdStepStopsWithDivergedAndFiniteParameters(EveryLoss.Case c, UpdateRule rule, double step) {
        Fit fit = c.builder().updateRule(rule).stepSize(step).epochs(20).seed(1).build().fit(c.data());
        assertEquals(StopReason.DIVERGED, fit.stopReason(), fit.toString());
        assertTrue(fit.stopDetail().contains("step"), fit.stopDetail());
        assertTrue(HostileOutcome.allFinite(fit.parameters()), fit.toString());
        assertArrayEquals(fit.lastIterate(), fit.parameters(), 0.0);
        double[] zeros = new double[c.data().dimension()];
        if (fit.hasModel()) {
            assertTrue(Double.isFinite(fit.model().decisionValue(zeros)));
        } else {
            int k = fit.multiclassModel().predictClass(zeros);
            assertTrue(k >= 0 && k < 3, "class " + k);
        }
    }
}
