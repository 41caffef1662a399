package dev.riskmin.loss;

import org.junit.jupiter.api.Test;

import java.util.List;
import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertEquals;

class SquaredLossTest extends SmoothLossContract {

    @Override
    Loss loss(RandomGenerator rng) {
        return Losses.squared();
    }

    @Override
    List<Loss> sweepLosses() {
        return List.of(Losses.squared());
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
    double[] steepestPoint(Loss loss) {
        return new double[] {0.0, 0.0};
    }

    @Override
    boolean valueExceedsMax(Loss loss, double z, double y) {
        return halfSquareExceedsMax(exact(z).subtract(exact(y)));
    }

    @Override
    boolean derivativeExceedsMax(Loss loss, double z, double y) {
        return exact(z).subtract(exact(y)).abs().compareTo(MAX) > 0;
    }

    @Test
    void knownValues() {
        // Elementary calculus: (3 − 1)²/2 = 2 with derivative 2; (−1 − 2)²/2 = 4.5 with derivative −3.
        Loss loss = Losses.squared();
        assertEquals(2.0, loss.value(3, 1), 0.0);
        assertEquals(2.0, loss.derivative(3, 1), 0.0);
        assertEquals(4.5, loss.value(-1, 2), 0.0);
        assertEquals(-3.0, loss.derivative(-1, 2), 0.0);
        assertEquals(1.0, loss.smoothness(), 0.0);
    }
}
