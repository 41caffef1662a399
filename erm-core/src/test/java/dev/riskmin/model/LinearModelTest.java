package dev.riskmin.model;

import dev.riskmin.loss.Response;
import dev.riskmin.testing.Cases;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.function.Executable;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import java.util.concurrent.TimeUnit;
import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

class LinearModelTest {

    // w = (1.5, −2, 0.25), b = 0.5; at x = (2, 1, 4): z = 3 − 2 + 1 + 0.5 = 2.5 (all exact in binary)
    private static final double[] W = {1.5, -2, 0.25};
    private static final double[] X = {2, 1, 4};

    private static LinearModel model(Response response, String loss) {
        return LinearModel.of(W, 0.5, response, loss);
    }

    private static void assertMessage(Throwable e, String... fragments) {
        for (String f : fragments) {
            assertTrue(e.getMessage().contains(f), () -> "message \"" + e.getMessage() + "\" should contain \"" + f + "\"");
        }
    }

    private static void assertRejected(Executable e, String... fragments) {
        assertMessage(assertThrows(IllegalArgumentException.class, e), fragments);
    }

    @Test
    void decisionValueIsTheHandComputedSum() {
        assertEquals(2.5, model(Response.IDENTITY, "squared").decisionValue(X));
        assertEquals(0.5 - 1.5 * 3 + 2 * 0.5, model(Response.IDENTITY, "squared").decisionValue(new double[]{-3, -0.5, 0}));
    }

    @Test
    void identityResponsePredictsTheDecisionValue() {
        assertEquals(2.5, model(Response.IDENTITY, "squared").predict(X));
    }

    @Test
    void exponentialResponsePredictsTheMean() {
        assertEquals(Math.exp(2.5), model(Response.EXPONENTIAL, "Poisson").predict(X));
    }

    @Test
    void logisticResponsePredictsTheClassBySign() {
        LinearModel m = model(Response.LOGISTIC, "logistic");
        assertEquals(1.0, m.predict(X));
        assertEquals(0.0, m.predict(new double[]{-2, 0, 0})); // z = −2.5
        assertEquals(0.0, LinearModel.of(new double[]{1}, 0, Response.LOGISTIC, "logistic").predict(new double[]{0}),
                "z = 0 predicts class 0");
    }

    @Test
    void marginResponsePredictsTheClassBySign() {
        LinearModel m = model(Response.MARGIN, "hinge");
        assertEquals(1.0, m.predict(X));
        assertEquals(0.0, m.predict(new double[]{-2, 0, 0}));
    }

    /**
     * P(y = 1) = σ(z) = 1/(1 + e<sup>−z</sup>), elementary. At z = ±800 the naive formula meets e<sup>800</sup>
     * = +∞, which still gives the right limits 1 and 0 here; the model must not give NaN.
     */
    @ParameterizedTest(name = "z={0}")
    @ValueSource(doubles = {-800, -700, -40, -1, -1e-9, 0, 1e-9, 1, 40, 700, 800})
    void probabilityIsTheLogisticFunctionOfTheDecisionValue(double z) {
        LinearModel m = LinearModel.of(new double[]{0, 0}, z, Response.LOGISTIC, "logistic");
        double p = m.probability(new double[]{1, 1});
        double expected = 1.0 / (1.0 + Math.exp(-z)); // elementary
        assertFalse(Double.isNaN(p));
        assertTrue(p >= 0 && p <= 1, "p = " + p);
        assertEquals(expected, p, 1e-15 * expected, "sigma(" + z + ")");
        assertTrue(m.hasProbability());
    }

    @Test
    void probabilityAtPlusMinus800IsExactlyOneAndZero() {
        assertEquals(1.0, LinearModel.of(new double[]{1}, 0, Response.LOGISTIC, "logistic").probability(new double[]{800}));
        assertEquals(0.0, LinearModel.of(new double[]{1}, 0, Response.LOGISTIC, "logistic").probability(new double[]{-800}));
    }

    @Test
    void hingeModelRefusesProbabilityNamingTheLoss() {
        LinearModel m = model(Response.MARGIN, "smoothed hinge");
        assertFalse(m.hasProbability());
        assertMessage(assertThrows(IllegalStateException.class, () -> m.probability(X)), "smoothed hinge");
    }

