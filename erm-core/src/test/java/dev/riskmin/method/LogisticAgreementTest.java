package dev.riskmin.method;

import dev.riskmin.Fit;
import dev.riskmin.Minimizer;
import dev.riskmin.data.Dataset;
import dev.riskmin.loss.Losses;
import dev.riskmin.objective.LinearObjective;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.reference.NewtonSolution;
import dev.riskmin.reference.NewtonSolver;
import dev.riskmin.reference.ProximalGradient;
import dev.riskmin.step.StepSchedule;
import dev.riskmin.testing.Cases;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.List;
import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Logistic regression with an L2 penalty on a generated problem (n = 10,000, d = 50): every update
 * rule reaches within 1e-6 relative objective of the Newton (IRLS) reference (McCullagh &amp;
 * Nelder 1989; METHODS §12: "SGD, SVRG and SAGA solutions converge to the Newton solution"). With an
 * L1 penalty, the proximal rules give exact zeros where the reference — FISTA to a 1e-12 gradient
 * mapping (Beck &amp; Teboulle 2009) — has them.
 */
class LogisticAgreementTest {
    private static final int N = 10_000;
    private static final int D = 50;
    private static final double L2 = 1e-3;
    private static Dataset data;
    private static double reference;

    @BeforeAll
    static void problem() {
        RandomGenerator rng = Cases.rng(2024);
        double[][] x = Cases.gaussianMatrix(rng, N, D);
        double[] w = Cases.gaussianVector(rng, D, 2.0 / Math.sqrt(D));
        data = Dataset.builder().features(x).targets(Cases.asDoubles(Cases.logisticLabels(rng, x, w, -0.3))).build();
        NewtonSolution newton = NewtonSolver.logistic().withL2(L2).solve(data);
        reference = newton.objectiveValue();
        assertTrue(newton.gradientNorm() < 1e-10, "Newton gradient norm " + newton.gradientNorm());
    }

    record Rule(String name, Minimizer.Builder builder) {
        @Override
        public String toString() {
            return name;
        }
    }

    static List<Rule> rules() {
        return List.of(
                new Rule("sgd", Minimizer.builder().batchSize(500).schedule(StepSchedule.inverseTime(1.0, L2))
                        .averaging(Averaging.tail(0.5)).epochs(400)),
                new Rule("heavy-ball", Minimizer.builder().updateRule(UpdateRule.heavyBall(0.9)).batchSize(500)
                        .schedule(StepSchedule.inverseTime(0.1, L2)).averaging(Averaging.tail(0.5)).epochs(400)),
                new Rule("nesterov", Minimizer.builder().updateRule(UpdateRule.nesterov(0.9)).batchSize(500)
                        .schedule(StepSchedule.inverseTime(0.1, L2)).averaging(Averaging.tail(0.5)).epochs(400)),
                new Rule("adagrad", Minimizer.builder().updateRule(UpdateRule.adaGrad()).batchSize(500)
                        .stepSize(0.5).averaging(Averaging.tail(0.5)).epochs(400)),
                new Rule("adam", Minimizer.builder().updateRule(UpdateRule.adam()).batchSize(500)
                        .schedule(StepSchedule.inverseTime(0.05, 0.02)).averaging(Averaging.tail(0.5)).epochs(400)),
                new Rule("svrg", Minimizer.builder().updateRule(UpdateRule.svrg()).batchSize(10).epochs(40)),
                new Rule("saga", Minimizer.builder().updateRule(UpdateRule.saga()).epochs(40)));
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("rules")
    void everyRuleReachesTheNewtonObjective(Rule rule) {
        Fit fit = rule.builder().loss(Losses.logistic()).penalty(Penalty.l2(L2)).seed(8).build().fit(data);
        double gap = (fit.finalObjective() - reference) / reference;
        System.out.printf("logistic + L2, %s: relative objective gap %.2e to Newton after %.0f epochs (%d ms)%n",
                rule, gap, fit.epochs(), fit.wallTime().toMillis());
        assertTrue(gap < 1e-6 && gap > -1e-12, rule + ": gap " + gap);
    }

    @Test
    void l1GivesExactZerosWhereTheReferenceHasThem() {
        double l1 = 0.02;
        LinearObjective objective = LinearObjective.of(data, Losses.logistic(), Penalty.l1(l1), true);
        double[] ref = ProximalGradient.defaults().solve(objective, new double[D + 1]).parameters();
        int zeros = 0;
        for (int j = 0; j < D; j++) {
            zeros += ref[j] == 0 ? 1 : 0;
        }
        assertTrue(zeros > 5 && zeros < D - 5, "the test needs a mix of zeros and non-zeros, got " + zeros);
        for (UpdateRule rule : List.of(UpdateRule.saga(), UpdateRule.svrg())) {
            Fit fit = Minimizer.builder().loss(Losses.logistic()).penalty(Penalty.l1(l1)).updateRule(rule)
                    .epochs(60).seed(3).build().fit(data);
            double[] h = fit.parameters();
            int agree = 0;
            for (int j = 0; j < D; j++) {
                assertEquals(ref[j] == 0, h[j] == 0, rule.name() + ": coordinate " + j + " is " + h[j]
                        + ", reference " + ref[j]);
                agree++;
            }
            System.out.printf("logistic + L1 (%.2f), %s: zero pattern matches the reference on all %d coefficients"
                    + " (%d zeros)%n", l1, rule.name(), agree, zeros);
        }
    }
}
