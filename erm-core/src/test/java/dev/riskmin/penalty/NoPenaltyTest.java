package dev.riskmin.penalty;

import org.junit.jupiter.api.Test;

import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

class NoPenaltyTest extends PenaltyContract {

    @Override
    Penalty penalty(RandomGenerator rng) {
        return Penalty.none();
    }

    @Test
    void isZeroAndSmoothWithNoStrengths() {
        Penalty r = Penalty.none();
        assertEquals(0.0, r.value(new double[] {3, -4}, 0, 2), 0.0);
        assertEquals(0.0, r.l1Strength(), 0.0);
        assertEquals(0.0, r.l2Strength(), 0.0);
        assertTrue(r.smooth());
        assertEquals("none", r.name());
        assertEquals("none", Penalty.elasticNet(0, 0).name());
    }
}
