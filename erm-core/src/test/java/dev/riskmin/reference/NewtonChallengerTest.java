package dev.riskmin.reference;

import dev.riskmin.data.Dataset;
import dev.riskmin.loss.LogisticLoss;
import dev.riskmin.testing.Cases;
import dev.riskmin.testing.ReferenceData;
import org.junit.jupiter.api.Test;

import java.math.BigDecimal;
import java.math.RoundingMode;
import java.util.Map;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Logistic regression by Newton's method on the space-shuttle O-ring data (Dalal, Fowlkes &amp;
 * Hoadley, "Risk analysis of the space shuttle", JASA 84(408), 1989, Table 1), against the published
 * estimates and the 50-digit maximum-likelihood values in {@code reference/challenger_oring.certified.txt}.
 */
class NewtonChallengerTest {
    private static final String FILE = "challenger_oring";
    private static final double RELATIVE = 1e-8;

    private final ReferenceData data = ReferenceData.csv(FILE);
    private final Map<String, String> certified = ReferenceData.certified(FILE);

    /** Binomial fit: proportion k/m of distressed O-rings with weight m = orings at risk. */
    private NewtonSolution binomialFit(String... regressors) {
        double[] k = data.columnValues("orings_thermal_distress");
        double[] m = data.columnValues("orings_at_risk");
        double[] proportion = new double[k.length];
        for (int i = 0; i < k.length; i++) {
            proportion[i] = k[i] / m[i];
        }
        Dataset set = Dataset.builder().features(data.matrix(regressors)).targets(proportion).weights(m).build();
        return NewtonSolver.logistic().solve(set);
    }

    /** Binomial deviance 2 Σ [k log(k/(m p)) + (m − k) log((m − k)/(m (1 − p)))], 0 log 0 = 0 (McCullagh & Nelder 1989, §4.4.3, from memory). */
    private static double deviance(double[] k, double[] m, double[] p) {
        double sum = 0;
        for (int i = 0; i < k.length; i++) {
            if (k[i] > 0) {
                sum += k[i] * Math.log(k[i] / (m[i] * p[i]));
            }
            if (m[i] - k[i] > 0) {
                sum += (m[i] - k[i]) * Math.log((m[i] - k[i]) / (m[i] * (1 - p[i])));
            }
        }
        return 2 * sum;
    }

    /** Σ [log C(m, k) + k log p + (m − k) log(1 − p)]. */
    private static double logLikelihood(double[] k, double[] m, double[] p) {
        double sum = 0;
        for (int i = 0; i < k.length; i++) {
            double logChoose = 0;
            for (int t = 1; t <= (int) k[i]; t++) {
                logChoose += Math.log((m[i] - k[i] + t) / t);
            }
            sum += logChoose + k[i] * Math.log(p[i]) + (m[i] - k[i]) * Math.log1p(-p[i]);
        }
        return sum;
    }

    /** Fitted probabilities σ(α + Σ β_j x_j) at the solution, rows from the named columns. */
    private double[] fitted(NewtonSolution fit, String... regressors) {
        double[][] x = data.matrix(regressors);
        double[] p = new double[x.length];
        for (int i = 0; i < x.length; i++) {
            double z = fit.intercept(0);
            for (int j = 0; j < regressors.length; j++) {
                z += fit.coefficient(0, j) * x[i][j];
            }
            p[i] = LogisticLoss.sigmoid(z);
        }
        return p;
    }

    /** Deviance of the intercept-only model, fitted as a no-intercept model on a constant column. */
    private double nullDeviance(double[] k, double[] m, double[] proportion, boolean weighted) {
        double[][] ones = new double[k.length][1];
        for (double[] row : ones) {
            row[0] = 1.0;
        }
        Dataset.Builder b = Dataset.builder().features(ones).targets(proportion);
        if (weighted) {
            b.weights(m);
        }
        NewtonSolution fit = NewtonSolver.logistic().withIntercept(false).solve(b.build());
        double[] p = new double[k.length];
        java.util.Arrays.fill(p, LogisticLoss.sigmoid(fit.coefficient(0, 0)));
        return deviance(k, m, p);
    }

    private double check(String key, double actual) {
        double expected = Double.parseDouble(certified.get(key));
        double error = Cases.relativeError(expected, actual);
        assertTrue(error <= RELATIVE, key + ": expected " + expected + ", got " + actual + " (relative error " + error + ")");
        return Cases.digits(actual, expected);
    }

    private void checkPublished(String key, double actual) {
        // Every printed digit: our value rounded to the printed decimals equals the printed value.
        BigDecimal published = new BigDecimal(certified.get(key));
        BigDecimal rounded = new BigDecimal(actual).setScale(published.scale(), RoundingMode.HALF_UP);
        assertEquals(0, rounded.compareTo(published), key + ": published " + published + ", ours " + actual);
    }

