package dev.riskmin.diagnostics.stopping;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.StopReason;
import dev.riskmin.diagnostics.Decision;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.diagnostics.EventFilter;
import dev.riskmin.diagnostics.EventKind;
import dev.riskmin.diagnostics.StoppingEvent;
import dev.riskmin.hook.FitControl;
import dev.riskmin.hook.FitListener;
import dev.riskmin.hook.StepView;
import dev.riskmin.testing.LeastSquaresProblem;
import org.junit.jupiter.api.Test;

import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The gradient-norm test on a noiseless least-squares problem (interpolation: constant-step SGD
 * converges linearly to the exact optimum, so ‖∇L‖ falls through any tolerance), checked against a
 * separate listener that computes ‖∇L(h)‖ itself through the probe.
 */
class GradientNormCriterionTest {
    private static final LeastSquaresProblem PROBLEM = LeastSquaresProblem.gaussian(31, 300, 5, 0.0);

    /** A listener that records ‖∇L(h)‖ at the first step and at every epoch end, keyed by step. */
    static final class NormRecorder implements FitListener {
        final Map<Long, Double> norms = new HashMap<>();
        final List<Double> epochNorms = new ArrayList<>();
        final double[] g = new double[6];

        @Override
        public void step(StepView view, FitControl control) {
            if (view.step() == 0) {
                norms.put(0L, norm(view));
            }
        }

        @Override
        public void epochEnded(StepView view, FitControl control) {
            double norm = norm(view);
            norms.put(view.step(), norm);
            epochNorms.add(norm);
        }

        private double norm(StepView view) {
            view.probe().fullGradient(g);
            double s = 0;
            for (double v : g) {
                s += v * v;
            }
            return Math.sqrt(s);
        }
    }

    @Test
    void absoluteToleranceStopsAtTheFirstEpochBelowItAndNotBefore() {
        double tolerance = 1e-6;
        NormRecorder recorder = new NormRecorder();
        List<StoppingEvent> events = new ArrayList<>();
        Diagnostics diagnostics = Diagnostics.builder().monitor(GradientNormCriterion.absolute(tolerance))
                .subscribe(e -> events.add((StoppingEvent) e), EventFilter.of(EventKind.STOPPING)).build();
        Fit fit = Minimizer.builder().stepSize(0.005).epochs(200).seed(3).build()
                .fit(PROBLEM.data, FitOptions.builder().listener(recorder).listener(diagnostics).build());

        assertEquals(StopReason.CONVERGED, fit.stopReason());
        assertEquals("gradient-norm", diagnostics.summary().stoppedBy);
        // One event at the first step and one per epoch, each with the recorder's norm as statistic.
        assertEquals(recorder.epochNorms.size() + 1, events.size());
        for (StoppingEvent e : events) {
            Double norm = recorder.norms.get(e.step());
            assertNotNull(norm, "no recorded norm at step " + e.step());
            assertEquals(norm, e.statistic(), 1e-12 * norm);
            assertEquals(tolerance, e.threshold(), 0.0);
        }
        // Not before it should: every epoch before the last is above the tolerance, the last below.
        List<Double> norms = recorder.epochNorms;
        for (int e = 0; e < norms.size() - 1; e++) {
            assertTrue(norms.get(e) > tolerance, "epoch " + (e + 1) + ": " + norms.get(e));
            assertEquals(Decision.CONTINUE, events.get(e + 1).decision());
        }
        assertTrue(norms.get(norms.size() - 1) <= tolerance);
        assertEquals(Decision.STOP, events.get(events.size() - 1).decision());
        assertTrue(norms.size() > 3, "the run should take several epochs: " + norms.size());
        assertEquals(norms.get(norms.size() - 1), diagnostics.summary().gradientNorm, 0.0);
        assertEquals(recorder.norms.get(0L), diagnostics.summary().initialGradientNorm, 0.0);
    }

    @Test
    void relativeToleranceIsMeasuredAgainstTheGradientAtTheFirstStep() {
        double relative = 1e-5;
        NormRecorder recorder = new NormRecorder();
        List<StoppingEvent> events = new ArrayList<>();
        Diagnostics diagnostics = Diagnostics.builder().monitor(GradientNormCriterion.relative(relative).everyEpochs(2))
                .subscribe(e -> events.add((StoppingEvent) e), EventFilter.of(EventKind.STOPPING)).build();
        Fit fit = Minimizer.builder().stepSize(0.005).epochs(200).seed(4).build()
                .fit(PROBLEM.data, FitOptions.builder().listener(recorder).listener(diagnostics).build());

        assertEquals(StopReason.CONVERGED, fit.stopReason());
        double threshold = relative * recorder.norms.get(0L);
        List<Double> norms = recorder.epochNorms;
        assertEquals(0, norms.size() % 2, "stops only at the end of an even epoch");
        for (StoppingEvent e : events) {
            assertEquals(threshold, e.threshold(), 1e-12 * threshold);
        }
        for (int e = 1; e < norms.size() - 1; e += 2) { // the evaluated epochs 2, 4, … before the last
            assertTrue(norms.get(e) > threshold, "epoch " + (e + 1) + ": " + norms.get(e));
        }
        assertTrue(norms.get(norms.size() - 1) <= threshold);
        assertTrue(fit.stopDetail().contains("gradient norm"), fit.stopDetail());
    }

    @Test
    void inexactReferenceGradientIsRefusedByDefault() {
        Diagnostics diagnostics = Diagnostics.builder().fullGradientLimit(100)
                .monitor(GradientNormCriterion.absolute(1e-6)).build();
        Fit fit;
        try (QuietHost quiet = new QuietHost()) {
            fit = Minimizer.builder().epochs(2).build().fit(PROBLEM.data, FitOptions.listeners(diagnostics));
        }
        assertEquals(StopReason.EPOCH_BUDGET, fit.stopReason());
        assertEquals(1, diagnostics.failures().size());
        assertTrue(diagnostics.failures().get(0).contains("fullGradientLimit"), diagnostics.failures().get(0));
    }

    @Test
    void inexactReferenceGradientCanBeEstimated() {
        List<StoppingEvent> events = new ArrayList<>();
        Diagnostics diagnostics = Diagnostics.builder().fullGradientLimit(100).referenceBatch(300)
                .monitor(GradientNormCriterion.absolute(1e-4).estimatedBeyondLimit(300))
                .subscribe(e -> events.add((StoppingEvent) e), EventFilter.of(EventKind.STOPPING)).build();
        Fit fit = Minimizer.builder().stepSize(0.005).epochs(200).seed(5).build().fit(PROBLEM.data, FitOptions.listeners(diagnostics));
        // Noiseless data: every per-sample gradient vanishes at the optimum, so the estimate tracks the norm.
        assertEquals(StopReason.CONVERGED, fit.stopReason());
        assertTrue(diagnostics.failures().isEmpty(), diagnostics.failures().toString());
        assertTrue(events.get(0).statistic() > 1.0, "the first estimate " + events.get(0).statistic());
    }
}
