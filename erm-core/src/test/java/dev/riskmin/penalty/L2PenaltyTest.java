package dev.riskmin.penalty;

import org.junit.jupiter.api.Test;

import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

class L2PenaltyTest extends PenaltyContract {

    @Override
    Penalty penalty(RandomGenerator rng) {
        return Penalty.l2(rng.nextInt(10) == 0 ? 0.0 : 2.0 * rng.nextDouble());
    }

    @Test
    void knownValuesAndShrinkage() {
        // (λ/2)‖w‖² with λ = 0.5, w = (3, −4): 0.25·25 = 6.25; gradient λw; prox v/(1 + ελ) (elementary).
        Penalty r = Penalty.l2(0.5);
        double[] w = {3, -4};
        assertEquals(6.25, r.value(w, 0, 2), 0.0);
        double[] g = new double[2];
        r.addSmoothGradient(w, 0, 2, 2.0, g);
        assertArrayEquals(new double[] {3, -4}, g, 0.0);
        double[] u = w.clone();
        r.fullProximal(u, 0, 2, 2.0);
        assertArrayEquals(new double[] {1.5, -2}, u, 0.0);
        double[] same = w.clone();
        r.proximalStep(same, 0, 2, 2.0);
        assertArrayEquals(w, same, 0.0);
        assertTrue(r.smooth());
        assertEquals("l2(0.5)", r.name());
    }
}
