package dev.riskmin.method;

import dev.riskmin.Fit;
import dev.riskmin.Minimizer;
import dev.riskmin.data.Dataset;
import dev.riskmin.step.StepSchedule;
import dev.riskmin.testing.Cases;
import dev.riskmin.testing.ReferenceData;
import org.junit.jupiter.api.Test;

import java.util.Map;

import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * NIST StRD Norris (certified values in reference/nist_norris.certified.txt): with standardized
 * features, the stochastic rules recover the certified least-squares coefficients B0 and B1 to at
 * least 6 significant digits.
 */
class NorrisRecoveryTest {
    private static final ReferenceData DATA = ReferenceData.csv("nist_norris");
    private static final Map<String, String> CERTIFIED = ReferenceData.certified("nist_norris");

    private static double digits(Fit fit) {
        double b0 = Double.parseDouble(CERTIFIED.get("B0.estimate"));
        double b1 = Double.parseDouble(CERTIFIED.get("B1.estimate"));
        return Math.min(Cases.digits(fit.model().intercept(), b0), Cases.digits(fit.model().coefficient(0), b1));
    }

    private static Dataset norris() {
        return Dataset.of(DATA.matrix("x"), DATA.columnValues("y"));
    }

    private static void check(String name, Minimizer minimizer) {
        Fit fit = minimizer.fit(norris());
        double digits = digits(fit);
        System.out.printf("Norris, %s: %.1f significant digits of B0 and B1 (B0 = %.15g, B1 = %.15g) in %d steps%n",
                name, digits, fit.model().intercept(), fit.model().coefficient(0), fit.steps());
        assertTrue(digits >= 6, name + ": " + digits + " digits");
    }

    @Test
    void svrgRecoversTheCertifiedCoefficients() {
        check("SVRG", Minimizer.builder().updateRule(UpdateRule.svrg()).standardize(true).epochs(400).build());
    }

    @Test
    void sagaRecoversTheCertifiedCoefficients() {
        check("SAGA", Minimizer.builder().updateRule(UpdateRule.saga()).standardize(true).epochs(400).build());
    }

    @Test
    void averagedSgdRecoversTheCertifiedCoefficients() {
        // Sampling without replacement, steps decaying as 1/t and the average of the last half: on a
        // finite sum, reshuffled SGD's iterates cycle around the optimum and the tail average removes
        // most of the cycle (Polyak & Juditsky 1992; Rakhlin, Shamir & Sridharan 2012).
        check("averaged SGD", Minimizer.builder().schedule(StepSchedule.inverseTime(0.2, 0.05))
                .averaging(Averaging.tail(0.5)).standardize(true).epochs(20_000).build());
    }
}
