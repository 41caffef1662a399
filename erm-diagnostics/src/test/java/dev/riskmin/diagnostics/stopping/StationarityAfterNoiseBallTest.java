package dev.riskmin.diagnostics.stopping;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.StopReason;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.diagnostics.Monitor;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.sampling.Sampling;
import dev.riskmin.testing.Cases;
import org.junit.jupiter.api.Test;

import java.util.Arrays;
import java.util.Locale;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The two stationarity tests on strongly convex least squares with a constant step (real fits through
 * {@link Minimizer}, batches drawn with replacement), each set to halt at its first detection so that
 * the fit's step count is the detection time t<sub>f</sub>. The transientSteps T is predicted by
 * {@link NoiseBallProblem} from the contraction (1 − εμ) along the slowest direction. A seed passes
 * when the test fires within the budget and T ≤ t<sub>f</sub> ≤ 10 T: not during the transientSteps, and
 * within a factor 10 of the predicted time (in the brief's (1 − εμ)<sup>t</sup> units, T′ = 2T, that is
 * T′/2 ≤ t<sub>f</sub> ≤ 5 T′). At least 95 of 100 seeds must pass.
 */
class StationarityAfterNoiseBallTest {
    private static final int SEEDS = 100;
    private static final double FACTOR = 10.0;

    /**
     * Pflug / Chee–Toulis (METHODS §4) on an isotropic problem (n = 2000, d = 50, noise 1; μ ≈ 0.7),
     * ε = 0.05, B = 64, starting at gap<sub>0</sub> = 20 × ball (T ≈ 42 steps). The burn-in is shortened
     * to 15 steps (the default, max(1000 steps, 1 epoch), would outlast the whole transientSteps and make
     * the check vacuous).
     */
    @Test
    void pflugFiresAfterTheIteratesReachTheNoiseBall() {
        double[] ratios = new double[SEEDS];
        double[] gaps = new double[SEEDS];
        int pass = 0;
        int k = 0;
        for (long seed : Cases.seeds(SEEDS).toArray()) {
            NoiseBallProblem q = NoiseBallProblem.of(seed, 2000, 50, 1.0, 1.0, 0.08, 64, 20.0);
            Monitor test = PflugCriterion.defaults().withBurnIn(10, 0.0).haltingAfterCuts(0);
            Fit fit = fit(q, 0.08, 64, UpdateRule.sgd(), test, seed);
            ratios[k] = fit.steps() / q.transientSteps;
            gaps[k] = q.gapOverBall(fit.finalObjective());
            if (fit.stopReason() == StopReason.CONVERGED && ratios[k] >= 1 && ratios[k] <= FACTOR) {
                pass++;
            }
            k++;
        }
        report("pflug", pass, ratios, gaps);
        assertTrue(pass >= 95, "pflug: " + pass + " of " + SEEDS + " seeds fired within [T, 10T]; t/T = "
                + Arrays.toString(ratios));
    }

    /**
     * The fluctuation–dissipation test with its defaults (δ = 0.02, γ = 0.2, once per epoch of 125
     * steps, ≥ 1,000 values; METHODS §4) on an ill-conditioned problem (n = 2000, d = 4, feature 0
     * scaled by 0.15: μ ≈ 0.02, so T ≈ 2,000 steps and the first tests fall inside the transientSteps),
     * ε = 0.05, B = 16, gap<sub>0</sub> = 100 × ball. The problem is translated so that h* = 0: the
     * variance of ⟨h, g⟩ grows with ‖h*‖ and an off-origin optimum would need a far larger window.
     */
    @Test
    void fluctuationDissipationTestFiresAfterTheIteratesReachTheNoiseBall() {
        double[] ratios = new double[SEEDS];
        double[] gaps = new double[SEEDS];
        int pass = 0;
        int k = 0;
        for (long seed : Cases.seeds(SEEDS).toArray()) {
            NoiseBallProblem q = NoiseBallProblem.of(seed, 2000, 4, 1.0, 0.15, 0.05, 16, 100.0);
            Monitor test = FluctuationDissipationCriterion.defaults().haltingAfterCuts(0);
            Fit fit = fit(q, 0.05, 16, UpdateRule.sgd(), test, seed);
            ratios[k] = fit.steps() / q.transientSteps;
            gaps[k] = q.gapOverBall(fit.finalObjective());
            if (fit.stopReason() == StopReason.CONVERGED && ratios[k] >= 1 && ratios[k] <= FACTOR) {
                pass++;
            }
            k++;
        }
        report("fluctuation-dissipation", pass, ratios, gaps);
        assertTrue(pass >= 95, "fluctuation-dissipation: " + pass + " of " + SEEDS
                + " seeds fired within [T, 10T]; t/T = " + Arrays.toString(ratios));
    }