    @Test
    void regressionModelRefusesProbabilityNamingTheLoss() {
        LinearModel m = model(Response.IDENTITY, "squared");
        assertMessage(assertThrows(IllegalStateException.class, () -> m.probability(X)), "squared");
    }

    @ParameterizedTest(name = "value={0}")
    @ValueSource(doubles = {Double.NaN, Double.POSITIVE_INFINITY, Double.NEGATIVE_INFINITY})
    void nonFiniteCoefficientIsRejectedNamingTheIndex(double bad) {
        assertRejected(() -> LinearModel.of(new double[]{1, 2, bad}, 0, Response.IDENTITY, "squared"),
                "coefficients[2]", String.valueOf(bad));
    }

    @ParameterizedTest(name = "value={0}")
    @ValueSource(doubles = {Double.NaN, Double.POSITIVE_INFINITY, Double.NEGATIVE_INFINITY})
    void nonFiniteInterceptIsRejectedNamingIt(double bad) {
        assertRejected(() -> LinearModel.of(new double[]{1}, bad, Response.IDENTITY, "squared"), "intercept",
                String.valueOf(bad));
    }

    @Test
    void multiclassResponseIsRejectedNamingIt() {
        assertRejected(() -> LinearModel.of(W, 0, Response.SOFTMAX, "softmax"), "SOFTMAX");
        assertRejected(() -> LinearModel.of(W, 0, Response.ARGMAX, "multiclass hinge"), "ARGMAX");
    }

    @Test
    void wrongFeatureCountIsRejectedNamingBothSizes() {
        LinearModel m = model(Response.LOGISTIC, "logistic");
        double[] x = {1, 2};
        assertRejected(() -> m.decisionValue(x), "x has 2", "model has 3");
        assertRejected(() -> m.predict(x), "x has 2", "model has 3");
        assertRejected(() -> m.probability(new double[]{1, 2, 3, 4}), "x has 4", "model has 3");
    }

    @Test
    void changingTheArrayPassedInDoesNotChangeTheModel() {
        double[] w = W.clone();
        LinearModel m = LinearModel.of(w, 0.5, Response.IDENTITY, "squared");
        w[0] = 100;
        assertEquals(2.5, m.decisionValue(X));
        assertEquals(1.5, m.coefficient(0));
    }

    @Test
    void changingTheArrayReturnedDoesNotChangeTheModel() {
        LinearModel m = model(Response.IDENTITY, "squared");
        double[] w = m.coefficients();
        w[1] = 100;
        assertArrayEquals(W, m.coefficients());
        assertEquals(2.5, m.decisionValue(X));
    }

    @Test
    void accessorsReportWhatWasGiven() {
        LinearModel m = model(Response.EXPONENTIAL, "Poisson");
        assertEquals(3, m.dimension());
        assertEquals(0.5, m.intercept());
        assertEquals(Response.EXPONENTIAL, m.response());
        assertEquals("Poisson", m.lossName());
    }

    /** Eight threads predicting on one shared model give bit-identical answers to a sequential pass. */
    @Test
    void concurrentPredictionMatchesSequential() throws Exception {
        RandomGenerator rng = Cases.rng(808L);
        int d = 20;
        int n = 2_000;
        LinearModel m = LinearModel.of(Cases.gaussianVector(rng, d, 1.0), 0.3, Response.LOGISTIC, "logistic");
        double[][] x = Cases.gaussianMatrix(rng, n, d);
        double[] expected = new double[2 * n];
        for (int i = 0; i < n; i++) {
            expected[2 * i] = m.decisionValue(x[i]);
            expected[2 * i + 1] = m.probability(x[i]);
        }
        ExecutorService pool = Executors.newFixedThreadPool(8);
        try {
            List<Future<double[]>> results = new ArrayList<>();
            for (int t = 0; t < 8; t++) {
                final int shift = t * 250; // each thread starts elsewhere so calls really interleave
                results.add(pool.submit(() -> {
                    double[] out = new double[2 * n];
                    for (int r = 0; r < n; r++) {
                        int i = (r + shift) % n;
                        out[2 * i] = m.decisionValue(x[i]);
                        out[2 * i + 1] = m.probability(x[i]);
                    }
                    return out;
                }));
            }
            for (Future<double[]> f : results) {
                assertArrayEquals(expected, f.get(10, TimeUnit.SECONDS));
            }
        } finally {
            pool.shutdownNow();
        }
    }
}
