package dev.riskmin.reference;

import dev.riskmin.testing.Cases;
import dev.riskmin.testing.ReferenceData;
import org.junit.jupiter.api.Test;

import java.util.Map;

import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The QR least-squares solver against the certified values of the NIST Statistical Reference
 * Datasets for linear least squares (NIST/ITL StRD: Norris, lower difficulty; Longley, higher
 * difficulty), read from the test resources {@code reference/nist_*}.
 */
class LeastSquaresNistTest {

    @Test
    void norrisReproducesEveryCertifiedValueToNineDigits() {
        // Source: NIST StRD, data set Norris (certified values to 15 digits).
        ReferenceData data = ReferenceData.csv("nist_norris");
        Map<String, String> certified = ReferenceData.certified("nist_norris");
        LeastSquaresSolution fit = LeastSquares.withIntercept().solve(data.matrix("x"), data.columnValues("y"));

        double[] se = fit.coefficientStandardErrors();
        double digits = Math.min(Math.min(
                Math.min(digits(fit.intercept(), certified, "B0.estimate"), digits(fit.coefficient(0), certified, "B1.estimate")),
                Math.min(digits(fit.interceptStandardError(), certified, "B0.sd"), digits(se[0], certified, "B1.sd"))),
                Math.min(Math.min(digits(fit.residualStandardDeviation(), certified, "residual_sd"),
                        digits(fit.rSquared(), certified, "r_squared")),
                        digits(fit.residualSumOfSquares(), certified, "anova.residual.ss")));
        System.out.printf("NIST Norris: min %.1f significant digits over 7 certified values%n", digits);
        assertTrue(digits >= 9, "Norris: only " + digits + " digits");
    }

    @Test
    void longleyReproducesEveryCertifiedValueToSevenDigits() {
        // Source: NIST StRD, data set Longley (Longley 1967; certified values to 15 digits).
        ReferenceData data = ReferenceData.csv("nist_longley");
        Map<String, String> certified = ReferenceData.certified("nist_longley");
        LeastSquaresSolution fit = LeastSquares.withIntercept()
                .solve(data.matrix("x1", "x2", "x3", "x4", "x5", "x6"), data.columnValues("y"));

        double[] se = fit.coefficientStandardErrors();
        double digits = Math.min(digits(fit.intercept(), certified, "B0.estimate"),
                digits(fit.interceptStandardError(), certified, "B0.sd"));
        for (int j = 0; j < 6; j++) {
            digits = Math.min(digits, digits(fit.coefficient(j), certified, "B" + (j + 1) + ".estimate"));
            digits = Math.min(digits, digits(se[j], certified, "B" + (j + 1) + ".sd"));
        }
        digits = Math.min(digits, digits(fit.residualStandardDeviation(), certified, "residual_sd"));
        digits = Math.min(digits, digits(fit.rSquared(), certified, "r_squared"));
        digits = Math.min(digits, digits(fit.residualSumOfSquares(), certified, "anova.residual.ss"));
        System.out.printf("NIST Longley: min %.1f significant digits over 17 certified values%n", digits);
        assertTrue(digits >= 7, "Longley: only " + digits + " digits");
    }

    private static double digits(double actual, Map<String, String> certified, String key) {
        String value = certified.get(key);
        if (value == null) {
            throw new IllegalStateException("certified file has no " + key);
        }
        return Cases.digits(actual, Double.parseDouble(value));
    }
}
