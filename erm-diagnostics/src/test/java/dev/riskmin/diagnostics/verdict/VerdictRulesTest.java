package dev.riskmin.diagnostics.verdict;

import dev.riskmin.StopReason;
import org.junit.jupiter.api.Test;

import java.util.Locale;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The verdict rules on summaries filled by hand: each condition, the order of the rules, the number
 * in each advice, and that unmeasured (NaN) figures never trigger a rule. Expected numbers follow
 * from the rules' formulas (see {@link VerdictRules}); the thresholds are this library's choices.
 */
class VerdictRulesTest {

    /** A run that stopped on its epoch budget with a step of 0.1 and a batch of 8 out of 1,000. */
    static RunSummary base() {
        RunSummary s = new RunSummary();
        s.stopReason = StopReason.EPOCH_BUDGET;
        s.stopDetail = "spent the budget of 5.0 epochs";
        s.steps = 625;
        s.epochs = 5;
        s.sampleCount = 1000;
        s.batchSize = 8;
        s.stepSize = 0.1;
        s.independentDraws = true;
        return s;
    }

    @Test
    void divergedRunGetsATenTimesSmallerStepAndItsDetail() {
        RunSummary s = base();
        s.stopReason = StopReason.DIVERGED;
        s.stopDetail = "the batch loss became Infinity at step 40";
        s.stepSize = 0.3;
        s.successiveCosine = -0.9; // divergence outranks every other finding
        s.noiseScale = 1e4;
        HealthVerdict v = VerdictRules.judge(s);
        assertEquals(Condition.DIVERGED, v.condition());
        assertEquals("cut the step size tenfold, to about 0.03", v.advice());
        assertTrue(v.summary().contains("the batch loss became Infinity at step 40"), v.summary());
        assertEquals(0.03, v.figures().get("suggestedStepSize"), 1e-15);
    }

    @Test
    void divergedRunWithAKnownSmoothnessConstantAdvisesTheSafeStep() {
        // 1/L_max is a step plain SGD cannot overshoot with when every sample's gradient is
        // L_max-Lipschitz (METHODS §9, §11); a tenth of an absurd step would still be absurd.
        RunSummary s = base();
        s.stopReason = StopReason.DIVERGED;
        s.stopDetail = "the batch loss became Infinity at step 3";
        s.stepSize = 1e6;
        s.largestSmoothness = 4.0;
        HealthVerdict v = VerdictRules.judge(s);
        assertEquals(Condition.DIVERGED, v.condition());
        assertEquals(0.25, v.figures().get("suggestedStepSize"), 0.0);
        assertTrue(v.advice().contains("0.25 = 1/L_max") && v.advice().contains("L_max is 4"), v.advice());
        s.stepSize = 1.0; // a tenth of it (0.1) is already below 1/L_max: keep the tenfold cut
        assertEquals(0.1, VerdictRules.judge(s).figures().get("suggestedStepSize"), 1e-15);
    }

    @Test
    void divergedRunWithoutAKnownStepStillAdvisesATenfoldCut() {
        RunSummary s = base();
        s.stopReason = StopReason.DIVERGED;
        s.stepSize = Double.NaN;
        HealthVerdict v = VerdictRules.judge(s);
        assertEquals(Condition.DIVERGED, v.condition());
        assertEquals("cut the step size tenfold", v.advice());
    }

    @Test
    void tinyGradientRatioIsConvergedWhateverTheNoiseAndOscillation() {
        RunSummary s = base();
        s.initialGradientNorm = 2.0;
        s.gradientNorm = 2e-3; // ratio 1e-3: at the threshold
        s.successiveCosine = -0.9;
        s.noiseScale = 1e6;
        s.recentRelativeDecrease = 0.0;
        HealthVerdict v = VerdictRules.judge(s);
        assertEquals(Condition.CONVERGED, v.condition(), v.toString());
        assertTrue(v.summary().contains("0.002") && v.summary().contains("0.001"), v.summary());

        s.gradientNorm = 2.2e-3; // just above: the oscillation now decides
        assertEquals(Condition.STEP_TOO_LARGE, VerdictRules.judge(s).condition());
    }

