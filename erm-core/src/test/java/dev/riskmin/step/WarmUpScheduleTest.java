package dev.riskmin.step;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.riskmin.testing.Cases;
import java.util.random.RandomGenerator;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

/**
 * Linear warm-up (Goyal et al., arXiv:1706.02677, 2017): ε_t = inner(t)(t + 1)/W for t &lt; W, then
 * inner(t). METHODS §5 check: monotone, ends exactly at the target.
 */
class WarmUpScheduleTest {

    @Test
    void rampsLinearlyToAConstantTarget() {
        StepSchedule s = StepSchedule.warmUp(StepSchedule.constant(0.4), 10);
        assertEquals(0.04, s.stepSize(0), 1e-17);
        assertEquals(0.2, s.stepSize(4), 1e-16);
        assertEquals(0.4, s.stepSize(9), 0.0, "the ramp ends exactly at the target");
        for (long t = 1; t < 30; t++) {
            assertTrue(s.stepSize(t) >= s.stepSize(t - 1), "ramp decreases at t=" + t);
        }
        for (long t = 10; t < 30; t++) {
            assertEquals(0.4, s.stepSize(t), 0.0);
        }
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds50")
    void endsExactlyAtTheInnerScheduleAndFollowsIt(long seed) {
        RandomGenerator rng = Cases.rng(seed);
        long steps = 1 + rng.nextInt(2_000);
        StepSchedule inner = StepSchedule.inverseTime(Math.exp(rng.nextGaussian()), 1e-4 * Math.exp(rng.nextGaussian()));
        StepSchedule s = StepSchedule.warmUp(inner, steps);
        assertEquals(inner.stepSize(steps - 1), s.stepSize(steps - 1), 0.0, "last warm-up step");
        for (long t = steps; t < steps + 100; t++) {
            assertEquals(inner.stepSize(t), s.stepSize(t), 0.0);
        }
        // (t + 1)/(1 + λ ε0 t) increases when λ ε0 < 1, so this ramp is monotone.
        for (long t = 1; t < steps; t++) {
            assertTrue(s.stepSize(t) >= s.stepSize(t - 1), "ramp decreases at t=" + t);
            assertTrue(s.stepSize(t) <= inner.stepSize(t));
        }
        assertEquals(inner.robbinsMonro(), s.robbinsMonro());
    }

    @Test
    void oneWarmUpStepIsTheInnerSchedule() {
        StepSchedule inner = StepSchedule.polynomial(0.3, 10, 0.7);
        StepSchedule s = StepSchedule.warmUp(inner, 1);
        for (long t = 0; t < 50; t++) {
            assertEquals(inner.stepSize(t), s.stepSize(t), 0.0);
        }
        assertTrue(s.name().contains(inner.name()));
    }
}
