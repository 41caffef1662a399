package dev.riskmin.step;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.riskmin.data.Dataset;
import dev.riskmin.loss.Losses;
import dev.riskmin.objective.LinearObjective;
import dev.riskmin.objective.Objective;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.testing.Cases;
import java.util.List;
import java.util.random.RandomGenerator;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

/** Bottou's calibration (Bottou 2012, LNCS 7700; METHODS §5) on seeded least-squares problems. */
class StepCalibrationTest {

    private static LinearObjective leastSquares(RandomGenerator rng, int n, int d, double featureScale, Penalty penalty) {
        double[][] x = Cases.gaussianMatrix(rng, n, d);
        for (double[] row : x) {
            for (int j = 0; j < d; j++) {
                row[j] *= featureScale;
            }
        }
        double[] y = Cases.linearTargets(rng, x, Cases.gaussianVector(rng, d, 1.0 / featureScale), 1.0, 0.5);
        return LinearObjective.of(Dataset.of(x, y), Losses.squared(), penalty, true);
    }

    private static Calibration.Trial best(List<Calibration.Trial> trials) {
        Calibration.Trial best = null;
        for (Calibration.Trial trial : trials) {
            if (Double.isFinite(trial.score()) && (best == null || trial.score() < best.score())) {
                best = trial;
            }
        }
        return best;
    }