    @Test
    void binomialTemperatureFitReproducesPublishedAndComputedValues() {
        NewtonSolution fit = binomialFit("temperature_f");
        double alpha = fit.intercept(0);
        double beta = fit.coefficient(0, 0);
        double[][] cov = fit.covariance();   // layout (beta, alpha)
        double[] k = data.columnValues("orings_thermal_distress");
        double[] m = data.columnValues("orings_at_risk");
        double[] p = fitted(fit, "temperature_f");
        double deviance = deviance(k, m, p);
        double[] proportion = new double[k.length];
        for (int i = 0; i < k.length; i++) {
            proportion[i] = k[i] / m[i];
        }

        // Source: Dalal, Fowlkes & Hoadley 1989, as printed (quoted second-hand, see the resource header).
        checkPublished("published.binomial_temp.alpha", alpha);
        checkPublished("published.binomial_temp.beta_temp", beta);
        checkPublished("published.binomial_temp.se_alpha", Math.sqrt(cov[1][1]));
        checkPublished("published.binomial_temp.se_beta_temp", Math.sqrt(cov[0][0]));
        checkPublished("published.binomial_temp.deviance", deviance);

        // Source: the resource's 50-digit maximum-likelihood values (computed, not published).
        double digits = Math.min(check("computed.binomial_temp.alpha", alpha), check("computed.binomial_temp.beta_temp", beta));
        digits = Math.min(digits, check("computed.binomial_temp.se_alpha", fit.standardErrors()[1]));
        digits = Math.min(digits, check("computed.binomial_temp.se_beta_temp", fit.standardErrors()[0]));
        digits = Math.min(digits, check("computed.binomial_temp.cov_alpha_alpha", cov[1][1]));
        digits = Math.min(digits, check("computed.binomial_temp.cov_alpha_beta_temp", cov[0][1]));
        digits = Math.min(digits, check("computed.binomial_temp.cov_beta_temp_beta_temp", cov[0][0]));
        digits = Math.min(digits, check("computed.binomial_temp.deviance", deviance));
        digits = Math.min(digits, check("computed.binomial_temp.null_deviance", nullDeviance(k, m, proportion, true)));
        digits = Math.min(digits, check("computed.binomial_temp.loglik", logLikelihood(k, m, p)));
        digits = Math.min(digits, check("computed.binomial_temp.p_distress_at_31F", LogisticLoss.sigmoid(alpha + 31 * beta)));
        System.out.printf("Challenger O-ring binomial (temperature): min %.1f digits over 11 computed values, "
                + "all 5 published values reproduced, %d Newton iterations%n", digits, fit.iterations());
    }

    @Test
    void binaryTemperatureFitReproducesComputedValues() {
        double[] y = data.columnValues("any_thermal_distress");
        Dataset set = Dataset.builder().features(data.matrix("temperature_f")).targets(y).build();
        NewtonSolution fit = NewtonSolver.logistic().solve(set);
        double[][] cov = fit.covariance();
        double[] ones = new double[y.length];
        java.util.Arrays.fill(ones, 1.0);
        double[] p = fitted(fit, "temperature_f");

        // Source: the resource's 50-digit maximum-likelihood values (computed, not published).
        double digits = Math.min(check("computed.binary_temp.alpha", fit.intercept(0)),
                check("computed.binary_temp.beta_temp", fit.coefficient(0, 0)));
        digits = Math.min(digits, check("computed.binary_temp.se_alpha", fit.standardErrors()[1]));
        digits = Math.min(digits, check("computed.binary_temp.se_beta_temp", fit.standardErrors()[0]));
        digits = Math.min(digits, check("computed.binary_temp.cov_alpha_alpha", cov[1][1]));
        digits = Math.min(digits, check("computed.binary_temp.cov_alpha_beta_temp", cov[1][0]));
        digits = Math.min(digits, check("computed.binary_temp.cov_beta_temp_beta_temp", cov[0][0]));
        digits = Math.min(digits, check("computed.binary_temp.deviance", deviance(y, ones, p)));
        digits = Math.min(digits, check("computed.binary_temp.null_deviance", nullDeviance(y, ones, y, false)));
        digits = Math.min(digits, check("computed.binary_temp.loglik", logLikelihood(y, ones, p)));
        System.out.printf("Challenger O-ring binary (temperature): min %.1f digits over 10 computed values, "
                + "%d Newton iterations%n", digits, fit.iterations());
    }

    @Test
    void binomialTemperatureAndPressureFitReproducesComputedValues() {
        // The resource marks this block as computed on the data as given, not certified: a consistency check.
        NewtonSolution fit = binomialFit("temperature_f", "leak_check_pressure_psi");
        double[][] cov = fit.covariance();   // layout (beta_temp, gamma_pressure, alpha)
        double[] se = fit.standardErrors();
        double[] k = data.columnValues("orings_thermal_distress");
        double[] m = data.columnValues("orings_at_risk");
        check("computed.binomial_temp_pressure.alpha", fit.intercept(0));
        check("computed.binomial_temp_pressure.beta_temp", fit.coefficient(0, 0));
        check("computed.binomial_temp_pressure.gamma_pressure", fit.coefficient(0, 1));
        check("computed.binomial_temp_pressure.se_alpha", se[2]);
        check("computed.binomial_temp_pressure.se_beta_temp", se[0]);
        check("computed.binomial_temp_pressure.se_gamma_pressure", se[1]);
        check("computed.binomial_temp_pressure.cov_alpha_alpha", cov[2][2]);
        check("computed.binomial_temp_pressure.cov_alpha_beta_temp", cov[2][0]);
        check("computed.binomial_temp_pressure.cov_alpha_gamma_pressure", cov[2][1]);
        check("computed.binomial_temp_pressure.cov_beta_temp_beta_temp", cov[0][0]);
        check("computed.binomial_temp_pressure.cov_beta_temp_gamma_pressure", cov[0][1]);
        check("computed.binomial_temp_pressure.cov_gamma_pressure_gamma_pressure", cov[1][1]);
        check("computed.binomial_temp_pressure.deviance", deviance(k, m, fitted(fit, "temperature_f", "leak_check_pressure_psi")));
    }
}
