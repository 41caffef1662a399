package dev.riskmin.loss;

import org.apache.commons.math3.dfp.Dfp;
import org.apache.commons.math3.dfp.DfpField;
import org.apache.commons.math3.dfp.DfpMath;
import org.junit.jupiter.api.Test;

import java.util.List;
import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

class PoissonLossTest extends LossContract {
    /** 30 radix-10000 digits, about 120 decimal digits: the oracle for e^z − y z (commons-math3 Dfp). */
    private static final DfpField FIELD = new DfpField(30);
    private static final Dfp MAX_DFP = FIELD.newDfp(Double.MAX_VALUE);
    private static final double LOG_MAX = Math.log(Double.MAX_VALUE);

    @Override
    Loss loss(RandomGenerator rng) {
        return Losses.poisson();
    }

    @Override
    List<Loss> sweepLosses() {
        return List.of(Losses.poisson());
    }

    @Override
    TargetDomain expectedDomain() {
        return TargetDomain.NON_NEGATIVE;
    }

    @Override
    Response expectedResponse() {
        return Response.EXPONENTIAL;
    }

    @Override
    double prediction(RandomGenerator rng, Loss loss, double y) {
        return Math.log(y + 0.5) + 1.5 * rng.nextGaussian();
    }

    @Override
    double[] steepestPoint(Loss loss) {
        // ℓ'' = e^z is unbounded: at z = 30 the slope of ℓ' is about 1e13.
        return new double[] {30.0, 0.0};
    }

    private static Dfp trueValue(double z, double y) {
        Dfp zz = FIELD.newDfp(z);
        return DfpMath.exp(zz).subtract(FIELD.newDfp(y).multiply(zz));
    }

    @Override
    boolean valueExceedsMax(Loss loss, double z, double y) {
        return trueValue(z, y).abs().greaterThan(MAX_DFP);
    }

    @Override
    boolean derivativeExceedsMax(Loss loss, double z, double y) {
        // e^z − y with 0 ≤ y ≤ 1e300 exceeds the largest double exactly when e^z does.
        return z > LOG_MAX;
    }

    @Test
    void knownValues() {
        // Elementary calculus: e^0 − 3·0 = 1, slope 1 − 3 = −2; the minimum over z is at z = log y,
        // where ℓ = y − y log y and ℓ' = 0.
        Loss loss = Losses.poisson();
        assertEquals(1.0, loss.value(0, 3), 0.0);
        assertEquals(-2.0, loss.derivative(0, 3), 0.0);
        assertEquals(2 - 2 * Math.log(2), loss.value(Math.log(2), 2), 1e-15);
        assertEquals(0.0, loss.derivative(Math.log(2), 2), 1e-15);
        assertEquals(Math.exp(-1.5), loss.value(-1.5, 0), 0.0);
        // At z = 1000 the true value e^1000 ≈ 2e434 exceeds the largest double.
        assertEquals(Double.POSITIVE_INFINITY, loss.value(1000, 1), 0.0);
    }

    @Test
    void bothTermsOverflowingNeverGiveNaN() {
        // For y = 1e308 and z near the root of z − log z = log y (z ≈ 715.77) both e^z and y z exceed
        // the largest double while their difference may not. Compared with the Dfp oracle, the error
        // must stay within 1e-12·y·z: the difference of two terms of that size cannot be resolved
        // better from double inputs (its condition number is y z/|ℓ|).
        Loss loss = Losses.poisson();
        double y = 1e308;
        double z0 = 715.0;
        for (int i = 0; i < 50; i++) {
            z0 -= (z0 - Math.log(z0) - Math.log(y)) / (1 - 1 / z0);
        }
        double[] offsets = {-1.0, -1e-3, -1e-9, -1e-12, 0.0, 1e-12, 1e-9, 1e-3, 1.0};
        int finite = 0;
        for (double off : offsets) {
            double z = z0 + off;
            double v = loss.value(z, y);
            assertFalse(Double.isNaN(v), "z = " + z);
            Dfp truth = trueValue(z, y);
            if (truth.abs().greaterThan(MAX_DFP)) {
                assertTrue(Double.isInfinite(v) && Math.signum(v) == Math.signum(truth.toDouble()), "z = " + z + ": " + v);
            } else {
                finite++;
                assertTrue(Double.isFinite(v), "z = " + z + ": " + v);
                double err = truth.subtract(FIELD.newDfp(v)).abs().toDouble();
                assertTrue(err <= 1e-12 * y * z, "z = " + z + ": error " + err);
            }
            assertEquals(Double.POSITIVE_INFINITY, loss.derivative(z, y), 0.0);
        }
        assertTrue(finite >= 3, "the sweep should reach the cancelling region, finite values: " + finite);
    }
}
