package dev.riskmin.loss;

import org.junit.jupiter.api.Test;

import java.util.List;
import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertEquals;

class AbsoluteLossTest extends LossContract {

    @Override
    Loss loss(RandomGenerator rng) {
        return Losses.absolute();
    }

    @Override
    List<Loss> sweepLosses() {
        return List.of(Losses.absolute());
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
    void knownValues() {
        // Elementary calculus: |3 − (−2)| = 5 with slope +1; |−4 − 1| = 5 with slope −1; 0 at the kink.
        Loss loss = Losses.absolute();
        assertEquals(5.0, loss.value(3, -2), 0.0);
        assertEquals(1.0, loss.derivative(3, -2), 0.0);
        assertEquals(5.0, loss.value(-4, 1), 0.0);
        assertEquals(-1.0, loss.derivative(-4, 1), 0.0);
        assertEquals(0.0, loss.value(2.5, 2.5), 0.0);
        assertEquals(0.0, loss.derivative(2.5, 2.5), 0.0);
        // The derivative compares z with y, so it stays ±1 when z − y overflows.
        assertEquals(1.0, loss.derivative(Double.MAX_VALUE, -Double.MAX_VALUE), 0.0);
        assertEquals(Double.POSITIVE_INFINITY, loss.smoothness(), 0.0);
    }
}
