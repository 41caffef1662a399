package dev.riskmin.loss;

import dev.riskmin.testing.Cases;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.List;
import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

class SmoothedHingeLossTest extends SmoothLossContract {

    @Override
    Loss loss(RandomGenerator rng) {
        return Losses.smoothedHinge(Math.exp(Math.log(0.05) + rng.nextDouble() * Math.log(100)));
    }

    @Override
    List<Loss> sweepLosses() {
        return List.of(Losses.smoothedHinge(1e-300), Losses.smoothedHinge(1e-3), Losses.smoothedHinge(1.0),
                Losses.smoothedHinge(1e300));
    }

    @Override
    TargetDomain expectedDomain() {
        return TargetDomain.BINARY;
    }

    @Override
    Response expectedResponse() {
        return Response.MARGIN;
    }

    private static double gamma(Loss loss) {
        return ((SmoothedHingeLoss) loss).gamma();
    }

    @Override
    double prediction(RandomGenerator rng, Loss loss, double y) {
        double s = y > 0 ? 1.0 : -1.0;
        if (rng.nextBoolean()) {
            // Around the parabola, margins a in [1 − 1.5γ, 1 + 0.5γ].
            return s * (1.0 - gamma(loss) * (2.0 * rng.nextDouble() - 0.5));
        }
        return 3.0 * rng.nextGaussian();
    }

    @Override
    double[] kinks(Loss loss, double y) {
        double s = y > 0 ? 1.0 : -1.0;
        return new double[] {s, s * (1.0 - gamma(loss))};
    }

    @Override
    double[] steepestPoint(Loss loss) {
        return new double[] {1.0 - gamma(loss) / 2, 1.0};
    }

    @Test
    void knownValues() {
        // Elementary, γ = 1: a = 0.5 lies on the parabola (1 − a)²/2 = 0.125 with slope −0.5;
        // a = −1 on the line 1 − a − γ/2 = 1.5 with slope −1; a = 2 gives 0.
        Loss loss = Losses.smoothedHinge(1.0);
        assertEquals(0.125, loss.value(0.5, 1), 0.0);
        assertEquals(-0.5, loss.derivative(0.5, 1), 0.0);
        assertEquals(1.5, loss.value(-1, 1), 0.0);
        assertEquals(-1.0, loss.derivative(-1, 1), 0.0);
        assertEquals(0.0, loss.value(2, 1), 0.0);
        assertEquals(0.125, loss.value(-0.5, 0), 0.0);
        assertEquals(0.5, loss.derivative(-0.5, 0), 0.0);
        assertEquals("smoothed-hinge(gamma=1.0)", loss.name());
        assertEquals(4.0, Losses.smoothedHinge(0.25).smoothness(), 0.0);
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void liesWithinHalfGammaBelowTheHinge(long seed) {
        // Shalev-Shwartz & Zhang (2013): the smoothed hinge satisfies h − γ/2 ≤ ℓ_γ ≤ h for the hinge h
        // (from memory; the bound is also elementary from the three branches).
        RandomGenerator rng = Cases.rng(seed);
        Loss loss = loss(rng);
        double gamma = gamma(loss);
        Loss hinge = Losses.hinge();
        for (int p = 0; p < POINTS; p++) {
            double y = target(rng);
            double z = prediction(rng, loss, y);
            double h = hinge.value(z, y);
            double v = loss.value(z, y);
            double tol = 1e-15 * (1 + h);
            assertTrue(v <= h + tol && v >= h - gamma / 2 - tol, loss + " at z = " + z + ", y = " + y + ": " + v + " vs hinge " + h);
        }
    }
}
