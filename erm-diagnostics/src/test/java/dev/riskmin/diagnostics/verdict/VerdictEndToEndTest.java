package dev.riskmin.diagnostics.verdict;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.StopReason;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.diagnostics.VerdictEvent;
import dev.riskmin.diagnostics.sink.TraceRecorder;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.sampling.Sampling;
import dev.riskmin.testing.LeastSquaresProblem;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.EigenDecomposition;
import org.junit.jupiter.api.Test;

import java.util.regex.Matcher;
import java.util.regex.Pattern;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Verdicts on real fits: Minimizer + Diagnostics with a test-scope monitor that fills the run
 * summary from the probe. Each test builds a run in one condition, checks the verdict's condition and
 * the number in its advice, and where it can, follows the advice and checks that it helps.
 */
class VerdictEndToEndTest {
    private static final Pattern ABOUT = Pattern.compile("about ([-+0-9.eE]+)");

    record Run(Fit fit, Diagnostics diagnostics, ProbeSummaryMonitor monitor, TraceRecorder recorder) {
        HealthVerdict verdict() {
            return diagnostics.verdict();
        }

        RunSummary summary() {
            return diagnostics.summary();
        }
    }

    static Run run(Minimizer minimizer, LeastSquaresProblem problem, int probeEvery) {
        ProbeSummaryMonitor monitor = new ProbeSummaryMonitor(probeEvery);
        TraceRecorder recorder = TraceRecorder.unbounded();
        Diagnostics diagnostics = Diagnostics.builder().monitor(monitor).subscribe(recorder).build();
        Fit fit = minimizer.fit(problem.data, FitOptions.listeners(diagnostics));
        assertTrue(diagnostics.failures().isEmpty(), diagnostics.failures().toString());
        return new Run(fit, diagnostics, monitor, recorder);
    }

    static double adviceNumber(HealthVerdict verdict) {
        Matcher m = ABOUT.matcher(verdict.advice());
        assertTrue(m.find(), verdict.toString());
        return Double.parseDouble(m.group(1));
    }

    /** λ<sub>max</sub> of H = (1/n) AᵀA, A = [X 1] (commons-math3 eigen decomposition: an outside reference). */
    static double largestCurvature(LeastSquaresProblem problem) {
        int n = problem.x.length;
        int p = problem.x[0].length + 1;
        double[][] h = new double[p][p];
        for (double[] row : problem.x) {
            for (int a = 0; a < p; a++) {
                double xa = a < p - 1 ? row[a] : 1;
                for (int b = 0; b < p; b++) {
                    h[a][b] += xa * (b < p - 1 ? row[b] : 1) / n;
                }
            }
        }
        return new EigenDecomposition(new Array2DRowRealMatrix(h)).getRealEigenvalues()[0];
    }

    @Test
    void overshootingStepIsJudgedTooLargeAndTheSuggestedStepNoLongerOvershoots() {
        LeastSquaresProblem problem = LeastSquaresProblem.gaussian(5, 2000, 4, 0.5);
        double lambda = largestCurvature(problem);
        double step = 1.6 / lambda;
        Minimizer.Builder b = Minimizer.builder().sampling(Sampling.withReplacement()).batchSize(64).epochs(10).seed(3);
        // Measured: successive cosine -0.718, suggested step 0.526 (a factor 2.87 below 1.51); with it
        // eps * lambdaMax = 0.56 and the cosine rises to -0.31.
        Run run = run(b.stepSize(step).build(), problem, 4);
        HealthVerdict v = run.verdict();
        assertEquals(Condition.STEP_TOO_LARGE, v.condition(), v.toString());
        double suggested = adviceNumber(v);
        double c = run.summary().successiveCosine;
        assertEquals(step / Math.max(2, -4 * c), suggested, 5e-3 * suggested, v.advice()); // three digits
        assertTrue(v.summary().contains(VerdictRules.sig(c)), v.summary());
        // The suggested step no longer overshoots the sharpest direction: ε λmax < 1 (λmax from commons-math3).
        assertTrue(suggested * lambda < 1, "suggested " + suggested + " x lambda " + lambda);
        Run again = run(b.stepSize(suggested).build(), problem, 4);
        assertNotEquals(Condition.STEP_TOO_LARGE, again.verdict().condition(), again.verdict().toString());
        assertTrue(again.summary().successiveCosine > VerdictRules.OSCILLATION_COSINE);
    }

