package dev.riskmin.penalty;

import org.junit.jupiter.api.Test;

import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;

class L1PenaltyTest extends PenaltyContract {

    @Override
    Penalty penalty(RandomGenerator rng) {
        return Penalty.l1(2.0 * rng.nextDouble());
    }

    @Test
    void knownValuesAndExactZeros() {
        // λ‖w‖₁ with λ = 0.5, w = (3, −4, 0.2): 3.6; soft thresholding at ελ = 1 gives (2, −3, 0),
        // an exact zero (Parikh & Boyd 2014, §6.5.2, from memory). The smooth gradient is 0.
        Penalty r = Penalty.l1(0.5);
        double[] w = {3, -4, 0.2};
        assertEquals(3.6, r.value(w, 0, 3), 1e-15);
        double[] u = w.clone();
        r.proximalStep(u, 0, 3, 2.0);
        assertArrayEquals(new double[] {2, -3, 0}, u, 0.0);
        double[] full = w.clone();
        r.fullProximal(full, 0, 3, 2.0);
        assertArrayEquals(u, full, 0.0);
        double[] g = {1, 1, 1};
        r.addSmoothGradient(w, 0, 3, 1.0, g);
        assertArrayEquals(new double[] {1, 1, 1}, g, 0.0);
        assertFalse(r.smooth());
        assertEquals("l1(0.5)", r.name());
    }
}