    /** Every trial after the first pair halves or doubles the step of an earlier one, starting from (ε, 2ε). */
    private static void assertTrialsFollowThePairRule(List<Calibration.Trial> trials, double initial) {
        assertTrue(trials.size() >= 3 && trials.size() <= StepCalibration.DEFAULT_MAX_TRIALS, "trials " + trials);
        assertEquals(initial, trials.get(0).stepSize());
        assertEquals(2 * initial, trials.get(1).stepSize());
        double ratio = trials.get(2).stepSize() < initial ? 0.5 : 2.0;
        double step = ratio < 1 ? initial : 2 * initial;
        for (int k = 2; k < trials.size(); k++) {
            step *= ratio;
            assertEquals(step, trials.get(k).stepSize(), 0.0, "trial " + k);
        }
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void chosenStepIsWithinFactorTwoOfTheBestTrial(long seed) {
        RandomGenerator rng = Cases.rng(seed);
        LinearObjective objective = leastSquares(rng, 2_000, 5, 1.0, Penalty.l2(1e-3));
        double[] h = new double[6];
        double[] before = h.clone();
        Calibration calibration = StepCalibration.of(1).calibrate(objective, h, rng);
        assertArrayEquals(before, h, "the starting parameters must not change");

        double chosen = calibration.stepSize();
        Calibration.Trial best = best(calibration.trials());
        assertTrue(Double.isFinite(chosen) && chosen > 0, calibration.toString());
        // The published rule keeps the smaller step of the final pair: the best trial or half of it.
        assertTrue(chosen >= best.stepSize() / 2 && chosen <= best.stepSize(), calibration.toString());
        // ε = 1 with rows of squared norm about 6 overshoots, so this problem exercises the halving branch.
        assertTrue(chosen < 1, calibration.toString());
        assertTrialsFollowThePairRule(calibration.trials(), 1.0);
        assertEquals(1000, calibration.trialSamples());
        assertEquals(1, calibration.batchSize());
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void smallInitialGuessDoublesUpToWithinFactorTwoOfTheBestTrial(long seed) {
        RandomGenerator rng = Cases.rng(seed);
        LinearObjective objective = leastSquares(rng, 1_500, 4, 0.5, Penalty.none());
        Calibration calibration = StepCalibration.of(10).withInitialStep(1e-4).withTrialSamples(600)
                .calibrate(objective, new double[5], rng);
        Calibration.Trial best = best(calibration.trials());
        assertTrue(calibration.trials().get(2).stepSize() > 2e-4, "expected the doubling branch: " + calibration);
        assertTrue(calibration.stepSize() >= best.stepSize() / 2 && calibration.stepSize() <= best.stepSize(),
                calibration.toString());
        assertTrialsFollowThePairRule(calibration.trials(), 1e-4);
        assertEquals(600, calibration.trialSamples());
        assertEquals(10, calibration.batchSize());
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void divergingLargeStepsStillGiveASmallFiniteStep(long seed) {
        // Rows of squared norm about 5·10⁴: any step above 2/L_i ≈ 4·10⁻⁵ blows up within the pass.
        RandomGenerator rng = Cases.rng(seed);
        LinearObjective objective = leastSquares(rng, 1_000, 5, 100.0, Penalty.none());
        Calibration calibration = StepCalibration.of(1).calibrate(objective, new double[6], rng);
        assertTrue(Double.isFinite(calibration.stepSize()) && calibration.stepSize() < 1e-3, calibration.toString());
        assertFalse(Double.isFinite(calibration.trials().get(0).score()), "ε = 1 should diverge: " + calibration);
        assertFalse(Double.isFinite(calibration.trials().get(1).score()), "ε = 2 should diverge: " + calibration);
        Calibration.Trial best = best(calibration.trials());
        assertTrue(calibration.stepSize() >= best.stepSize() / 2 && calibration.stepSize() <= best.stepSize(),
                calibration.toString());
        double[] h = new double[6];
        double start = objective.value(h);
        assertTrue(best.score() < start, "best score " + best.score() + " not below the start " + start);
    }

    @Test
    void fullBatchTrialScoresEqualThePenalizedObjectiveAfterOneProximalStep() {
        // With every sample in the trial and B = n, a trial is one proximal gradient step
        // h' = prox_{εR_prox}(h − ε ∇F_smooth(h)), and its score is L(h') (elementary).
        RandomGenerator rng = Cases.rng(42);
        LinearObjective objective = leastSquares(rng, 300, 4, 1.0, Penalty.elasticNet(0.05, 0.1));
        double[] h = Cases.gaussianVector(rng, 5, 1.0);
        Calibration calibration = StepCalibration.of(300).withTrialSamples(5_000).calibrate(objective, h, rng);
        assertEquals(300, calibration.trialSamples());
        double[] g = new double[5];
        objective.gradient(h, g);
        for (Calibration.Trial trial : calibration.trials()) {
            double[] w = h.clone();
            for (int j = 0; j < w.length; j++) {
                w[j] -= trial.stepSize() * g[j];
            }
            objective.proximalStep(w, trial.stepSize());
            double expected = objective.value(w);
            assertEquals(expected, trial.score(), 1e-10 * Math.max(1, Math.abs(expected)), "ε = " + trial.stepSize());
        }
    }

    @Test
    void sameSeedGivesTheSameCalibrationAndToStringReportsEveryTrial() {
        LinearObjective objective = leastSquares(Cases.rng(5), 1_200, 3, 1.0, Penalty.l2(0.01));
        StepCalibration calibration = StepCalibration.of(4);
        Calibration a = calibration.calibrate(objective, new double[4], Cases.rng(99));
        Calibration b = calibration.calibrate(objective, new double[4], Cases.rng(99));
        assertEquals(a, b);
        String text = a.toString();
        assertTrue(text.startsWith("stepSize=" + a.stepSize() + " (1000 samples, batch 4; trials: "), text);
        for (Calibration.Trial trial : a.trials()) {
            assertTrue(text.contains(trial.stepSize() + " -> " + trial.score()), text);
        }
        assertThrows(UnsupportedOperationException.class, () -> a.trials().add(new Calibration.Trial(1, 1)));
    }

    @Test
    void refusesWhenNoStepHasAFiniteScore() {
        LinearObjective objective = leastSquares(Cases.rng(6), 200, 3, 1.0, Penalty.none());
        double[] h = {1e200, 1e200, 1e200, 1e200}; // the loss itself overflows at h
        IllegalStateException e = assertThrows(IllegalStateException.class,
                () -> StepCalibration.of(1).calibrate(objective, h, Cases.rng(1)));
        assertTrue(e.getMessage().startsWith("step calibration found no step with a finite score in 40 trials"),
                e.getMessage());
    }

    @Test
    void refusesBadOptionsNamingThem() {
        assertEquals("batchSize (0) must be >= 1",
                assertThrows(IllegalArgumentException.class, () -> StepCalibration.of(0)).getMessage());
        assertEquals("trialSamples (0) must be >= 1", assertThrows(IllegalArgumentException.class,
                () -> StepCalibration.of(1).withTrialSamples(0)).getMessage());
        assertEquals("initialStep (-1.0) must be finite and > 0", assertThrows(IllegalArgumentException.class,
                () -> StepCalibration.of(1).withInitialStep(-1)).getMessage());
        assertEquals("initialStep (NaN) must be finite and > 0", assertThrows(IllegalArgumentException.class,
                () -> StepCalibration.of(1).withInitialStep(Double.NaN)).getMessage());
        assertEquals("maxTrials (1) must be >= 2", assertThrows(IllegalArgumentException.class,
                () -> StepCalibration.of(1).withMaxTrials(1)).getMessage());
        Objective objective = leastSquares(Cases.rng(7), 50, 3, 1.0, Penalty.none());
        assertEquals("h has 3 entries, but the objective has dimension 4", assertThrows(IllegalArgumentException.class,
                () -> StepCalibration.of(1).calibrate(objective, new double[3], Cases.rng(1))).getMessage());
    }
}
