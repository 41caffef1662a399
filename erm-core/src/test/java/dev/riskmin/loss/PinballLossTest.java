package dev.riskmin.loss;

import org.junit.jupiter.api.Test;

import java.util.List;
import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

class PinballLossTest extends LossContract {

    @Override
    Loss loss(RandomGenerator rng) {
        return Losses.pinball(0.05 + 0.9 * rng.nextDouble());
    }

    @Override
    List<Loss> sweepLosses() {
        return List.of(Losses.pinball(1e-300), Losses.pinball(0.5), Losses.pinball(0.9), Losses.pinball(Math.nextDown(1.0)));
    }

    @Override
    TargetDomain expectedDomain() {
        return TargetDomain.REAL;
    }

    @Override
    Response expectedResponse() {
        return Response.IDENTITY;
    }

    @Override
    double[] kinks(Loss loss, double y) {
        return new double[] {y};
    }

    @Override
    double[] steepestPoint(Loss loss) {
        return new double[] {0.0, 0.0};
    }

    @Test
    void knownValuesAtTauNineTenths() {
        // Elementary calculus, r = y − z: τ r for r ≥ 0, (τ − 1) r below; slopes −τ and 1 − τ.
        Loss loss = Losses.pinball(0.9);
        assertEquals(0.9, loss.value(0, 1), 1e-16);
        assertEquals(-0.9, loss.derivative(0, 1), 0.0);
        assertEquals(0.1, loss.value(1, 0), 1e-16);
        assertEquals(0.1, loss.derivative(1, 0), 1e-16);
        assertEquals(0.0, loss.value(2, 2), 0.0);
        assertEquals(0.0, loss.derivative(2, 2), 0.0);
        assertEquals("pinball(tau=0.9)", loss.name());
    }

    @Test
    void sumOverASampleIsMinimalOnTheTauQuantile() {
        // Koenker & Bassett (1978), §1 (section from memory): the minimizers of Σ ℓ_τ(z, y_i) are the τ-quantiles of the sample.
        // For y = 1..10 and τ = 0.9 the subgradient −0.9·#(y > z) + 0.1·#(y < z) vanishes on [9, 10].
        Loss loss = Losses.pinball(0.9);
        double at9 = sum(loss, 9.0);
        assertEquals(at9, sum(loss, 9.5), 1e-12);
        assertEquals(at9, sum(loss, 10.0), 1e-12);
        assertTrue(sum(loss, 8.9) > at9 + 1e-3);
        assertTrue(sum(loss, 10.1) > at9 + 1e-3);
        // At z = 9: nine residuals y − z ≤ 0 contribute 0.1·(8+7+…+0) = 3.6, one contributes 0.9·1.
        assertEquals(4.5, at9, 1e-12);
    }

    private static double sum(Loss loss, double z) {
        double s = 0;
        for (int y = 1; y <= 10; y++) {
            s += loss.value(z, y);
        }
        return s;
    }

    @Test
    void halfTheAbsoluteLossAtTheMedian() {
        // Elementary: max(r/2, −r/2) = |r|/2 at τ = 1/2.
        Loss pinball = Losses.pinball(0.5);
        Loss absolute = Losses.absolute();
        for (double z = -3; z <= 3; z += 0.25) {
            assertEquals(absolute.value(z, 0.3) / 2, pinball.value(z, 0.3), 1e-15);
        }
    }
}
