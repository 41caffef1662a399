package dev.riskmin.diagnostics.stopping;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.diagnostics.Decision;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.diagnostics.EventFilter;
import dev.riskmin.diagnostics.EventKind;
import dev.riskmin.diagnostics.StoppingEvent;
import dev.riskmin.sampling.Sampling;
import dev.riskmin.testing.LeastSquaresProblem;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.ArrayList;
import java.util.List;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The norm test (Byrd, Chin, Nocedal &amp; Wu 2012; METHODS §4) on a noise-dominated least-squares
 * problem (n = 20,000, d = 10, target noise 5, starting batch 2, drawn with replacement, ε = 0.02,
 * checked at every step): the batch grows toward B<sub>simple</sub>/θ², with B<sub>simple</sub> = tr Σ/‖G‖²
 * computed exactly at the end point from all n per-sample gradients. θ = 0.5 here: the sample form
 * settles at about (1 − θ²) B<sub>simple</sub>/θ² (derived; see {@link NormTestCriterion}), which is within
 * the factor 2 of B<sub>simple</sub>/θ² only for θ² ≤ ½.
 */
class NormTestBatchGrowthTest {
    private static final int N = 20_000;
    private static final int D = 10;
    private static final double THETA = 0.5;

    /** After 80 steps the batch is within a factor 2 of B<sub>simple</sub>/θ² (or capped at n, if that is below it). */
    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void batchGrowsTowardTheNoiseScaleOverThetaSquared(long seed) {
        LeastSquaresProblem problem = LeastSquaresProblem.gaussian(seed, N, D, 5.0);
        List<StoppingEvent> events = new ArrayList<>();
        Diagnostics diagnostics = Diagnostics.builder()
                .monitor(NormTestCriterion.defaults().withTheta(THETA).everySteps(1))
                .subscribe(e -> events.add((StoppingEvent) e), EventFilter.of(EventKind.STOPPING))
                .build();
        Fit fit = Minimizer.builder().stepSize(0.02).batchSize(2).sampling(Sampling.withReplacement()).maxSteps(80)
                .seed(seed).build().fit(problem.data, FitOptions.listeners(diagnostics));
        double target = noiseScale(problem, fit.lastIterate()) / (THETA * THETA);
        int batch = fit.finalBatchSize();
        long grown = events.stream().filter(e -> e.decision() == Decision.GROW_BATCH).count();
        assertTrue(grown > 0);
        assertEquals(grown, diagnostics.summary().batchIncreases);
        for (StoppingEvent e : events) {
            assertEquals(e.decision() == Decision.GROW_BATCH, e.statistic() > e.threshold(), e.toString());
        }
        if (batch == N) {
            assertTrue(target >= N / 2.0, "capped at n = " + N + " although B_simple/theta^2 = " + target);
        } else {
            double ratio = batch / target;
            assertTrue(ratio >= 0.5 && ratio <= 2, "final batch " + batch + " vs B_simple/theta^2 " + target);
        }
    }

    /** A longer run drives B<sub>simple</sub>/θ² beyond n: the batch stops at the cap n (sampling with replacement, default cap). */
    @Test
    void batchStopsAtTheCapWhenTheNoiseScaleExceedsIt() {
        long seed = 3;
        LeastSquaresProblem problem = LeastSquaresProblem.gaussian(seed, N, D, 5.0);
        Diagnostics diagnostics = Diagnostics.builder()
                .monitor(NormTestCriterion.defaults().withTheta(THETA).everySteps(1)).build();
        Fit fit = Minimizer.builder().stepSize(0.02).batchSize(2).sampling(Sampling.withReplacement()).maxSteps(200)
                .seed(seed).build().fit(problem.data, FitOptions.listeners(diagnostics));
        assertEquals(N, fit.finalBatchSize());
        assertTrue(noiseScale(problem, fit.lastIterate()) / (THETA * THETA) > N);
    }

    /** B<sub>simple</sub> = tr Σ/‖G‖², Σ = (1/n) Σ<sub>i</sub> (g<sub>i</sub> − G)(g<sub>i</sub> − G)ᵀ, from all per-sample gradients at h. */
    static double noiseScale(LeastSquaresProblem problem, double[] h) {
        int p = D + 1;
        double[] g = new double[p];
        double meanSquare = 0;
        for (int i = 0; i < N; i++) {
            double r = h[D] - problem.y[i];
            for (int j = 0; j < D; j++) {
                r += problem.x[i][j] * h[j];
            }
            double norm2 = r * r;
            for (int j = 0; j < D; j++) {
                g[j] += r * problem.x[i][j] / N;
                norm2 += r * r * problem.x[i][j] * problem.x[i][j];
            }
            g[D] += r / N;
            meanSquare += norm2 / N;
        }
        double g2 = 0;
        for (double v : g) {
            g2 += v * v;
        }
        return (meanSquare - g2) / g2;
    }
}
