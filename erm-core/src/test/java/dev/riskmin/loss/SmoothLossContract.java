package dev.riskmin.loss;

import dev.riskmin.testing.Cases;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertTrue;

/** The extra contract of a loss with a finite smoothness constant β: ℓ' is β-Lipschitz. */
abstract class SmoothLossContract extends LossContract {

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void smoothnessConstantBoundsTheSlopeOfTheDerivative(long seed) {
        // β = sup |ℓ''| implies |ℓ'(a) − ℓ'(b)| ≤ β |a − b| (mean value theorem; METHODS §11).
        RandomGenerator rng = Cases.rng(seed);
        Loss loss = loss(rng);
        double beta = loss.smoothness();
        assertTrue(beta > 0 && Double.isFinite(beta), loss + " smoothness " + beta);
        for (int p = 0; p < POINTS; p++) {
            double y = target(rng);
            double a = prediction(rng, loss, y);
            double b = rng.nextBoolean() ? prediction(rng, loss, y) : a + 1e-3 * rng.nextGaussian();
            double da = loss.derivative(a, y);
            double db = loss.derivative(b, y);
            double bound = beta * Math.abs(a - b) * (1 + 1e-12) + 1e-12 * (1 + Math.abs(da) + Math.abs(db));
            assertTrue(Math.abs(da - db) <= bound,
                    () -> loss + " at a = " + a + ", b = " + b + ", y = " + y + ": |Δℓ'| = " + Math.abs(da - db) + " > " + bound);
        }
    }
}
