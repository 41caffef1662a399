package dev.riskmin.diagnostics.stopping;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.StopReason;
import dev.riskmin.data.Dataset;
import dev.riskmin.diagnostics.Decision;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.diagnostics.EventFilter;
import dev.riskmin.diagnostics.EventKind;
import dev.riskmin.diagnostics.StoppingEvent;
import dev.riskmin.hook.FitControl;
import dev.riskmin.hook.FitListener;
import dev.riskmin.hook.StepView;
import dev.riskmin.sampling.Sampling;
import dev.riskmin.testing.Cases;
import org.junit.jupiter.api.Test;

import java.util.ArrayList;
import java.util.List;
import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The sign argument behind Pflug's test, on f = (a/2)w² with additive gradient noise of variance s²
 * and step γ: the stationary E[g<sub>k</sub> g<sub>k+1</sub>] = −γ a s²/(2 − γ a) (derived, METHODS §4;
 * a = 2, s = 1, γ = 0.1 gives −1/9 = −0.1111). The model is a real fit: squared loss without
 * intercept on the single feature x<sub>i</sub> = √a, targets y<sub>i</sub> = (s/√a) ξ<sub>i</sub> with ξ
 * standardized to mean 0 and variance 1 over the n samples, drawn with replacement, so the per-sample
 * gradient is a w − s ξ<sub>i</sub> exactly.
 */
class SuccessiveGradientProductTest {
    private static final double A = 2.0;
    private static final double S = 1.0;
    private static final double GAMMA = 0.1;

    @Test
    void stationaryProductOfSuccessiveGradientsMatchesTheDerivedValueAndTheTestsSum() {
        int n = 1000;
        int steps = 200_000;
        RandomGenerator rng = Cases.rng(23);
        double[] xi = new double[n];
        double mean = 0;
        for (int i = 0; i < n; i++) {
            xi[i] = rng.nextGaussian();
            mean += xi[i] / n;
        }
        double var = 0;
        for (int i = 0; i < n; i++) {
            xi[i] -= mean;
            var += xi[i] * xi[i] / n;
        }
        double[][] x = new double[n][1];
        double[] y = new double[n];
        for (int i = 0; i < n; i++) {
            x[i][0] = Math.sqrt(A);
            y[i] = S / Math.sqrt(A) * xi[i] / Math.sqrt(var);
        }
        double[] gradients = new double[steps];
        FitListener recorder = new FitListener() {
            @Override
            public void step(StepView view, FitControl control) {
                gradients[(int) view.step()] = view.batchGradient(0);
            }
        };
        List<StoppingEvent> events = new ArrayList<>();
        Diagnostics diagnostics = Diagnostics.builder()
                .monitor(PflugCriterion.defaults().withBurnIn(Long.MAX_VALUE, 0.0))
                .subscribe(e -> events.add((StoppingEvent) e), EventFilter.of(EventKind.STOPPING))
                .build();
        Fit fit = Minimizer.builder().intercept(false).stepSize(GAMMA).sampling(Sampling.withReplacement())
                .maxSteps(steps).seed(29).build()
                .fit(Dataset.of(x, y), FitOptions.builder().listener(recorder).listener(diagnostics).build());
        assertEquals(StopReason.STEP_BUDGET, fit.stopReason());

        // The test's running sum equals the sum of products recorded independently.
        StoppingEvent last = events.get(events.size() - 1);
        assertEquals(Decision.CONTINUE, last.decision());
        int upTo = (int) last.step();
        double sum = 0;
        for (int k = 1; k < upTo; k++) {
            sum += gradients[k] * gradients[k - 1];
        }
        assertEquals(sum, last.statistic(), 1e-9 * Math.abs(sum));

        // The stationary mean product, after a burn-in of 100 steps (1/(γa) = 5 steps to mix), within
        // 4 standard errors; the standard error from the batch-means long-run variance of the products
        // (a CLT bound for a stationary, geometrically mixing series).
        int burn = 100;
        int count = steps - 1 - burn;
        double[] products = new double[count];
        double total = 0;
        for (int k = 0; k < count; k++) {
            products[k] = gradients[burn + k] * gradients[burn + k + 1];
            total += products[k];
        }
        double estimate = total / count;
        double standardError = Math.sqrt(BatchMeansEquivalence.longRunVariance(products, 0, count) / count);
        double expected = -GAMMA * A * S * S / (2 - GAMMA * A);
        assertEquals(-0.1111, expected, 1e-4);
        assertTrue(Math.abs(estimate - expected) <= 4 * standardError,
                "mean g_k g_(k+1) = " + estimate + ", expected " + expected + " +/- 4 x " + standardError);
        assertTrue(sum < 0, "the sum over the stationary run is negative: " + sum);
    }
}
