package dev.riskmin.loss;

import dev.riskmin.testing.Cases;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.Arrays;
import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The contract every {@link MulticlassLoss} of the library meets, run once per implementation.
 * Checks are elementary calculus and convex analysis; properties are seeded sweeps.
 */
abstract class MulticlassLossContract {
    static final int POINTS = 6;

    abstract MulticlassLoss loss();

    abstract Response expectedResponse();

    /**
     * Whether the loss is differentiable in a ball of radius {@code margin} around z, so central
     * differences apply.
     */
    abstract boolean differentiableAround(double[] z, int y, double margin);

    static int classes(RandomGenerator rng) {
        return 2 + rng.nextInt(5);
    }

    static double[] decisionValues(RandomGenerator rng, int classes) {
        return Cases.gaussianVector(rng, classes, 2.0);
    }

    double value(double[] z, int y) {
        return loss().value(z, 0, z.length, y);
    }

    double[] gradient(double[] z, int y) {
        double[] g = new double[z.length];
        loss().gradient(z, 0, z.length, y, g, 0);
        return g;
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void gradientMatchesCentralDifferenceAwayFromKinks(long seed) {
        // Elementary calculus: (ℓ(z + h e_k) − ℓ(z − h e_k))/2h = ∂ℓ/∂z_k + O(h²) where ℓ is smooth.
        RandomGenerator rng = Cases.rng(seed);
        int checked = 0;
        for (int attempt = 0; checked < POINTS && attempt < 100 * POINTS; attempt++) {
            int k = classes(rng);
            double[] z = decisionValues(rng, k);
            int y = rng.nextInt(k);
            if (!differentiableAround(z, y, 1e-3)) {
                continue;
            }
            checked++;
            double[] g = gradient(z, y);
            double h = 1e-6;
            for (int j = 0; j < k; j++) {
                double[] up = z.clone();
                double[] down = z.clone();
                up[j] += h;
                down[j] -= h;
                double fd = (value(up, y) - value(down, y)) / (2 * h);
                assertEquals(fd, g[j], 1e-7 * (1 + Math.abs(g[j])), loss() + " component " + j + " at " + Arrays.toString(z) + ", y = " + y);
            }
        }
        assertEquals(POINTS, checked, "too few differentiable points drawn");
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void gradientIsASubgradientAndValueIsMidpointConvex(long seed) {
        // Convexity: ℓ(b) ≥ ℓ(a) + ∇ℓ(a)·(b − a) (also at kinks, for a subgradient) and
        // ℓ((a+b)/2) ≤ (ℓ(a) + ℓ(b))/2 (elementary convex analysis).
        RandomGenerator rng = Cases.rng(seed);
        assertTrue(loss().convex());
        for (int p = 0; p < POINTS; p++) {
            int k = classes(rng);
            double[] a = decisionValues(rng, k);
            int y = rng.nextInt(k);
            if (rng.nextBoolean()) {
                // Place a on a kink or tie: the runner-up equal to the true class minus the margin 1, or a tie.
                int other = (y + 1 + rng.nextInt(k - 1)) % k;
                a[other] = rng.nextBoolean() ? a[y] - 1.0 : a[(other + 1) % k];
            }
            double[] b = rng.nextBoolean() ? decisionValues(rng, k) : perturbed(rng, a, 1e-2);
            double fa = value(a, y);
            double fb = value(b, y);
            double[] g = gradient(a, y);
            double lin = 0;
            double[] mid = new double[k];
            for (int j = 0; j < k; j++) {
                lin += g[j] * (b[j] - a[j]);
                mid[j] = 0.5 * (a[j] + b[j]);
            }
            double tol = 1e-12 * (1 + Math.abs(fa) + Math.abs(fb) + Math.abs(lin));
            double linear = lin;
            assertTrue(fb >= fa + linear - tol, () -> loss() + " at " + Arrays.toString(a) + ", y = " + y + ": " + fb + " < " + (fa + linear));
            double fm = value(mid, y);
            assertTrue(fm <= 0.5 * (fa + fb) + tol, () -> loss() + " midpoint " + fm + " > " + 0.5 * (fa + fb));
        }
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void invariantUnderAShiftOfAllDecisionValues(long seed) {
        // Both losses depend on z only through differences z_k − z_y, so ℓ(z + c·1) = ℓ(z) and the
        // gradient sums to 0 (elementary).
        RandomGenerator rng = Cases.rng(seed);
        for (int p = 0; p < POINTS; p++) {
            int k = classes(rng);
            double[] z = decisionValues(rng, k);
            int y = rng.nextInt(k);
            double c = 10 * rng.nextGaussian();
            double[] shifted = z.clone();
            for (int j = 0; j < k; j++) {
                shifted[j] += c;
            }
            double v = value(z, y);
            assertEquals(v, value(shifted, y), 1e-13 * (1 + Math.abs(c)) * (1 + v));
            double sum = 0;
            for (double gj : gradient(z, y)) {
                sum += gj;
            }
            assertEquals(0.0, sum, 1e-15);
        }
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void gradientReturnsTheValueAndTouchesOnlyItsRange(long seed) {
        RandomGenerator rng = Cases.rng(seed);
        int k = classes(rng);
        int offset = rng.nextInt(4);
        int gOffset = rng.nextInt(4);
        double[] buffer = Cases.gaussianVector(rng, offset + k + 3, 2.0);
        double[] before = buffer.clone();
        double[] out = Cases.gaussianVector(rng, gOffset + k + 3, 1.0);
        double[] outBefore = out.clone();
        int y = rng.nextInt(k);
        double[] z = Arrays.copyOfRange(buffer, offset, offset + k);

        double v = loss().gradient(buffer, offset, k, y, out, gOffset);
        assertEquals(value(z, y), v, 0.0, "gradient(...) returns value(...)");
        assertEquals(v, loss().value(buffer, offset, k, y), 0.0);
        assertArrayEquals(before, buffer, 0.0, "z is read only");
        assertArrayEquals(gradient(z, y), Arrays.copyOfRange(out, gOffset, gOffset + k), 0.0);
        for (int j = 0; j < out.length; j++) {
            if (j < gOffset || j >= gOffset + k) {
                assertEquals(outBefore[j], out[j], 0.0, "entry " + j + " outside the gradient range");
            }
        }
    }

    @Test
    void neverNaNAndFiniteForDecisionValuesUpTo1e300() {
        // Contract of MulticlassLoss in this library: for |z_k| ≤ 1e300 both losses are finite (their
        // growth is linear in the differences z_k − z_y, at most 2e300 + 1) and never NaN.
        double[] sweep = LossContract.SWEEP_Z;
        int k = 3;
        double[] z = new double[k];
        double[] g = new double[k];
        int n = sweep.length;
        for (int a = 0; a < n; a++) {
            for (int b = 0; b < n; b++) {
                for (int c = 0; c < n; c++) {
                    z[0] = sweep[a];
                    z[1] = sweep[b];
                    z[2] = sweep[c];
                    for (int y = 0; y < k; y++) {
                        double v = loss().gradient(z, 0, k, y, g, 0);
                        assertTrue(Double.isFinite(v), () -> loss() + " at " + Arrays.toString(z));
                        for (double gj : g) {
                            assertTrue(Double.isFinite(gj), () -> loss() + " gradient at " + Arrays.toString(z));
                        }
                        assertEquals(v, loss().value(z, 0, k, y), 0.0);
                    }
                }
            }
        }
    }

    @Test
    void rejectsLabelsOutsideTheClassRangeNamingThem() {
        double[] z = {0.1, 0.2, 0.3};
        double[] g = new double[3];
        for (int y : new int[] {-1, 3, 7}) {
            IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> loss().value(z, 0, 3, y));
            assertEquals("y (" + y + ") must be a class label in [0, 3)", e.getMessage());
            assertThrows(IllegalArgumentException.class, () -> loss().gradient(z, 0, 3, y, g, 0));
        }
    }

    @Test
    void declaresResponseAndName() {
        assertEquals(expectedResponse(), loss().response());
        assertFalse(loss().name().isEmpty());
        assertEquals(loss().name(), loss().toString());
    }

    static double[] perturbed(RandomGenerator rng, double[] a, double scale) {
        double[] b = a.clone();
        for (int j = 0; j < b.length; j++) {
            b[j] += scale * rng.nextGaussian();
        }
        return b;
    }
}