    /**
     * The caveat of Pesme, Dieuleveut &amp; Flammarion (ICML 2020, arXiv:2007.00534): on the
     * ill-conditioned problem above, the fast directions settle within tens of steps and their negative
     * successive-gradient products outweigh the slow direction's drift, so Pflug's test (default
     * burn-in) fires at the end of its burn-in while the gap is still many times the ball. This pins the
     * documented limitation: if it ever stops holding, the javadoc caveat must be revisited.
     */
    @Test
    void pflugFiresDuringTheTransientWhenTheSlowDirectionLags() {
        int early = 0;
        int seeds = 20;
        for (long seed : Cases.seeds(seeds).toArray()) {
            NoiseBallProblem q = NoiseBallProblem.of(seed, 2000, 4, 1.0, 0.15, 0.05, 16, 100.0);
            Fit fit = fit(q, 0.05, 16, UpdateRule.sgd(), PflugCriterion.defaults().haltingAfterCuts(0), seed);
            if (fit.stopReason() == StopReason.CONVERGED && fit.steps() < q.transientSteps
                    && q.gapOverBall(fit.finalObjective()) > 4) {
                early++;
            }
        }
        assertTrue(early >= 18, early + " of " + seeds + " seeds fired during the transientSteps with gap > 4 x ball");
    }

    /**
     * With heavy-ball momentum μ = 0.5 the test identifies the rule and uses the momentum form of the
     * relation (METHODS §4); it still fires only after the transientSteps. (With the plain-SGD form the
     * residual would keep a mean of about μ/(1 − μ) v̄, far outside the band.)
     */
    @Test
    void fluctuationDissipationTestUsesTheMomentumFormForHeavyBall() {
        int pass = 0;
        int seeds = 20;
        String[] detail = {""};
        for (long seed : Cases.seeds(seeds).toArray()) {
            NoiseBallProblem q = NoiseBallProblem.of(seed, 2000, 4, 1.0, 0.15, 0.05, 16, 100.0);
            Monitor test = FluctuationDissipationCriterion.defaults().haltingAfterCuts(0);
            Diagnostics diagnostics = Diagnostics.builder().monitor(test).subscribe(e -> {
                if (e instanceof dev.riskmin.diagnostics.StoppingEvent s) {
                    detail[0] = s.detail();
                }
            }).build();
            // Heavy ball with step ε moves like SGD with step ε/(1 − μ) on slow directions: 0.025/0.5 = 0.05, as above.
            Fit fit = Minimizer.builder().stepSize(0.025).batchSize(16).updateRule(UpdateRule.heavyBall(0.5))
                    .sampling(Sampling.withReplacement()).maxSteps((long) (FACTOR * q.transientSteps)).seed(seed)
                    .explosionFactor(1e300).build()
                    .fit(q.data, FitOptions.builder().initialParameters(q.start).listener(diagnostics).build());
            double ratio = fit.steps() / q.transientSteps;
            if (fit.stopReason() == StopReason.CONVERGED && ratio >= 1 && ratio <= FACTOR) {
                pass++;
            }
        }
        assertTrue(detail[0].contains("heavy ball, momentum 0.5"), detail[0]);
        assertTrue(pass >= 18, pass + " of " + seeds + " heavy-ball seeds fired within [T, 10T]");
    }

    private static Fit fit(NoiseBallProblem q, double step, int batch, UpdateRule rule, Monitor test, long seed) {
        Diagnostics diagnostics = Diagnostics.builder().monitor(test).build();
        Fit fit = Minimizer.builder().stepSize(step).batchSize(batch).updateRule(rule)
                .sampling(Sampling.withReplacement()).maxSteps((long) Math.ceil(FACTOR * q.transientSteps) + 1).seed(seed)
                .explosionFactor(1e300).build()
                .fit(q.data, FitOptions.builder().initialParameters(q.start).listener(diagnostics).build());
        if (fit.stopReason() == StopReason.CONVERGED) {
            assertEquals(test.name(), diagnostics.summary().stoppedBy);
        }
        return fit;
    }

    private static void report(String name, int pass, double[] ratios, double[] gaps) {
        double[] r = ratios.clone();
        double[] g = gaps.clone();
        Arrays.sort(r);
        Arrays.sort(g);
        int n = r.length;
        System.out.println(String.format(Locale.ROOT, "%s: %d/%d in [T, 10T]; t/T q05 %.2f q50 %.2f q95 %.2f;"
                        + " gap/ball at firing q50 %.2f q95 %.2f", name, pass, n, r[n / 20], r[n / 2], r[n - 1 - n / 20],
                g[n / 2], g[n - 1 - n / 20]));
    }
}
