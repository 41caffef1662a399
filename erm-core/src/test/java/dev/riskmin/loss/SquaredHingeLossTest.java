package dev.riskmin.loss;

import org.junit.jupiter.api.Test;

import java.math.BigDecimal;
import java.util.List;
import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertEquals;

class SquaredHingeLossTest extends SmoothLossContract {

    @Override
    Loss loss(RandomGenerator rng) {
        return Losses.squaredHinge();
    }

    @Override
    List<Loss> sweepLosses() {
        return List.of(Losses.squaredHinge());
    }

    @Override
    TargetDomain expectedDomain() {
        return TargetDomain.BINARY;
    }

    @Override
    Response expectedResponse() {
        return Response.MARGIN;
    }

    @Override
    double[] kinks(Loss loss, double y) {
        return new double[] {y > 0 ? 1.0 : -1.0};
    }

    @Override
    double[] steepestPoint(Loss loss) {
        return new double[] {0.0, 1.0};
    }

    /** 1 − s z, exact. */
    private static BigDecimal gap(double z, double y) {
        return BigDecimal.ONE.subtract(exact(y > 0 ? z : -z));
    }

    @Override
    boolean valueExceedsMax(Loss loss, double z, double y) {
        BigDecimal g = gap(z, y);
        return g.signum() > 0 && g.multiply(g).compareTo(MAX) > 0;
    }

    @Override
    boolean derivativeExceedsMax(Loss loss, double z, double y) {
        BigDecimal g = gap(z, y);
        return g.signum() > 0 && g.multiply(BigDecimal.valueOf(2)).compareTo(MAX) > 0;
    }

    @Test
    void knownValues() {
        // Elementary: max(0, 1 − s z)² and −2 s max(0, 1 − s z).
        Loss loss = Losses.squaredHinge();
        assertEquals(0.25, loss.value(0.5, 1), 0.0);
        assertEquals(-1.0, loss.derivative(0.5, 1), 0.0);
        assertEquals(2.25, loss.value(0.5, -1), 0.0);
        assertEquals(3.0, loss.derivative(0.5, -1), 0.0);
        assertEquals(0.0, loss.value(1.5, 1), 0.0);
        assertEquals(0.0, loss.derivative(1.5, 1), 0.0);
        assertEquals(2.0, loss.smoothness(), 0.0);
    }
}
