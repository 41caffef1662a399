package dev.riskmin.step;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.riskmin.testing.Cases;
import java.util.random.RandomGenerator;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

/** Each schedule's formula at hand-computed points (elementary arithmetic). */
class StepScheduleFormulaTest {

    @Test
    void constantIsConstant() {
        StepSchedule s = StepSchedule.constant(0.1);
        assertEquals(0.1, s.stepSize(0));
        assertEquals(0.1, s.stepSize(1_000_000_000L));
        assertEquals("constant(0.1)", s.name());
    }

    @Test
    void inverseTimeAtHandComputedPoints() {
        // ε_t = ε0/(1 + λ ε0 t) (Bottou 2012): ε0 = 0.5, λ = 0.01 gives 1 + 0.005 t in the denominator.
        StepSchedule s = StepSchedule.inverseTime(0.5, 0.01);
        assertEquals(0.5, s.stepSize(0));
        assertEquals(1.0 / 3, s.stepSize(100), 1e-15);
        assertEquals(1.0 / 6, s.stepSize(400), 1e-15);
        assertEquals(0.5 / 5001, s.stepSize(1_000_000), 1e-18);
        assertEquals(0.5, StepSchedule.inverseTime(0.5, 0).stepSize(1_000_000), "lambda = 0 is constant");
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds50")
    void inverseTimeEqualsOneOverLambdaTimesShiftedTime(long seed) {
        // METHODS §5 check: ε0/(1 + λ ε0 t) = 1/(λ (t + t0)) with t0 = 1/(λ ε0) (Bottou 2012).
        RandomGenerator rng = Cases.rng(seed);
        double eps0 = Math.exp(2 * rng.nextGaussian());
        double lambda = 1e-3 * Math.exp(2 * rng.nextGaussian());
        StepSchedule s = StepSchedule.inverseTime(eps0, lambda);
        double t0 = 1 / (lambda * eps0);
        for (long t : new long[] {0, 1, 7, 100, 12_345, 1_000_000_000L, rng.nextLong(1L << 40)}) {
            double expected = 1 / (lambda * (t + t0));
            assertEquals(expected, s.stepSize(t), 1e-13 * expected, "t=" + t);
        }
    }

    @Test
    void polynomialAtHandComputedPoints() {
        // ε_t = ε0 (1 + t/t0)^(−p)
        StepSchedule s = StepSchedule.polynomial(2, 10, 0.5);
        assertEquals(2.0, s.stepSize(0));
        assertEquals(1.0, s.stepSize(30), 1e-15);
        assertEquals(2 / Math.sqrt(10), s.stepSize(90), 1e-15);
        assertEquals(0.25, StepSchedule.polynomial(1, 1, 1).stepSize(3), 1e-16);
        assertEquals(0.125, StepSchedule.polynomial(1, 2, 1.5).stepSize(6), 1e-16);
        assertEquals(3.0, StepSchedule.polynomial(3, 5, 0).stepSize(77), "power 0 is constant");
    }

    @Test
    void stepDecayAtHandComputedPoints() {
        // ε_t = ε0 γ^floor(t/s) (METHODS §5)
        StepSchedule s = StepSchedule.stepDecay(1, 0.5, 10);
        assertEquals(1.0, s.stepSize(0));
        assertEquals(1.0, s.stepSize(9));
        assertEquals(0.5, s.stepSize(10));
        assertEquals(0.5, s.stepSize(19));
        assertEquals(0.25, s.stepSize(25));
        assertEquals(Math.scalb(1.0, -10), s.stepSize(100));
        assertEquals(0.3, StepSchedule.stepDecay(0.3, 1, 1).stepSize(12345), "factor 1 is constant");
    }

    @Test
    void everyScheduleIsFiniteAndNonNegativeFarOut() {
        StepSchedule[] schedules = {StepSchedule.constant(0.1), StepSchedule.inverseTime(1, 1),
                StepSchedule.polynomial(1, 1, 3), StepSchedule.stepDecay(1, 0.1, 1),
                StepSchedule.cosineRestarts(1, 0, 1, 2), StepSchedule.cosineRestarts(1, 0.1, 3, 1.0000001),
                StepSchedule.warmUp(StepSchedule.constant(1), 1_000)};
        for (StepSchedule s : schedules) {
            for (long t : new long[] {0, 1, 1L << 20, 1L << 40, Long.MAX_VALUE}) {
                double eps = s.stepSize(t);
                assertTrue(Double.isFinite(eps) && eps >= 0, s.name() + " at t=" + t + " gives " + eps);
            }
        }
    }
}
