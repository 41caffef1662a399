package dev.riskmin.loss;

import org.junit.jupiter.api.Test;

import java.util.List;
import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertEquals;

class HingeLossTest extends LossContract {

    @Override
    Loss loss(RandomGenerator rng) {
        return Losses.hinge();
    }

    @Override
    List<Loss> sweepLosses() {
        return List.of(Losses.hinge());
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
        return new double[] {1.0, 1.0};
    }

    @Test
    void knownValues() {
        // Elementary: max(0, 1 − s z) with s = +1 for y = 1 and s = −1 for y ∈ {0, −1}.
        Loss loss = Losses.hinge();
        assertEquals(0.5, loss.value(0.5, 1), 0.0);
        assertEquals(-1.0, loss.derivative(0.5, 1), 0.0);
        assertEquals(1.5, loss.value(0.5, 0), 0.0);
        assertEquals(1.0, loss.derivative(0.5, 0), 0.0);
        assertEquals(0.0, loss.value(2, 1), 0.0);
        assertEquals(0.0, loss.derivative(2, 1), 0.0);
        assertEquals(0.0, loss.value(1, 1), 0.0);
        assertEquals(0.0, loss.derivative(1, 1), 0.0);
        assertEquals(0.0, loss.derivative(-1, -1), 0.0);
    }
}
