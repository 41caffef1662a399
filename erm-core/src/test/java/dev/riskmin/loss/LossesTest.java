package dev.riskmin.loss;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.function.Executable;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertSame;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

class LossesTest {

    private static void rejects(Executable factory, String expectedMessage) {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, factory);
        assertEquals(expectedMessage, e.getMessage());
    }

    @Test
    void huberRejectsThresholdsThatAreNotFiniteAndPositive() {
        rejects(() -> Losses.huber(-1.0), "delta (-1.0) must be finite and > 0");
        rejects(() -> Losses.huber(0.0), "delta (0.0) must be finite and > 0");
        rejects(() -> Losses.huber(Double.NaN), "delta (NaN) must be finite and > 0");
        rejects(() -> Losses.huber(Double.POSITIVE_INFINITY), "delta (Infinity) must be finite and > 0");
    }

    @Test
    void pinballRejectsLevelsOutsideTheOpenUnitInterval() {
        rejects(() -> Losses.pinball(0.0), "tau (0.0) must be in (0.0, 1.0)");
        rejects(() -> Losses.pinball(1.0), "tau (1.0) must be in (0.0, 1.0)");
        rejects(() -> Losses.pinball(-0.5), "tau (-0.5) must be in (0.0, 1.0)");
        rejects(() -> Losses.pinball(Double.NaN), "tau (NaN) must be in (0.0, 1.0)");
    }

    @Test
    void epsilonInsensitiveRejectsNegativeOrNonFiniteWidths() {
        rejects(() -> Losses.epsilonInsensitive(-0.1), "epsilon (-0.1) must be finite and >= 0");
        rejects(() -> Losses.epsilonInsensitive(Double.NaN), "epsilon (NaN) must be finite and >= 0");
        rejects(() -> Losses.epsilonInsensitive(Double.POSITIVE_INFINITY), "epsilon (Infinity) must be finite and >= 0");
    }

    @Test
    void smoothedHingeRejectsWidthsThatAreNotFiniteAndPositive() {
        rejects(() -> Losses.smoothedHinge(0.0), "gamma (0.0) must be finite and > 0");
        rejects(() -> Losses.smoothedHinge(-2.0), "gamma (-2.0) must be finite and > 0");
        rejects(() -> Losses.smoothedHinge(Double.NaN), "gamma (NaN) must be finite and > 0");
        rejects(() -> Losses.smoothedHinge(Double.POSITIVE_INFINITY), "gamma (Infinity) must be finite and > 0");
    }

    @Test
    void factoriesKeepTheirParameters() {
        assertEquals(0.7, ((HuberLoss) Losses.huber(0.7)).delta(), 0.0);
        assertEquals(0.25, ((PinballLoss) Losses.pinball(0.25)).tau(), 0.0);
        assertEquals(0.0, ((EpsilonInsensitiveLoss) Losses.epsilonInsensitive(0.0)).epsilon(), 0.0);
        assertEquals(0.3, ((SmoothedHingeLoss) Losses.smoothedHinge(0.3)).gamma(), 0.0);
        assertEquals(Losses.huber(0.7), Losses.huber(0.7));
        assertEquals(Losses.huber(0.7).hashCode(), Losses.huber(0.7).hashCode());
        assertNotEquals(Losses.huber(0.7), Losses.huber(0.8));
        assertNotEquals(Losses.pinball(0.5), Losses.smoothedHinge(0.5));
        assertSame(Losses.hinge(), Losses.hinge());
    }

    @Test
    void parameterFreeLossesHaveDistinctNames() {
        Object[] all = {Losses.squared(), Losses.absolute(), Losses.poisson(), Losses.logistic(), Losses.hinge(),
            Losses.squaredHinge(), Losses.softmax(), Losses.multiclassHinge()};
        java.util.Set<String> names = new java.util.HashSet<>();
        for (Object loss : all) {
            assertTrue(names.add(loss.toString()), "duplicate name " + loss);
        }
    }
}