    @Test
    void tinyBatchOnNoisyDataIsJudgedNoiseDominatedWithABatchNearTheNoiseScale() {
        LeastSquaresProblem problem = LeastSquaresProblem.gaussian(7, 2000, 4, 2.0);
        Minimizer.Builder b = Minimizer.builder().sampling(Sampling.withReplacement()).batchSize(1).epochs(3).seed(5);
        // Measured: noise scale 48.2 at the default step 0.0508 (the stationary balance predicts about
        // 2/(eps lambda) = 39 for lambda near 1, derived), so the advice is a batch of 49.
        Run run = run(b.build(), problem, 25);
        HealthVerdict v = run.verdict();
        assertEquals(Condition.NOISE_DOMINATED, v.condition(), v.toString());
        double batch = adviceNumber(v);
        assertEquals(Math.ceil(run.summary().noiseScale), batch, v.advice()); // with replacement: B* = B_s
        assertTrue(v.summary().contains(VerdictRules.sig(run.summary().noiseScale)), v.summary());
        // Following the advice lowers the noise floor: it scales as M/B (Bottou, Curtis & Nocedal 2018,
        // Thm 4.6), so a batch ~49 times larger should cut the excess objective L - L* (L* by QR,
        // commons-math3) by far more than the 10 asked here (measured: 0.296 -> 0.0029).
        double excess = run.monitor().meanRecentObjective() - problem.optimalObjective;
        Run again = run(b.batchSize((int) batch).build(), problem, 25);
        double excessAgain = again.monitor().meanRecentObjective() - problem.optimalObjective;
        assertTrue(excessAgain < excess / 10, "excess " + excess + " -> " + excessAgain);
    }

    @Test
    void shortBudgetIsJudgedStillDescendingWithTwiceTheEpochs() {
        LeastSquaresProblem problem = LeastSquaresProblem.gaussian(9, 2000, 4, 0.5);
        Run run = run(Minimizer.builder().sampling(Sampling.withReplacement()).batchSize(32).stepSize(0.005)
                .epochs(1).seed(2).build(), problem, 2);
        HealthVerdict v = run.verdict(); // measured: 20.7% +- 0.26% over the last window; advice 2.02 epochs
        assertEquals(Condition.STILL_DESCENDING, v.condition(), v.toString());
        double epochs = 2 * run.fit().epochs();
        assertEquals(epochs, adviceNumber(v), 5e-3 * epochs, v.advice()); // three significant digits
        assertTrue(v.advice().contains("(" + 2 * run.fit().steps() + " steps)"), v.advice());
        assertTrue(v.summary().contains(VerdictRules.sig(100 * run.summary().recentRelativeDecrease) + "%"),
                v.summary());
    }

    @Test
    void varianceReducedFitIsJudgedConverged() {
        LeastSquaresProblem problem = LeastSquaresProblem.gaussian(13, 500, 4, 0.5);
        Run run = run(Minimizer.builder().updateRule(UpdateRule.svrg()).epochs(20).seed(1).build(), problem, 50);
        HealthVerdict v = run.verdict(); // measured: gradient ratio 4.9e-15
        assertEquals(Condition.CONVERGED, v.condition(), v.toString());
        assertTrue(v.figures().get("gradientRatio") <= VerdictRules.CONVERGED_GRADIENT_RATIO, v.toString());
        assertTrue(v.advice().startsWith("nothing for the optimizer"), v.advice());
    }

    @Test
    void absurdStepIsJudgedDivergedWithTheSafeStep() {
        LeastSquaresProblem problem = LeastSquaresProblem.gaussian(17, 500, 4, 0.5);
        Run run = run(Minimizer.builder().stepSize(5.0).epochs(2).seed(1).build(), problem, 10);
        assertEquals(StopReason.DIVERGED, run.fit().stopReason(), run.fit().toString());
        HealthVerdict v = run.verdict();
        assertEquals(Condition.DIVERGED, v.condition(), v.toString());
        // Step 5 with L_max ≈ 19.9 (max ‖(x_i, 1)‖² of the data): 1/L_max is below a tenth of the step,
        // so the advice is the safe step 1/L_max, computed here independently from the rows.
        double lMax = 0;
        for (double[] row : problem.x) {
            double norm = 1;
            for (double v2 : row) {
                norm += v2 * v2;
            }
            lMax = Math.max(lMax, norm);
        }
        assertEquals(1 / lMax, v.figures().get("suggestedStepSize"), 1e-12, v.advice());
        assertEquals(Double.parseDouble(String.format(java.util.Locale.ROOT, "%.3g", 1 / lMax)), adviceNumber(v),
                1e-12, v.advice());
        assertTrue(v.summary().contains(run.fit().stopDetail()), v.summary());
        VerdictEvent published = run.recorder().latestVerdict().orElseThrow();
        assertEquals(v, published.verdict());
    }
}
