package dev.riskmin.loss;

import org.junit.jupiter.api.Test;

import java.math.BigDecimal;
import java.util.List;
import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertEquals;

class HuberLossTest extends SmoothLossContract {

    @Override
    Loss loss(RandomGenerator rng) {
        return Losses.huber(Math.exp(Math.log(0.1) + rng.nextDouble() * Math.log(100)));
    }

    @Override
    List<Loss> sweepLosses() {
        return List.of(Losses.huber(1e-3), Losses.huber(1.0), Losses.huber(1e3), Losses.huber(1e300));
    }

    @Override
    TargetDomain expectedDomain() {
        return TargetDomain.REAL;
    }

    @Override
    Response expectedResponse() {
        return Response.IDENTITY;
    }

    private static double delta(Loss loss) {
        return ((HuberLoss) loss).delta();
    }

    @Override
    double prediction(RandomGenerator rng, Loss loss, double y) {
        return y + 2.0 * delta(loss) * rng.nextGaussian();
    }

    @Override
    double[] kinks(Loss loss, double y) {
        return new double[] {y - delta(loss), y + delta(loss)};
    }

    @Override
    double[] steepestPoint(Loss loss) {
        return new double[] {0.0, 0.0};
    }

    @Override
    boolean valueExceedsMax(Loss loss, double z, double y) {
        BigDecimal r = exact(z).subtract(exact(y)).abs();
        BigDecimal delta = exact(delta(loss));
        if (r.compareTo(delta) <= 0) {
            return halfSquareExceedsMax(r);
        }
        return delta.multiply(r.subtract(delta.divide(BigDecimal.valueOf(2)))).compareTo(MAX) > 0;
    }

    @Test
    void knownValues() {
        // Elementary calculus: at r = 3δ the linear branch gives δ·3δ − δ²/2 = 2.5δ², slope δ; at
        // r = δ/2 the quadratic branch gives δ²/8, slope δ/2; both branches give δ²/2 at r = δ.
        double delta = 1.5;
        Loss loss = Losses.huber(delta);
        assertEquals(delta * 3 * delta - delta * delta / 2, loss.value(1 + 3 * delta, 1), 1e-15);
        assertEquals(5.625, loss.value(1 + 3 * delta, 1), 1e-15);
        assertEquals(delta, loss.derivative(1 + 3 * delta, 1), 0.0);
        assertEquals(5.625, loss.value(1 - 3 * delta, 1), 1e-15);
        assertEquals(-delta, loss.derivative(1 - 3 * delta, 1), 0.0);
        assertEquals(delta * delta / 8, loss.value(delta / 2, 0), 1e-16);
        assertEquals(delta / 2, loss.derivative(delta / 2, 0), 0.0);
        assertEquals(delta * delta / 2, loss.value(delta, 0), 1e-16);
        assertEquals(delta * delta / 2, loss.value(Math.nextUp(delta), 0), 1e-15);
        assertEquals("huber(delta=1.5)", loss.name());
    }
}
