package dev.riskmin.diagnostics.estimator;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.diagnostics.Monitor;
import dev.riskmin.testing.LeastSquaresProblem;
import org.junit.jupiter.api.Test;

import java.util.Locale;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Cadences: a fixed cadence fires at steps 0, k, 2k, …; a budget keeps a monitor's probe evaluations
 * within its share of the fit's gradient evaluations (the 1 % default is this library's choice,
 * common practice, no source).
 */
class CadenceTest {
    private static final LeastSquaresProblem PROBLEM = LeastSquaresProblem.gaussian(41, 2000, 10, 0.3);

    @Test
    void fixedCadenceFiresOnMultiplesOfItsStep() {
        Cadence.Pacer pacer = Cadence.every(5).start(1);
        int fired = 0;
        for (long t = 0; t < 100; t++) {
            if (pacer.due(t, 0)) {
                assertEquals(0, t % 5);
                fired++;
            }
        }
        assertEquals(20, fired);
        assertFalse(Cadence.never().start(0).due(0, Long.MAX_VALUE));
    }

    @Test
    void budgetWaitsUntilTheExpectedCostFitsTheShare() {
        Cadence.Pacer pacer = Cadence.share(0.01).start(50);
        assertFalse(pacer.due(0, 4_999));
        assertTrue(pacer.due(0, 5_000));
        pacer.charge(80);   // the measurement cost more than expected: the next one is expected at 80
        assertFalse(pacer.due(1, 15_999));
        assertTrue(pacer.due(1, 16_000));
        pacer.charge(0);    // another monitor paid: the expectation stays
        assertEquals(80, pacer.expected());
        assertEquals(80, pacer.spent());
    }

    @Test
    void defaultMonitorsStayWithinTheirBudgets() {
        // 200 epochs of n = 2000 at B = 10: 400,000 fit evaluations; a full gradient costs 2,000.
        long fitEvaluations = 0;
        NoiseMonitor noise = NoiseMonitor.defaults();
        fitEvaluations = check(noise, 0.02);
        assertTrue(noise.probes() > 300, "noise probes " + noise.probes());
        AngleMonitor angle = AngleMonitor.defaults();
        check(angle, 0.01);
        assertEquals(2, angle.probes()); // 1 % of 400,000 pays for two full gradients
        LossMonitor loss = LossMonitor.defaults();
        // 1 % for the exact objective, about 1 % for the paired subsample trend (64 rows every 4
        // epochs), and the step-0 baseline (one full gradient, 0.5 % here).
        check(loss, 0.03);
        assertEquals(2, loss.objectiveMeasurements());
        assertEquals(400_000, fitEvaluations);
    }

    @Test
    void budgetLearnsTheCostOfAnIndependentReferenceBatch() {
        // n = 2000 above a full-gradient limit of 100: the reference is a batch of 512, so the angle
        // monitor's probes cost 512 and a 1 % budget of 400,000 evaluations pays for 7 of them
        // (the first waits for the assumed full-gradient cost of 2,000).
        AngleMonitor angle = AngleMonitor.defaults();
        Diagnostics diagnostics =
                Diagnostics.builder().monitor(angle).fullGradientLimit(100).referenceBatch(512).build();
        Fit fit = fit(diagnostics);
        assertTrue(fit.probeEvaluations() <= 0.01 * fit.gradientEvaluations());
        assertEquals(7, angle.probes());
    }

    @Test
    void invalidCadencesAreRejectedNamingTheValue() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> Cadence.every(0));
        assertTrue(e.getMessage().contains("(0)"), e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> Cadence.share(1.5));
        assertTrue(e.getMessage().contains("(1.5)"), e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> Cadence.share(Double.NaN));
        assertTrue(e.getMessage().contains("NaN"), e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> NoiseMonitor.defaults().withSmoothing(0));
        assertTrue(e.getMessage().contains("smoothing (0.0)"), e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> NoiseMonitor.defaults().withStrata(new int[] {0, -2}));
        assertTrue(e.getMessage().contains("strata[1] (-2)"), e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> AngleMonitor.certified(new double[] {1, Double.NaN}, 0));
        assertTrue(e.getMessage().contains("optimum[1] (NaN)"), e.getMessage());
        assertEquals(Cadence.every(3), Cadence.every(3));
        assertEquals("every 3 steps", Cadence.every(3).toString());
    }

    private static long check(Monitor monitor, double share) {
        Diagnostics diagnostics = Diagnostics.builder().monitor(monitor).build();
        Fit fit = fit(diagnostics);
        double used = (double) fit.probeEvaluations() / fit.gradientEvaluations();
        System.out.println(String.format(Locale.ROOT, "budget, %s: %d probe evaluations = %.3f%% of %d",
                monitor.name(), fit.probeEvaluations(), 100 * used, fit.gradientEvaluations()));
        assertTrue(used <= share, monitor.name() + " used " + used + " of the fit's evaluations");
        assertTrue(fit.probeEvaluations() > 0, monitor.name() + " never probed");
        return fit.gradientEvaluations();
    }

    private static Fit fit(Diagnostics diagnostics) {
        return Minimizer.builder().batchSize(10).stepSize(1e-3).epochs(200).seed(1).build()
                .fit(PROBLEM.data, FitOptions.listeners(diagnostics));
    }
}
