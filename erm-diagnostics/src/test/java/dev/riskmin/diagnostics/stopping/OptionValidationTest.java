package dev.riskmin.diagnostics.stopping;

import dev.riskmin.method.UpdateRule;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.function.Executable;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** Every option of every stopping test is validated, and the message names the option and its value. */
class OptionValidationTest {

    private static void rejects(String fragment, Executable call) {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, call);
        assertTrue(e.getMessage().contains(fragment), "message '" + e.getMessage() + "' lacks '" + fragment + "'");
    }

    @Test
    void gradientNormOptions() {
        rejects("tolerance (-1.0)", () -> GradientNormCriterion.absolute(-1));
        rejects("tolerance (NaN)", () -> GradientNormCriterion.absolute(Double.NaN));
        rejects("relativeTolerance (1.0)", () -> GradientNormCriterion.relative(1.0));
        rejects("epochCadence (0)", () -> GradientNormCriterion.defaults().everyEpochs(0));
        rejects("stepCadence (0)", () -> GradientNormCriterion.defaults().everySteps(0));
        rejects("estimateBatch (0)", () -> GradientNormCriterion.defaults().estimatedBeyondLimit(0));
    }

    @Test
    void stalledObjectiveOptions() {
        rejects("windowEpochs (0)", () -> StalledObjectiveCriterion.of(0, 1e-3));
        rejects("relativeTolerance (0.0)", () -> StalledObjectiveCriterion.of(3, 0.0));
        rejects("epochCadence (-2)", () -> StalledObjectiveCriterion.defaults().everyEpochs(-2));
    }

    @Test
    void heldOutOptions() {
        rejects("epochsWithoutImprovement (0)", () -> HeldOutWorseningCriterion.of(0, 0.0));
        rejects("relativeTolerance (-0.1)", () -> HeldOutWorseningCriterion.of(3, -0.1));
    }

    @Test
    void pflugOptions() {
        rejects("burnInSteps (-1)", () -> PflugCriterion.defaults().withBurnIn(-1, 1.0));
        rejects("burnInEpochs (Infinity)", () -> PflugCriterion.defaults().withBurnIn(10, Double.POSITIVE_INFINITY));
        rejects("cutFactor (1.0)", () -> PflugCriterion.defaults().withCutFactor(1.0));
        rejects("haltAfterCuts (-1)", () -> PflugCriterion.defaults().haltingAfterCuts(-1));
        rejects("pairStride (0)", () -> PflugCriterion.defaults().pairStride(0));
    }

    @Test
    void fluctuationDissipationOptions() {
        rejects("delta (0.0)", () -> FluctuationDissipationCriterion.defaults().withBand(0.0, 0.2));
        rejects("gamma (1.0)", () -> FluctuationDissipationCriterion.defaults().withBand(0.02, 1.0));
        rejects("cutFactor (0.0)", () -> FluctuationDissipationCriterion.defaults().withCutFactor(0.0));
        rejects("minSamples (7)", () -> FluctuationDissipationCriterion.defaults().withMinSamples(7));
        rejects("windowCapacity (3)", () -> FluctuationDissipationCriterion.defaults().withWindowCapacity(3));
        rejects("epochCadence (0)", () -> FluctuationDissipationCriterion.defaults().everyEpochs(0));
        rejects("stepCadence (0)", () -> FluctuationDissipationCriterion.defaults().everySteps(0));
        rejects("haltAfterCuts (-3)", () -> FluctuationDissipationCriterion.defaults().haltingAfterCuts(-3));
    }

    @Test
    void normTestOptions() {
        rejects("theta (1.5)", () -> NormTestCriterion.defaults().withTheta(1.5));
        rejects("stepCadence (0)", () -> NormTestCriterion.defaults().everySteps(0));
        rejects("maxBatch (1)", () -> NormTestCriterion.defaults().withMaxBatch(1));
    }

    /** The update-rule names the fluctuation–dissipation test recognises (the core's own names). */
    @Test
    void momentumIsReadFromTheUpdateRuleName() {
        assertEquals(0.0, FluctuationDissipationCriterion.momentumOf(UpdateRule.sgd().name()), 0.0);
        assertEquals(0.9, FluctuationDissipationCriterion.momentumOf(UpdateRule.heavyBall(0.9).name()), 0.0);
        assertTrue(Double.isNaN(FluctuationDissipationCriterion.momentumOf(UpdateRule.nesterov(0.9).name())));
        assertTrue(Double.isNaN(FluctuationDissipationCriterion.momentumOf(UpdateRule.adam().name())));
    }
}
