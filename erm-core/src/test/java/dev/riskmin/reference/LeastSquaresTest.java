package dev.riskmin.reference;

import dev.riskmin.data.Dataset;
import dev.riskmin.loss.Losses;
import dev.riskmin.objective.LinearObjective;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.testing.Cases;
import org.apache.commons.math3.stat.regression.OLSMultipleLinearRegression;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.ArrayList;
import java.util.List;
import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

class LeastSquaresTest {

    /** A well-conditioned problem: N(0,1) features shifted by column offsets, so the intercept matters. */
    private static double[][] features(RandomGenerator rng, int n, int d) {
        double[][] x = Cases.gaussianMatrix(rng, n, d);
        for (int j = 0; j < d; j++) {
            double offset = 5 * rng.nextGaussian();
            for (int i = 0; i < n; i++) {
                x[i][j] += offset;
            }
        }
        return x;
    }

    private static double[] weights(RandomGenerator rng, int n) {
        double[] w = new double[n];
        for (int i = 0; i < n; i++) {
            w[i] = 0.1 + 2 * rng.nextDouble();
        }
        return w;
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void ordinaryFitAgreesWithCommonsMathRegression(long seed) {
        RandomGenerator rng = Cases.rng(seed);
        int n = 500;
        int d = 20;
        double[][] x = features(rng, n, d);
        double[] y = Cases.linearTargets(rng, x, Cases.gaussianVector(rng, d, 1.0), 3.0, 0.5);

        LeastSquaresSolution fit = LeastSquares.withIntercept().solve(x, y);
        // Outside reference: commons-math3 3.6.1 OLSMultipleLinearRegression (QR of the design).
        OLSMultipleLinearRegression ols = new OLSMultipleLinearRegression();
        ols.newSampleData(y, x);
        double[] expected = ols.estimateRegressionParameters();       // (b, β)
        double[] expectedSe = ols.estimateRegressionParametersStandardErrors();
        double[] se = fit.coefficientStandardErrors();

        assertRelative(expected[0], fit.intercept(), 1e-10, "intercept");
        assertRelative(expectedSe[0], fit.interceptStandardError(), 1e-10, "se(intercept)");
        for (int j = 0; j < d; j++) {
            assertRelative(expected[j + 1], fit.coefficient(j), 1e-10, "beta[" + j + "]");
            assertRelative(expectedSe[j + 1], se[j], 1e-10, "se(beta[" + j + "])");
        }
        assertRelative(ols.calculateResidualSumOfSquares(), fit.residualSumOfSquares(), 1e-10, "RSS");
        assertRelative(ols.calculateRSquared(), fit.rSquared(), 1e-12, "R^2");
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void ridgeSolutionSatisfiesTheWeightedNormalEquations(long seed) {
        RandomGenerator rng = Cases.rng(seed);
        int n = 200;
        int d = 8;
        double[][] x = features(rng, n, d);
        double[] y = Cases.linearTargets(rng, x, Cases.gaussianVector(rng, d, 1.0), -1.0, 1.0);
        double[] w = weights(rng, n);
        double lambda = Math.pow(10, -3 + 3 * rng.nextDouble());
        boolean intercept = rng.nextBoolean();

        LeastSquaresSolution fit = (intercept ? LeastSquares.withIntercept() : LeastSquares.throughOrigin())
                .withRidge(lambda).solve(x, y, w);
        // METHODS §12 (Hoerl & Kennard 1970): Xᵀ W (y − Xβ − b) = W λ β, and Σ w r = 0 for the intercept.
        double total = 0;
        double[] r = new double[n];
        for (int i = 0; i < n; i++) {
            total += w[i];
            double z = fit.intercept();
            for (int j = 0; j < d; j++) {
                z += x[i][j] * fit.coefficient(j);
            }
            r[i] = y[i] - z;
        }
        for (int j = 0; j < d; j++) {
            double lhs = 0;
            double scale = 0;
            for (int i = 0; i < n; i++) {
                lhs += x[i][j] * w[i] * r[i];
                scale += Math.abs(x[i][j] * w[i] * y[i]);
            }
            double rhs = total * lambda * fit.coefficient(j);
            assertTrue(Math.abs(lhs - rhs) <= 1e-10 * scale,
                    "normal equation " + j + ": " + lhs + " vs " + rhs + " (scale " + scale + ")");
        }
        if (intercept) {
            double sum = 0;
            double scale = 0;
            for (int i = 0; i < n; i++) {
                sum += w[i] * r[i];
                scale += Math.abs(w[i] * y[i]);
            }
            assertTrue(Math.abs(sum) <= 1e-10 * scale, "sum of weighted residuals " + sum);
        }
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void integerWeightsEqualDuplicatedRows(long seed) {
        // Common practice, no source: a weight k is k copies of the row in (1/(2W)) Σ w r².
        RandomGenerator rng = Cases.rng(seed);
        int n = 40;
        int d = 4;
        double[][] x = features(rng, n, d);
        double[] y = Cases.linearTargets(rng, x, Cases.gaussianVector(rng, d, 1.0), 0.5, 1.0);
        double[] w = new double[n];
        List<double[]> rows = new ArrayList<>();
        List<Double> targets = new ArrayList<>();
        for (int i = 0; i < n; i++) {
            w[i] = rng.nextInt(4);
            for (int k = 0; k < w[i]; k++) {
                rows.add(x[i]);
                targets.add(y[i]);
            }
        }
        double[][] xd = rows.toArray(new double[0][]);
        double[] yd = targets.stream().mapToDouble(Double::doubleValue).toArray();
        boolean intercept = rng.nextBoolean();
        double lambda = rng.nextBoolean() ? 0.0 : 0.3 * rng.nextDouble();
        LeastSquares solver = (intercept ? LeastSquares.withIntercept() : LeastSquares.throughOrigin()).withRidge(lambda);

        LeastSquaresSolution weighted = solver.solve(x, y, w);
        LeastSquaresSolution duplicated = solver.solve(xd, yd);
        for (int j = 0; j < d; j++) {
            assertRelative(duplicated.coefficient(j), weighted.coefficient(j), 1e-10, "beta[" + j + "]");
        }
        assertRelative(duplicated.intercept(), weighted.intercept(), 1e-10, "intercept");
        assertRelative(duplicated.residualSumOfSquares(), weighted.residualSumOfSquares(), 1e-10, "RSS");
        assertRelative(duplicated.objectiveValue(), weighted.objectiveValue(), 1e-10, "objective");
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void solutionIsTheStationaryPointOfTheLinearObjective(long seed) {
        // The identity (1/n) Σ ω_i r_i²/2 = (1/(2W)) Σ w_i r_i² with ω_i = n w_i/W (derived): the same λ is
        // the same problem, so LinearObjective's gradient vanishes at the QR solution.
        RandomGenerator rng = Cases.rng(seed);
        int n = 100;
        int d = 6;
        double[][] x = features(rng, n, d);
        double[] y = Cases.linearTargets(rng, x, Cases.gaussianVector(rng, d, 1.0), 2.0, 1.0);
        boolean weighted = rng.nextBoolean();
        boolean intercept = rng.nextBoolean();
        double lambda = rng.nextBoolean() ? 0.0 : Math.pow(10, -3 + 3 * rng.nextDouble());
        Dataset.Builder builder = Dataset.builder().features(x).targets(y);
        if (weighted) {
            builder.weights(weights(rng, n));
        }
        Dataset data = builder.build();

        LeastSquaresSolution fit = (intercept ? LeastSquares.withIntercept() : LeastSquares.throughOrigin())
                .withRidge(lambda).solve(data);
        LinearObjective objective = LinearObjective.of(data, Losses.squared(), Penalty.l2(lambda), intercept);
        double[] h = fit.parameters();
        double[] g = new double[objective.dimension()];
        double value = objective.gradient(h, g);

        double gradientScale = 0;
        for (int i = 0; i < n; i++) {
            gradientScale += data.normalizedWeight(i) * Math.abs(y[i]) * Math.sqrt(1 + data.features().rowSquaredNorm(i)) / n;
        }
        double norm = 0;
        for (double v : g) {
            norm += v * v;
        }
        norm = Math.sqrt(norm);
        assertTrue(norm <= 1e-12 * gradientScale, "LinearObjective gradient norm " + norm + " at the QR solution");
        assertTrue(fit.gradientNorm() <= 1e-12 * gradientScale, "reported gradient norm " + fit.gradientNorm());
        assertRelative(value, fit.objectiveValue(), 1e-12, "objective value");
    }

    @Test
    void rankDeficientDesignIsRefusedNamingTheColumn() {
        double[][] x = {{1, 2, 3}, {2, 4, 1}, {3, 6, 0}, {4, 8, 2}, {5, 10, 7}};
        double[] y = {1, 2, 3, 4, 6};
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> LeastSquares.throughOrigin().solve(x, y));
        assertTrue(e.getMessage().contains("column 1"), e.getMessage());
        double[][] constant = {{1, 7}, {2, 7}, {3, 7}, {4, 7}};
        e = assertThrows(IllegalArgumentException.class,
                () -> LeastSquares.withIntercept().solve(constant, new double[]{1, 2, 3, 5}));
        assertTrue(e.getMessage().contains("column 1") && e.getMessage().contains("constant"), e.getMessage());
        // A ridge penalty makes the same problem well posed.
        assertTrue(Double.isFinite(LeastSquares.throughOrigin().withRidge(0.1).solve(x, y).coefficient(1)));
    }

    @Test
    void ridgeFitHasNoClassicalCovariance() {
        double[][] x = {{1}, {2}, {3}, {4}};
        LeastSquaresSolution fit = LeastSquares.withIntercept().withRidge(0.5).solve(x, new double[]{1, 3, 2, 5});
        IllegalStateException e = assertThrows(IllegalStateException.class, fit::coefficientStandardErrors);
        assertTrue(e.getMessage().contains("ridge"), e.getMessage());
        assertThrows(IllegalArgumentException.class, () -> LeastSquares.withIntercept().withRidge(-1));
    }

    @Test
    void exactLineThroughTwoPointsHasNoStandardErrors() {
        LeastSquaresSolution fit = LeastSquares.withIntercept().solve(new double[][]{{0}, {2}}, new double[]{1, 5});
        assertEquals(2.0, fit.coefficient(0), 1e-15);
        assertEquals(1.0, fit.intercept(), 1e-15);
        assertEquals(0, fit.residualDegreesOfFreedom());
        assertTrue(Double.isNaN(fit.residualStandardDeviation()));
        assertThrows(IllegalStateException.class, fit::covariance);
    }

    static void assertRelative(double expected, double actual, double tolerance, String what) {
        double error = Cases.relativeError(expected, actual);
        assertTrue(error <= tolerance, what + ": expected " + expected + ", got " + actual + " (relative error "
                + error + " > " + tolerance + ")");
    }
}