    @Test
    void opposedSuccessiveGradientsAreATooLargeStepWithTheDerivedSmallerStep() {
        RunSummary s = base();
        s.successiveCosine = -0.75; // eps*lambda ~ 1.5; divisor max(2, 3) = 3
        HealthVerdict v = VerdictRules.judge(s);
        assertEquals(Condition.STEP_TOO_LARGE, v.condition());
        assertTrue(v.advice().startsWith("cut the step size to about 0.0333 (a factor 3,"), v.advice());
        assertTrue(v.summary().contains("-0.75") && v.summary().contains("≈ 1.5 > 1"), v.summary());

        s.successiveCosine = -0.55; // divisor max(2, 2.2) = 2.2
        assertTrue(VerdictRules.judge(s).advice().startsWith("cut the step size to about 0.0455"));

        s.successiveCosine = -0.5; // the bound itself does not trigger
        assertNotEquals(Condition.STEP_TOO_LARGE, VerdictRules.judge(s).condition());
    }

    @Test
    void manyAscentsWithABatchCoveringTheNoiseAreATooLargeStepHalved() {
        RunSummary s = base();
        s.batchSize = 64;
        s.noiseScale = 20;
        s.ascentShare = 0.4;
        HealthVerdict v = VerdictRules.judge(s);
        assertEquals(Condition.STEP_TOO_LARGE, v.condition());
        assertEquals("halve the step size, to about 0.05", v.advice());
        assertTrue(v.summary().startsWith("40% of the steps"), v.summary());

        s.noiseScale = 200; // noise may explain the rises: no longer a step verdict
        assertNotEquals(Condition.STEP_TOO_LARGE, VerdictRules.judge(s).condition());
        s.noiseScale = Double.NaN; // unmeasured noise: the ascents alone do not decide
        assertNotEquals(Condition.STEP_TOO_LARGE, VerdictRules.judge(s).condition());
    }

    @Test
    void stalledRunWithNoiseFarAboveTheBatchIsNoiseDominatedWithTheNoiseScaleAsBatch() {
        RunSummary s = base();
        s.batchSize = 2;
        s.noiseScale = 37.3;
        s.recentRelativeDecrease = 1e-4;
        HealthVerdict v = VerdictRules.judge(s);
        assertEquals(Condition.NOISE_DOMINATED, v.condition(), v.toString());
        // With replacement B* = B_s = 37.3 -> 38; the step alternative is eps B/B* = 0.1 * 2/37.3.
        assertTrue(v.advice().startsWith("raise the batch size to about 38, or keep it and cut the step size to"
                + " about 0.00536"), v.advice());
        assertTrue(v.summary().contains("18.6 times"), v.summary()); // B_s/B
        assertEquals(38.0, v.figures().get("suggestedBatchSize"));
    }

    @Test
    void withoutReplacementTheSuggestedBatchCarriesTheFinitePopulationCorrection() {
        RunSummary s = base();
        s.independentDraws = false;
        s.sampleCount = 100;
        s.batchSize = 2;
        s.noiseScale = 37.3; // B* = 37.3 * 100/137.3 = 27.17 -> 28
        s.recentRelativeDecrease = 0;
        HealthVerdict v = VerdictRules.judge(s);
        assertEquals(Condition.NOISE_DOMINATED, v.condition());
        assertTrue(v.advice().startsWith("raise the batch size to about 28,"), v.advice());
        // (1 - B/n) B_s/B = 0.98 * 18.65 = 18.28
        assertTrue(v.summary().contains("18.3 times"), v.summary());

        s.noiseScale = 1e7; // B* -> n: the full batch
        assertTrue(VerdictRules.judge(s).advice().startsWith("use the full batch of about 100 samples"));
    }

    @Test
    void noiseScaleIsEstimatedFromTheDescentCosineWhenNotMeasured() {
        RunSummary s = base();
        s.batchSize = 4;
        s.meanCosine = 0.2; // B_s = B (1/c^2 - 1) = 4 * 24 = 96
        s.angleProbes = 10;
        s.recentRelativeDecrease = 0;
        HealthVerdict v = VerdictRules.judge(s);
        assertEquals(Condition.NOISE_DOMINATED, v.condition(), v.toString());
        assertTrue(v.advice().startsWith("raise the batch size to about 96,"), v.advice());
        assertTrue(v.summary().contains("estimated from the mean descent cosine 0.2"), v.summary());

        s.angleProbes = 4; // too few probes to lean on
        assertEquals(Condition.CONVERGED, VerdictRules.judge(s).condition());
    }

