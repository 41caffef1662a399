package dev.riskmin.loss;

import dev.riskmin.testing.Cases;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.math.BigDecimal;
import java.util.List;
import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The contract every {@link Loss} of the library meets, run once per implementation by a subclass.
 * Properties are seeded sweeps (the display name carries the seed; replay with {@link Cases#rng}).
 * The checks are elementary calculus: a derivative equals the limit of central differences where the
 * function is differentiable, a convex function lies below its chords and above its tangents.
 */
abstract class LossContract {
    /** Points checked per seeded case. */
    static final int POINTS = 8;
    static final BigDecimal MAX = new BigDecimal(Double.MAX_VALUE);

    /** Predictions of the stability sweep: huge, large, at the exp overflow threshold, tiny and subnormal. */
    static final double[] SWEEP_Z = {
        1e300, -1e300, 1e10, -1e10, 1000, -1000, 710, -710, 1, -1, 0.0, -0.0,
        Double.MIN_VALUE, -Double.MIN_VALUE, 1e-310, -1e-310, Double.MIN_NORMAL, -Double.MIN_NORMAL
    };

    /** A loss of the kind under test; a parameterized kind draws its parameter from {@code rng}. */
    abstract Loss loss(RandomGenerator rng);

    /** Losses for the stability sweep, including extreme parameters where the kind has one. */
    abstract List<Loss> sweepLosses();

    abstract TargetDomain expectedDomain();

    abstract Response expectedResponse();

    /**
     * Predictions at which ℓ' is not differentiable (kinks of ℓ and breaks of ℓ''); central
     * differences are checked only away from them.
     */
    double[] kinks(Loss loss, double y) {
        return new double[0];
    }

    /**
     * A point {z, y} where the slope of ℓ' is largest: |ℓ''| = β there for a finite β, a kink or
     * fast growth for β = ∞.
     */
    abstract double[] steepestPoint(Loss loss);

    /** Whether the true |ℓ(z, y)| exceeds the largest double (only quadratic or faster growth can). */
    boolean valueExceedsMax(Loss loss, double z, double y) {
        return false;
    }

    /** Whether the true |ℓ'(z, y)| exceeds the largest double. */
    boolean derivativeExceedsMax(Loss loss, double z, double y) {
        return false;
    }

    /** A valid target. */
    double target(RandomGenerator rng) {
        switch (expectedDomain()) {
            case REAL:
                return 3.0 * rng.nextGaussian();
            case NON_NEGATIVE:
                return rng.nextBoolean() ? rng.nextInt(8) : 5.0 * rng.nextDouble();
            case BINARY:
                return rng.nextInt(3) - 1.0;
            case PROPORTION:
                return rng.nextBoolean() ? rng.nextInt(3) - 1.0 : rng.nextDouble();
            default:
                throw new AssertionError(expectedDomain());
        }
    }

    /** A prediction where the loss bends: around y for regression, around the margin for labels. */
    double prediction(RandomGenerator rng, Loss loss, double y) {
        double centre = expectedDomain() == TargetDomain.REAL ? y : 0.0;
        return centre + 3.0 * rng.nextGaussian();
    }

    /** Valid targets for the sweep, extremes included. */
    double[] sweepTargets() {
        switch (expectedDomain()) {
            case REAL:
                return new double[] {-1e300, -2.5, -0.0, 0.0, 1.0, 1e300};
            case NON_NEGATIVE:
                return new double[] {0.0, 1.0, 3.5, 1e300};
            case BINARY:
                return new double[] {-1.0, 0.0, 1.0};
            case PROPORTION:
                return new double[] {-1.0, 0.0, 0.25, 1.0};
            default:
                throw new AssertionError(expectedDomain());
        }
    }

    /** Targets outside the domain. */
    double[] invalidTargets() {
        switch (expectedDomain()) {
            case REAL:
                return new double[] {Double.NaN, Double.POSITIVE_INFINITY, Double.NEGATIVE_INFINITY};
            case NON_NEGATIVE:
                return new double[] {-1.0, -1e-300, Double.NaN, Double.POSITIVE_INFINITY};
            case BINARY:
                return new double[] {0.5, 2.0, -2.0, Double.NaN, Double.POSITIVE_INFINITY};
            case PROPORTION:
                return new double[] {1.5, -0.5, -2.0, Double.NaN};
            default:
                throw new AssertionError(expectedDomain());
        }
    }

    private double predictionAwayFromKinks(RandomGenerator rng, Loss loss, double y, double margin) {
        for (int attempt = 0; attempt < 1000; attempt++) {
            double z = prediction(rng, loss, y);
            if (farFromKinks(loss, y, z, margin * Math.max(1.0, Math.abs(z)))) {
                return z;
            }
        }
        throw new AssertionError("no prediction away from the kinks of " + loss + " at y = " + y);
    }

    private boolean farFromKinks(Loss loss, double y, double z, double margin) {
        for (double k : kinks(loss, y)) {
            if (Math.abs(z - k) < margin) {
                return false;
            }
        }
        return true;
    }

    /** A prediction that is, half of the time, exactly a kink (where the derivative is a subgradient choice). */
    private double predictionOrKink(RandomGenerator rng, Loss loss, double y) {
        double[] k = kinks(loss, y);
        if (k.length > 0 && rng.nextBoolean()) {
            return k[rng.nextInt(k.length)];
        }
        return prediction(rng, loss, y);
    }

    static double centralDifference(Loss loss, double z, double y, double h) {
        return (loss.value(z + h, y) - loss.value(z - h, y)) / (2.0 * h);
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void derivativeMatchesCentralDifferenceAwayFromKinks(long seed) {
        // Elementary calculus: (ℓ(z+h) − ℓ(z−h))/2h = ℓ'(z) + O(h²) where ℓ is C³ around z.
        RandomGenerator rng = Cases.rng(seed);
        Loss loss = loss(rng);
        for (int p = 0; p < POINTS; p++) {
            double y = target(rng);
            double z = predictionAwayFromKinks(rng, loss, y, 1e-3);
            double h = 1e-6 * Math.max(1.0, Math.abs(z));
            double d = loss.derivative(z, y);
            double fd = centralDifference(loss, z, y, h);
            double tol = 1e-8 * (1.0 + Math.abs(d)) + 1e-9 * Math.abs(loss.value(z, y));
            assertEquals(fd, d, tol, () -> loss + " at z = " + z + ", y = " + y);
        }
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void valueLiesBelowItsChordsAtTheMidpoint(long seed) {
        // Midpoint convexity: ℓ((a+b)/2) ≤ (ℓ(a) + ℓ(b))/2 (elementary calculus).
        RandomGenerator rng = Cases.rng(seed);
        Loss loss = loss(rng);
        assertTrue(loss.convex(), loss + " is convex (METHODS §11)");
        for (int p = 0; p < POINTS; p++) {
            double y = target(rng);
            double a = predictionOrKink(rng, loss, y);
            double b = rng.nextBoolean() ? prediction(rng, loss, y) : a + 1e-3 * rng.nextGaussian();
            double fa = loss.value(a, y);
            double fb = loss.value(b, y);
            double mid = loss.value(0.5 * (a + b), y);
            double tol = 1e-12 * (1.0 + Math.abs(fa) + Math.abs(fb));
            assertTrue(mid <= 0.5 * (fa + fb) + tol,
                    () -> loss + " at a = " + a + ", b = " + b + ", y = " + y + ": " + mid + " > " + 0.5 * (fa + fb));
        }
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void derivativeIsASubgradientIncludingAtKinks(long seed) {
        // A convex ℓ lies above its tangents: ℓ(b) ≥ ℓ(a) + ℓ'(a)(b − a); at a kink this holds only
        // for an element of the subdifferential (elementary convex analysis).
        RandomGenerator rng = Cases.rng(seed);
        Loss loss = loss(rng);
        for (int p = 0; p < POINTS; p++) {
            double y = target(rng);
            double a = predictionOrKink(rng, loss, y);
            double b = rng.nextBoolean() ? prediction(rng, loss, y) : a + 1e-2 * rng.nextGaussian();
            double fa = loss.value(a, y);
            double fb = loss.value(b, y);
            double lin = loss.derivative(a, y) * (b - a);
            double tol = 1e-12 * (1.0 + Math.abs(fa) + Math.abs(fb) + Math.abs(lin));
            assertTrue(fb >= fa + lin - tol,
                    () -> loss + " at a = " + a + ", b = " + b + ", y = " + y + ": " + fb + " < " + (fa + lin));
        }
    }

    @Test
    void smoothnessConstantIsReachedAtTheSteepestPoint() {
        // For a finite β the slope of ℓ' at the steepest point equals β, so β is tight; for β = ∞
        // the slope over a 2e-7 interval exceeds 1e6 (a kink or exponential growth).
        for (int s = 1; s <= 5; s++) {
            Loss loss = loss(Cases.rng(s));
            double[] point = steepestPoint(loss);
            double h = 1e-7;
            double slope = Math.abs(loss.derivative(point[0] + h, point[1]) - loss.derivative(point[0] - h, point[1])) / (2 * h);
            double beta = loss.smoothness();
            if (Double.isFinite(beta)) {
                assertEquals(beta, slope, 1e-6 * beta, () -> loss + " at " + point[0] + ", y = " + point[1]);
            } else {
                assertTrue(slope > 1e6, () -> loss + " declares β = ∞ but the slope at " + point[0] + " is " + slope);
            }
        }
    }

    @Test
    void neverNaNAndInfiniteOnlyBeyondTheLargestDouble() {
        // Contract of Loss: for finite z and valid y, never NaN; ±∞ only where the true value (or
        // derivative) exceeds Double.MAX_VALUE, as decided by an exact or high-precision oracle.
        for (Loss loss : sweepLosses()) {
            for (double y : sweepTargets()) {
                for (double z : SWEEP_Z) {
                    double v = loss.value(z, y);
                    double d = loss.derivative(z, y);
                    String at = loss + " at z = " + z + ", y = " + y;
                    assertFalse(Double.isNaN(v), at + ": value is NaN");
                    assertFalse(Double.isNaN(d), at + ": derivative is NaN");
                    assertEquals(valueExceedsMax(loss, z, y), Double.isInfinite(v), at + ": value " + v);
                    assertEquals(derivativeExceedsMax(loss, z, y), Double.isInfinite(d), at + ": derivative " + d);
                }
            }
        }
    }

    @Test
    void requireTargetRejectsTargetsOutsideTheDomainNamingRowAndValue() {
        Loss loss = loss(Cases.rng(1));
        for (double y : invalidTargets()) {
            IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> loss.requireTarget(y, 17),
                    () -> loss + " accepted y = " + y);
            assertTrue(e.getMessage().contains("y[17]") && e.getMessage().contains("(" + y + ")"), e.getMessage());
        }
        for (double y : sweepTargets()) {
            loss.requireTarget(y, 3);
        }
    }

    @Test
    void declaresItsDomainResponseAndName() {
        Loss loss = loss(Cases.rng(1));
        assertEquals(expectedDomain(), loss.domain());
        assertEquals(expectedResponse(), loss.response());
        assertFalse(loss.name().isEmpty());
        assertEquals(loss.name(), loss.toString());
    }

    // ---- exact oracles used by subclasses ----

    /** Whether the exact value of a²/2 exceeds the largest double. */
    static boolean halfSquareExceedsMax(BigDecimal a) {
        return a.multiply(a).divide(BigDecimal.valueOf(2)).compareTo(MAX) > 0;
    }

    static BigDecimal exact(double x) {
        return new BigDecimal(x);
    }
}
