package dev.riskmin.loss;

import org.junit.jupiter.api.Test;

import java.util.List;
import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertEquals;

class EpsilonInsensitiveLossTest extends LossContract {

    @Override
    Loss loss(RandomGenerator rng) {
        return Losses.epsilonInsensitive(rng.nextInt(4) == 0 ? 0.0 : 2.0 * rng.nextDouble());
    }

    @Override
    List<Loss> sweepLosses() {
        return List.of(Losses.epsilonInsensitive(0.0), Losses.epsilonInsensitive(0.1), Losses.epsilonInsensitive(1e300));
    }

    @Override
    TargetDomain expectedDomain() {
        return TargetDomain.REAL;
    }

    @Override
    Response expectedResponse() {
        return Response.IDENTITY;
    }

    private static double epsilon(Loss loss) {
        return ((EpsilonInsensitiveLoss) loss).epsilon();
    }

    @Override
    double[] kinks(Loss loss, double y) {
        return new double[] {y - epsilon(loss), y + epsilon(loss)};
    }

    @Override
    double[] steepestPoint(Loss loss) {
        return new double[] {epsilon(loss), 0.0};
    }

    @Test
    void knownValues() {
        // Elementary calculus with ε = 0.5: |r| = 2 gives 1.5 (slope ±1), |r| = 0.3 lies in the tube.
        Loss loss = Losses.epsilonInsensitive(0.5);
        assertEquals(1.5, loss.value(3, 1), 0.0);
        assertEquals(1.0, loss.derivative(3, 1), 0.0);
        assertEquals(1.5, loss.value(-1, 1), 0.0);
        assertEquals(-1.0, loss.derivative(-1, 1), 0.0);
        assertEquals(0.0, loss.value(1.3, 1), 0.0);
        assertEquals(0.0, loss.derivative(1.3, 1), 0.0);
        assertEquals(0.0, loss.derivative(1.5, 1), 0.0);
        assertEquals("epsilon-insensitive(epsilon=0.5)", loss.name());
    }

    @Test
    void zeroTubeIsTheAbsoluteLoss() {
        // Elementary: max(0, |r| − 0) = |r|.
        Loss tube = Losses.epsilonInsensitive(0.0);
        Loss absolute = Losses.absolute();
        for (double z = -3; z <= 3; z += 0.25) {
            assertEquals(absolute.value(z, 0.5), tube.value(z, 0.5), 0.0);
            assertEquals(absolute.derivative(z, 0.5), tube.derivative(z, 0.5), 0.0);
        }
    }
}
