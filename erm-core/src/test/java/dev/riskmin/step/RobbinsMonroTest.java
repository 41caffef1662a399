package dev.riskmin.step;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/**
 * Σ ε_t = ∞ and Σ ε_t² &lt; ∞ (Robbins &amp; Monro, Ann. Math. Statist. 22, 1951). For
 * ε_t = ε0 (1 + t/t0)^(−p) both hold iff p ∈ (½, 1]; p = ½ and p &gt; 1 each fail one (METHODS §5).
 */
class RobbinsMonroTest {

    @ParameterizedTest(name = "power={0}")
    @CsvSource({"0.25, false", "0.5, false", "0.75, true", "1.0, true", "1.5, false"})
    void polynomialFlagFollowsPower(double power, boolean expected) {
        assertEquals(expected, StepSchedule.polynomial(1, 1, power).robbinsMonro());
    }

    @Test
    void powerOneHalfLetsTheSumOfSquaresGrowLikeLogT() {
        // p = ½, t0 = 1: Σ_{t<T} ε_t² = Σ 1/(t + 1) = H_T = ln T + γ + O(1/T) (harmonic numbers, elementary),
        // unbounded: the second condition fails.
        StepSchedule s = StepSchedule.polynomial(1, 1, 0.5);
        int terms = 1_000_000;
        double squares = 0;
        for (int t = 0; t < terms; t++) {
            double eps = s.stepSize(t);
            squares += eps * eps;
        }
        double eulerGamma = 0.5772156649015329; // Euler–Mascheroni constant (from memory)
        assertEquals(Math.log(terms) + eulerGamma, squares, 1e-5);
    }

    @Test
    void powerAboveOneKeepsTheSumOfStepsBounded() {
        // p = 1.5, t0 = 1: Σ_{t≥0} (1 + t)^(−1.5) ≤ 1 + ∫_0^∞ (1 + t)^(−1.5) dt = 3 (integral test):
        // the first condition fails, so SGD can stop short of a minimizer.
        StepSchedule s = StepSchedule.polynomial(1, 1, 1.5);
        double sum = 0;
        for (int t = 0; t < 1_000_000; t++) {
            sum += s.stepSize(t);
        }
        assertTrue(sum < 3, "partial sum " + sum);
        assertTrue(sum > 2.6, "partial sum " + sum); // the terms are not all tiny either: ζ(1.5) ≈ 2.612
    }

    @Test
    void otherSchedulesReportOnlyWhatHolds() {
        assertTrue(StepSchedule.inverseTime(0.1, 1e-4).robbinsMonro());
        assertFalse(StepSchedule.inverseTime(0.1, 0).robbinsMonro());
        assertFalse(StepSchedule.constant(0.1).robbinsMonro());
        assertFalse(StepSchedule.stepDecay(0.1, 0.5, 100).robbinsMonro());
        assertFalse(StepSchedule.stepDecay(0.1, 1, 100).robbinsMonro());
        assertFalse(StepSchedule.cosineRestarts(0.1, 0.001, 100, 2).robbinsMonro());
        assertTrue(StepSchedule.warmUp(StepSchedule.inverseTime(0.1, 1e-4), 50).robbinsMonro());
        assertFalse(StepSchedule.warmUp(StepSchedule.constant(0.1), 50).robbinsMonro());
        assertTrue(StepSchedule.polynomial(1, 10, 0.6).scaled(0.5).robbinsMonro());
    }
}
