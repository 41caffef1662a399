package dev.riskmin.penalty;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.function.Executable;

import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

class ElasticNetPenaltyTest extends PenaltyContract {

    @Override
    Penalty penalty(RandomGenerator rng) {
        return Penalty.elasticNet(2.0 * rng.nextDouble(), 2.0 * rng.nextDouble());
    }

    @Test
    void knownValuesOfTheProximalOperator() {
        // Zou & Hastie (2005); METHODS §8: sign(v) max(|v| − ελ₁, 0)/(1 + ελ₂). With λ₁ = 0.5,
        // λ₂ = 1, ε = 2: v = (3, −4, 0.5) ↦ (2/3, −1, 0); R(v) = 0.5·7.5 + 0.5·25.25 = 16.375.
        Penalty r = Penalty.elasticNet(0.5, 1.0);
        double[] v = {3, -4, 0.5};
        assertEquals(16.375, r.value(v, 0, 3), 1e-15);
        double[] u = v.clone();
        r.fullProximal(u, 0, 3, 2.0);
        assertArrayEquals(new double[] {2.0 / 3, -1, 0}, u, 1e-16);
        assertEquals(0.5, r.l1Strength(), 0.0);
        assertEquals(1.0, r.l2Strength(), 0.0);
        assertEquals("elastic-net(l1=0.5, l2=1.0)", r.name());
    }

    private static void rejects(Executable factory, String expectedMessage) {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, factory);
        assertEquals(expectedMessage, e.getMessage());
    }

    @Test
    void badStrengthsAreRejectedNamingTheOption() {
        rejects(() -> Penalty.l2(-1.0), "l2Strength (-1.0) must be finite and >= 0");
        rejects(() -> Penalty.l2(Double.POSITIVE_INFINITY), "l2Strength (Infinity) must be finite and >= 0");
        rejects(() -> Penalty.l1(Double.NaN), "l1Strength (NaN) must be finite and >= 0");
        rejects(() -> Penalty.l1(-0.5), "l1Strength (-0.5) must be finite and >= 0");
        rejects(() -> Penalty.elasticNet(-0.5, 1.0), "l1Strength (-0.5) must be finite and >= 0");
        rejects(() -> Penalty.elasticNet(1.0, Double.NaN), "l2Strength (NaN) must be finite and >= 0");
    }
}
