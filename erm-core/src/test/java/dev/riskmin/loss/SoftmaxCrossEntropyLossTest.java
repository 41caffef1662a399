package dev.riskmin.loss;

import dev.riskmin.testing.Cases;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

class SoftmaxCrossEntropyLossTest extends MulticlassLossContract {

    @Override
    MulticlassLoss loss() {
        return Losses.softmax();
    }

    @Override
    Response expectedResponse() {
        return Response.SOFTMAX;
    }

    @Override
    boolean differentiableAround(double[] z, int y, double margin) {
        return true;
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void twoClassesEqualTheLogisticLossOfTheDifference(long seed) {
        // METHODS §11 checks: K = 2 softmax cross-entropy equals the logistic loss of u = z1 − z0,
        // with ∂/∂z1 = ℓ'(u) and ∂/∂z0 = −ℓ'(u) by the chain rule.
        RandomGenerator rng = Cases.rng(seed);
        Loss logistic = Losses.logistic();
        for (int p = 0; p < 8; p++) {
            double scale = rng.nextBoolean() ? 3.0 : 300.0;
            double[] z = {scale * rng.nextGaussian(), scale * rng.nextGaussian()};
            int y = rng.nextInt(2);
            double u = z[1] - z[0];
            double expected = logistic.value(u, y);
            double[] g = gradient(z, y);
            assertEquals(expected, value(z, y), 1e-14 * (1 + expected) + 1e-300, "z = " + z[0] + ", " + z[1]);
            double d = logistic.derivative(u, y);
            assertEquals(d, g[1], 1e-15 * (1 + Math.abs(d)), "z = " + z[0] + ", " + z[1]);
            assertEquals(-d, g[0], 1e-15 * (1 + Math.abs(d)), "z = " + z[0] + ", " + z[1]);
        }
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void smoothnessConstantBoundsTheSlopeOfTheGradient(long seed) {
        // Hessian diag(p) − p pᵀ has largest eigenvalue ≤ 1/2 (Böhning 1992, from memory; METHODS §11),
        // so ‖∇ℓ(a) − ∇ℓ(b)‖ ≤ ½‖a − b‖ (mean value theorem).
        RandomGenerator rng = Cases.rng(seed);
        double beta = loss().smoothness();
        assertEquals(0.5, beta, 0.0);
        for (int p = 0; p < POINTS; p++) {
            int k = classes(rng);
            double[] a = decisionValues(rng, k);
            double[] b = rng.nextBoolean() ? decisionValues(rng, k) : perturbed(rng, a, 1e-3);
            int y = rng.nextInt(k);
            double[] ga = gradient(a, y);
            double[] gb = gradient(b, y);
            double dg = 0;
            double dz = 0;
            for (int j = 0; j < k; j++) {
                dg += (ga[j] - gb[j]) * (ga[j] - gb[j]);
                dz += (a[j] - b[j]) * (a[j] - b[j]);
            }
            assertTrue(Math.sqrt(dg) <= beta * Math.sqrt(dz) * (1 + 1e-12) + 1e-15,
                    "‖Δ∇ℓ‖ = " + Math.sqrt(dg) + ", ½‖Δz‖ = " + beta * Math.sqrt(dz));
        }
    }

    @Test
    void smoothnessConstantIsReachedForTwoEqualClasses() {
        // At z = (0, 0) the Hessian is ¼[[1, −1], [−1, 1]] with eigenvalue ½ along (1, −1)/√2 (elementary).
        double h = 1e-6;
        double s = h / Math.sqrt(2);
        double[] gUp = gradient(new double[] {s, -s}, 0);
        double[] gDown = gradient(new double[] {-s, s}, 0);
        double slope = Math.hypot(gUp[0] - gDown[0], gUp[1] - gDown[1]) / (2 * h);
        assertEquals(0.5, slope, 1e-8);
    }

    @Test
    void knownValues() {
        // Elementary: equal decision values give p = 1/K, so ℓ = log K and ∇ℓ = 1/K − e_y.
        double[] g = gradient(new double[] {0, 0, 0}, 1);
        assertEquals(Math.log(3), value(new double[] {0, 0, 0}, 1), 1e-15);
        assertEquals(1.0 / 3, g[0], 1e-16);
        assertEquals(-2.0 / 3, g[1], 1e-16);
        assertEquals(1.0 / 3, g[2], 1e-16);
        // ℓ((1, 2, 3), y) = log(e + e² + e³) − z_y.
        double lse = Math.log(Math.E + Math.exp(2) + Math.exp(3));
        assertEquals(lse - 1, value(new double[] {1, 2, 3}, 0), 1e-14);
        assertEquals(lse - 3, value(new double[] {1, 2, 3}, 2), 1e-14);
        // Log-sum-exp: huge equal values still give log K; a dominant true class gives ≈ e^−1000 ≈ 0.
        assertEquals(Math.log(2), value(new double[] {1e300, 1e300}, 0), 1e-15);
        assertEquals(0.0, value(new double[] {0, 1000}, 1), 0.0);
        assertEquals(1000.0, value(new double[] {0, 1000}, 0), 0.0);
    }

    @Test
    void trueClassGradientKeepsRelativeAccuracyWhenItsProbabilityIsNearOne() {
        // With z = (0, 40): p_0 = e^−40/(1 + e^−40), so ∂ℓ/∂z_1 = −p_0 ≈ −4.25e−18, which p_1 − 1 would round to 0.
        double[] g = gradient(new double[] {0, 40}, 1);
        double p0 = Math.exp(-40) / (1 + Math.exp(-40));
        assertEquals(-p0, g[1], 1e-15 * p0);
        assertEquals(p0, g[0], 1e-15 * p0);
    }
}
