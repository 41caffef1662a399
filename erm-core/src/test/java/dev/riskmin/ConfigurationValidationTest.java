package dev.riskmin;

import dev.riskmin.loss.Losses;
import dev.riskmin.method.Averaging;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.sampling.Sampling;
import dev.riskmin.step.StepSchedule;
import dev.riskmin.testing.LeastSquaresProblem;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.function.Executable;

import java.time.Duration;

import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Bad configuration fails when the Minimizer is built or when fit sees the data, with a message
 * naming the option and the value.
 */
class ConfigurationValidationTest {
    private static final LeastSquaresProblem PROBLEM = LeastSquaresProblem.gaussian(2, 50, 3, 0.1);

    private static void fails(Executable action, String... fragments) {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, action);
        for (String f : fragments) {
            assertTrue(e.getMessage().contains(f), "message '" + e.getMessage() + "' should contain '" + f + "'");
        }
    }

    @Test
    void batchSizeMustBePositive() {
        fails(() -> Minimizer.builder().batchSize(0), "batchSize", "0");
        fails(() -> Minimizer.builder().batchSize(-3), "batchSize", "-3");
    }

    @Test
    void batchSizeLargerThanNWithoutReplacementFailsAtFit() {
        Minimizer m = Minimizer.builder().batchSize(51).sampling(Sampling.withoutReplacement()).build();
        fails(() -> m.fit(PROBLEM.data), "batchSize", "51", "50");
    }

    @Test
    void stepSizesMustBeFinitePositive() {
        fails(() -> Minimizer.builder().stepSize(-0.1), "stepSize", "-0.1");
        fails(() -> Minimizer.builder().stepSize(Double.NaN), "stepSize", "NaN");
        fails(() -> StepSchedule.constant(-1.0), "-1.0");
        fails(() -> StepSchedule.inverseTime(Double.NaN, 0.1), "NaN");
    }

    @Test
    void emptyStrataAreRefused() {
        fails(() -> PROBLEM.data.withStrata(new int[50]).withStrata(twoStrataWithGap()), "stratum 1");
    }

    private static int[] twoStrataWithGap() {
        int[] s = new int[50];
        s[0] = 2;
        return s;
    }

    @Test
    void stratifiedSamplingOnRealTargetsWithoutStrataIsRefused() {
        Minimizer m = Minimizer.builder().sampling(Sampling.stratified()).build();
        fails(() -> m.fit(PROBLEM.data), "strata");
    }

    @Test
    void averagingThatStartsAfterTheBudgetEndsIsRefused() {
        fails(() -> Minimizer.builder().maxSteps(100).averaging(Averaging.polyakRuppert(100)).build(),
                "startStep", "100");
        Minimizer m = Minimizer.builder().epochs(1).averaging(Averaging.polyakRuppert(500)).build();
        fails(() -> m.fit(PROBLEM.data), "startStep", "500", "50 steps");
        Minimizer open = Minimizer.builder().timeLimit(Duration.ofSeconds(1)).averaging(Averaging.tail(0.2)).build();
        fails(() -> open.fit(PROBLEM.data), "tail", "budget");
    }

    @Test
    void budgetsMustBePositive() {
        fails(() -> Minimizer.builder().epochs(0), "epochs", "0");
        fails(() -> Minimizer.builder().maxSteps(0), "maxSteps", "0");
        fails(() -> Minimizer.builder().maxGradientEvaluations(-1), "maxGradientEvaluations", "-1");
        fails(() -> Minimizer.builder().timeLimit(Duration.ZERO), "timeLimit");
    }

    @Test
    void updateRuleParametersAreChecked() {
        fails(() -> UpdateRule.heavyBall(1.5), "momentum", "1.5");
        fails(() -> UpdateRule.adam(0.9, 0.999, -1e-8, 0), "delta");
        fails(() -> UpdateRule.svrg(0), "epochsPerSnapshot", "0");
        fails(() -> Averaging.exponential(1.0), "decay", "1.0");
    }

    @Test
    void targetOutsideTheLossDomainIsNamedAtFit() {
        Minimizer m = Minimizer.builder().loss(Losses.logistic()).build();
        double[] y = new double[50];
        y[17] = 2.0;
        fails(() -> m.fit(PROBLEM.x, y), "y[17]", "2.0");
    }
}
