package dev.riskmin.loss;

import org.junit.jupiter.api.Test;

import java.util.List;
import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertEquals;

class LogisticLossTest extends SmoothLossContract {

    @Override
    Loss loss(RandomGenerator rng) {
        return Losses.logistic();
    }

    @Override
    List<Loss> sweepLosses() {
        return List.of(Losses.logistic());
    }

    @Override
    TargetDomain expectedDomain() {
        return TargetDomain.PROPORTION;
    }

    @Override
    Response expectedResponse() {
        return Response.LOGISTIC;
    }

    @Override
    double[] steepestPoint(Loss loss) {
        // ℓ'' = σ(z)(1 − σ(z)) peaks at 1/4 at z = 0 (METHODS §11 checks).
        return new double[] {0.0, 1.0};
    }

    @Test
    void knownValues() {
        // Elementary calculus: log(1 + e^0) = log 2 and σ(0) = 1/2 for every label form.
        Loss loss = Losses.logistic();
        for (double y : new double[] {-1, 0, 1, 0.5}) {
            assertEquals(Math.log(2), loss.value(0, y), 1e-16, "y = " + y);
        }
        assertEquals(0.5, loss.derivative(0, 0), 0.0);
        assertEquals(0.5, loss.derivative(0, -1), 0.0);
        assertEquals(-0.5, loss.derivative(0, 1), 0.0);
        // Elementary calculus: log(1 + e^u) = u + log(1 + e^−u), so the loss at z = −800, y = 1 is 800
        // up to e^−800, and at z = 800, y = 1 it is e^−800 ≈ 0 (underflows).
        assertEquals(800.0, loss.value(-800, 1), 0.0);
        assertEquals(800.0, loss.value(800, 0), 0.0);
        assertEquals(0.0, loss.value(800, 1), 0.0);
        // Elementary calculus: log(1 + e^−2) and the derivative −σ(−2) = −1/(1 + e^2).
        assertEquals(Math.log1p(Math.exp(-2)), loss.value(2, 1), 1e-16);
        assertEquals(-1 / (1 + Math.exp(2)), loss.derivative(2, 1), 1e-16);
        // −σ(−40) ≈ −4.25e−18 keeps full relative accuracy (σ(40) − 1 would round to 0).
        double tail = Math.exp(-40) / (1 + Math.exp(-40));
        assertEquals(-tail, loss.derivative(40, 1), 1e-15 * tail);
        assertEquals(tail, loss.derivative(-40, 0), 1e-15 * tail);
        // A proportion y = 0.25: log(1 + e^z) − y z at z = 1 (elementary).
        assertEquals(Math.log1p(Math.E) - 0.25, loss.value(1, 0.25), 1e-15);
        assertEquals(0.25, loss.smoothness(), 0.0);
    }
}
