package dev.riskmin.model;

import dev.riskmin.loss.Response;
import dev.riskmin.testing.Cases;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.function.Executable;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;
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

class MulticlassModelTest {

    // K = 3, d = 2: w_0 = (1, 2), w_1 = (−1, 0.5), w_2 = (0, −3); b = (0.25, 1, −0.5).
    // At x = (2, −1): z = (2 − 2 + 0.25, −2 − 0.5 + 1, 0 + 3 − 0.5) = (0.25, −1.5, 2.5), exact in binary.
    private static final double[] W = {1, 2, -1, 0.5, 0, -3};
    private static final double[] B = {0.25, 1, -0.5};
    private static final double[] X = {2, -1};

    private static MulticlassModel model(Response response, String loss) {
        return MulticlassModel.of(W, B, 2, response, loss);
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
    void decisionValuesAreTheHandComputedSums() {
        double[] z = new double[3];
        model(Response.SOFTMAX, "softmax").decisionValues(X, z);
        assertArrayEquals(new double[]{0.25, -1.5, 2.5}, z);
    }

    @Test
    void decisionValuesMayBeWrittenIntoALongerArray() {
        double[] z = {9, 9, 9, 9};
        model(Response.ARGMAX, "multiclass hinge").decisionValues(X, z);
        assertArrayEquals(new double[]{0.25, -1.5, 2.5, 9}, z);
    }

    @Test
    void softmaxResponsePredictsTheArgMax() {
        assertEquals(2, model(Response.SOFTMAX, "softmax").predictClass(X));
        assertEquals(0, model(Response.SOFTMAX, "softmax").predictClass(new double[]{0, 0.5})); // z = (1.25, 1.25, −2)
    }

    @Test
    void argMaxResponsePredictsTheArgMaxWithTheLowestClassOnTies() {
        MulticlassModel m = model(Response.ARGMAX, "multiclass hinge");
        assertEquals(2, m.predictClass(X));
        assertEquals(0, m.predictClass(new double[]{0, 0.5}), "tie between classes 0 and 1");
        assertEquals(1, m.predictClass(new double[]{-1, 0})); // z = (−0.75, 2, −0.5)
    }

    /** Softmax by hand: e^{z_k} / Σ e^{z_m} at the moderate z = (0.25, −1.5, 2.5) (elementary). */
    @Test
    void probabilitiesAreTheHandComputedSoftmax() {
        double[] p = new double[3];
        model(Response.SOFTMAX, "softmax").probabilities(X, p);
        double e0 = Math.exp(0.25);
        double e1 = Math.exp(-1.5);
        double e2 = Math.exp(2.5);
        double sum = e0 + e1 + e2;
        assertArrayEquals(new double[]{e0 / sum, e1 / sum, e2 / sum}, p, 1e-15);
    }

    /**
     * Softmax is finite and sums to one even when decision values differ by up to 1e300, where
     * e<sup>z</sup> itself overflows or underflows (shift by max z; elementary).
     */
    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void probabilitiesAreFiniteAndSumToOneForExtremeDecisionValues(long seed) {
        RandomGenerator rng = Cases.rng(seed);
        int k = 2 + rng.nextInt(6);
        int d = 1 + rng.nextInt(4);
        double[] b = new double[k];
        for (int c = 0; c < k; c++) {
            double magnitude = Math.pow(10, rng.nextInt(301)); // 1 … 1e300
            b[c] = (rng.nextBoolean() ? 1 : -1) * magnitude * rng.nextDouble(0.1, 0.5);
        }
        MulticlassModel m = MulticlassModel.of(Cases.gaussianVector(rng, k * d, 1.0), b, d, Response.SOFTMAX, "softmax");
        double[] x = Cases.gaussianVector(rng, d, 1.0);
        double[] p = new double[k];
        m.probabilities(x, p);
        double sum = 0;
        for (int c = 0; c < k; c++) {
            assertTrue(Double.isFinite(p[c]) && p[c] >= 0 && p[c] <= 1, "p[" + c + "] = " + p[c]);
            sum += p[c];
        }
        assertEquals(1.0, sum, 1e-14);
        assertTrue(p[m.predictClass(x)] >= 1.0 / k, "the predicted class has the largest probability");
    }

    @Test
    void probabilitiesOfTiedExtremesAreExactlyHalf() {
        MulticlassModel m = MulticlassModel.of(new double[3], new double[]{1e300, -1e300, 1e300}, 1, Response.SOFTMAX,
                "softmax");
        double[] p = new double[3];
        m.probabilities(new double[]{0}, p);
        assertArrayEquals(new double[]{0.5, 0.0, 0.5}, p);
    }

    @Test
    void multiclassHingeRefusesProbabilitiesNamingTheLoss() {
        MulticlassModel m = model(Response.ARGMAX, "multiclass hinge");
        assertFalse(m.hasProbability());
        assertMessage(assertThrows(IllegalStateException.class, () -> m.probabilities(X, new double[3])),
                "multiclass hinge");
    }

    @ParameterizedTest(name = "value={0}")
    @ValueSource(doubles = {Double.NaN, Double.POSITIVE_INFINITY, Double.NEGATIVE_INFINITY})
    void nonFiniteCoefficientIsRejectedNamingClassAndColumn(double bad) {
        double[] w = W.clone();
        w[3] = bad; // class 1, column 1
        assertRejected(() -> MulticlassModel.of(w, B, 2, Response.SOFTMAX, "softmax"), "coefficients[1, 1]",
                String.valueOf(bad));
    }

    @ParameterizedTest(name = "value={0}")
    @ValueSource(doubles = {Double.NaN, Double.POSITIVE_INFINITY, Double.NEGATIVE_INFINITY})
    void nonFiniteInterceptIsRejectedNamingTheIndex(double bad) {
        double[] b = B.clone();
        b[2] = bad;
        assertRejected(() -> MulticlassModel.of(W, b, 2, Response.SOFTMAX, "softmax"), "intercepts[2]",
                String.valueOf(bad));
    }

    @Test
    void coefficientCountNotMatchingClassesTimesDimensionIsRejectedNamingThem() {
        assertRejected(() -> MulticlassModel.of(new double[5], B, 2, Response.SOFTMAX, "softmax"), "5 entries", "3 x 2");
    }

    @Test
    void fewerThanTwoClassesAreRejectedNamingTheCount() {
        assertRejected(() -> MulticlassModel.of(new double[2], new double[1], 2, Response.SOFTMAX, "softmax"),
                "classes (1)");
    }

    @Test
    void singleOutputResponseIsRejectedNamingIt() {
        assertRejected(() -> MulticlassModel.of(W, B, 2, Response.LOGISTIC, "logistic"), "LOGISTIC");
    }

    @Test
    void wrongFeatureCountIsRejectedNamingBothSizes() {
        MulticlassModel m = model(Response.SOFTMAX, "softmax");
        double[] x = {1, 2, 3};
        assertRejected(() -> m.decisionValues(x, new double[3]), "x has 3", "model has 2");
        assertRejected(() -> m.predictClass(x), "x has 3", "model has 2");
        assertRejected(() -> m.probabilities(new double[1], new double[3]), "x has 1", "model has 2");
    }

    @Test
    void tooShortOutputIsRejectedNamingBothSizes() {
        MulticlassModel m = model(Response.SOFTMAX, "softmax");
        assertRejected(() -> m.decisionValues(X, new double[2]), "out has 2", "need 3");
        assertRejected(() -> m.probabilities(X, new double[1]), "out has 1", "need 3");
    }

    @Test
    void changingTheArraysPassedInDoesNotChangeTheModel() {
        double[] w = W.clone();
        double[] b = B.clone();
        MulticlassModel m = MulticlassModel.of(w, b, 2, Response.SOFTMAX, "softmax");
        w[0] = 100;
        b[0] = 100;
        double[] z = new double[3];
        m.decisionValues(X, z);
        assertArrayEquals(new double[]{0.25, -1.5, 2.5}, z);
        assertEquals(1.0, m.coefficient(0, 0));
        assertEquals(0.25, m.intercept(0));
    }

    @Test
    void accessorsReportWhatWasGiven() {
        MulticlassModel m = model(Response.ARGMAX, "multiclass hinge");
        assertEquals(3, m.classes());
        assertEquals(2, m.dimension());
        assertEquals(-3.0, m.coefficient(2, 1));
        assertEquals(-0.5, m.intercept(2));
        assertEquals(Response.ARGMAX, m.response());
        assertEquals("multiclass hinge", m.lossName());
    }

    /** Eight threads predicting on one shared model give bit-identical answers to a sequential pass. */
    @Test
    void concurrentPredictionMatchesSequential() throws Exception {
        RandomGenerator rng = Cases.rng(909L);
        int k = 4;
        int d = 12;
        int n = 1_000;
        MulticlassModel m = MulticlassModel.of(Cases.gaussianVector(rng, k * d, 1.0), Cases.gaussianVector(rng, k, 1.0),
                d, Response.SOFTMAX, "softmax");
        double[][] x = Cases.gaussianMatrix(rng, n, d);
        double[] expected = new double[n * (k + 1)];
        double[] p = new double[k];
        for (int i = 0; i < n; i++) {
            m.probabilities(x[i], p);
            System.arraycopy(p, 0, expected, i * (k + 1), k);
            expected[i * (k + 1) + k] = m.predictClass(x[i]);
        }
        ExecutorService pool = Executors.newFixedThreadPool(8);
        try {
            List<Future<double[]>> results = new ArrayList<>();
            for (int t = 0; t < 8; t++) {
                final int shift = t * 125;
                results.add(pool.submit(() -> {
                    double[] out = new double[n * (k + 1)];
                    double[] q = new double[k];
                    for (int r = 0; r < n; r++) {
                        int i = (r + shift) % n;
                        m.probabilities(x[i], q);
                        System.arraycopy(q, 0, out, i * (k + 1), k);
                        out[i * (k + 1) + k] = m.predictClass(x[i]);
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