    @Test
    void noiseWithinTheFactorOrAnUnmeasuredTrendIsNotNoiseDominated() {
        RunSummary s = base();
        s.batchSize = 10;
        s.noiseScale = 40; // exactly 4 B: not above
        s.recentRelativeDecrease = 0;
        assertEquals(Condition.CONVERGED, VerdictRules.judge(s).condition());
        s.noiseScale = 400;
        s.recentRelativeDecrease = Double.NaN;
        HealthVerdict v = VerdictRules.judge(s);
        assertEquals(Condition.UNDETERMINED, v.condition());
        assertTrue(v.summary().startsWith("no objective trend was measured"), v.summary());
    }

    @Test
    void fallingObjectiveIsStillDescendingWithTwiceTheBudget() {
        RunSummary s = base();
        s.epochs = 3.5;
        s.steps = 437;
        s.noiseScale = 400; // noisy, but still falling: the trend decides
        s.recentRelativeDecrease = 0.05;
        s.latestObjective = 0.8125;
        HealthVerdict v = VerdictRules.judge(s);
        assertEquals(Condition.STILL_DESCENDING, v.condition());
        assertEquals("double the budget, to about 7 epochs (874 steps)", v.advice());
        assertTrue(v.summary().contains("by 5% over the last window, to 0.812"), v.summary());
    }

    @Test
    void aDecreaseWithinTwiceItsStandardErrorIsTooNoisyToJudge() {
        RunSummary s = base();
        s.recentRelativeDecrease = 0.01;
        s.recentDecreaseError = 0.006; // neither 0.01 - 0.012 > 0.001 nor 0.01 + 0.012 <= 0.001
        HealthVerdict noisy = VerdictRules.judge(s);
        assertEquals(Condition.UNDETERMINED, noisy.condition());
        assertTrue(noisy.summary().contains("too noisy"), noisy.summary());
        s.recentDecreaseError = 0.004; // bar 0.008
        HealthVerdict v = VerdictRules.judge(s);
        assertEquals(Condition.STILL_DESCENDING, v.condition());
        assertTrue(v.summary().contains("1% ± 0.4%"), v.summary());
        s.recentDecreaseError = Double.NaN;
        s.recentRelativeDecrease = 9e-4; // below the plain bar 1e-3
        assertEquals(Condition.CONVERGED, VerdictRules.judge(s).condition());
    }

    @Test
    void stalledRunIsConvergedWithTheFiguresBehindIt() {
        RunSummary s = base();
        s.recentRelativeDecrease = -2e-4;
        s.latestObjective = 0.25;
        s.gradientNorm = 0.05;
        s.initialGradientNorm = 2;
        HealthVerdict v = VerdictRules.judge(s);
        assertEquals(Condition.CONVERGED, v.condition());
        assertTrue(v.summary().contains("-0.02% over the last window") && v.summary().contains("0.025 of its first"),
                v.summary());
        assertEquals("nothing for the optimizer; validate the model on held-out data", v.advice());
    }

    @Test
    void emptySummaryClaimsNothingItDidNotMeasure() {
        HealthVerdict v = VerdictRules.judge(new RunSummary());
        assertEquals(Condition.UNDETERMINED, v.condition());
        assertTrue(v.summary().startsWith("no objective trend was measured"), v.summary());
        assertTrue(v.summary().contains("the fit still running"), v.summary());
        assertTrue(v.advice().startsWith("measure the objective's trend"), v.advice());
        assertFalse(v.figures().containsKey("suggestedBatchSize"));
    }

    @Test
    void textsUseADecimalPointWhateverTheDefaultLocale() {
        Locale saved = Locale.getDefault();
        try {
            Locale.setDefault(Locale.GERMANY);
            RunSummary s = base();
            s.successiveCosine = -0.55;
            HealthVerdict v = VerdictRules.judge(s);
            assertTrue(v.advice().contains("0.0455") && !v.advice().contains("0,0455"), v.advice());
            assertTrue(v.summary().contains("-0.55"), v.summary());
        } finally {
            Locale.setDefault(saved);
        }
    }

    @Test
    void significantDigitsAreThreeAndPlainInTheUsualRange() {
        // Expected strings: BigDecimal rounding to 3 digits (java.math, outside this library).
        assertEquals("0.005", VerdictRules.sig(0.005));
        assertEquals("1230", VerdictRules.sig(1234.5));
        assertEquals("0.333", VerdictRules.sig(1.0 / 3));
        assertEquals("42", VerdictRules.sig(42.0));
        assertEquals("1.5e-07", VerdictRules.sig(1.5e-7));
        assertEquals("-2.5e+08", VerdictRules.sig(-2.5e8));
        assertEquals("NaN", VerdictRules.sig(Double.NaN));
    }
}
