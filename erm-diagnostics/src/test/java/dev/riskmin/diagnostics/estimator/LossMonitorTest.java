package dev.riskmin.diagnostics.estimator;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.diagnostics.EventFilter;
import dev.riskmin.diagnostics.EventKind;
import dev.riskmin.diagnostics.LossEvent;
import dev.riskmin.diagnostics.verdict.RunSummary;
import dev.riskmin.hook.FitControl;
import dev.riskmin.hook.FitListener;
import dev.riskmin.hook.StepView;
import dev.riskmin.loss.Losses;
import dev.riskmin.method.Averaging;
import dev.riskmin.objective.LinearObjective;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.testing.LeastSquaresProblem;
import org.junit.jupiter.api.Test;

import java.util.ArrayList;
import java.util.List;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** The {@link LossMonitor} on real fits, checked against direct computations from recorded steps. */
class LossMonitorTest {
    private static final LeastSquaresProblem PROBLEM = LeastSquaresProblem.gaussian(31, 200, 4, 0.5);

    @Test
    void smoothedLossAscentShareAndOscillationFollowTheDocumentedRecursions() {
        LossMonitor monitor = LossMonitor.defaults().withReportEvery(1).withObjectiveCadence(Cadence.never())
                .withHeldOutCadence(Cadence.never());
        Recorder recorder = new Recorder();
        List<LossEvent> events = new ArrayList<>();
        Diagnostics diagnostics = host(monitor, events);
        Minimizer.builder().batchSize(4).stepSize(0.05).maxSteps(600).seed(2).build()
                .fit(PROBLEM.data, FitOptions.builder().listener(diagnostics).listener(recorder).build());
        assertEquals(600, events.size());
        // Finch 2009 (from memory): δ = ℓ − m; m ← m + αδ; v ← (1 − α)(v + αδ²);
        // ascent if ℓ > m + z√v
        // (m, v before ℓ) once ⌈1/α⌉ steps have been seen.
        double alpha = LossMonitor.DEFAULT_SMOOTHING;
        double m = Double.NaN;
        double v = 0;
        int counted = 0;
        int ascents = 0;
        for (int t = 0; t < 600; t++) {
            double loss = recorder.losses.get(t);
            if (t == 0) {
                m = loss;
            } else {
                if (t >= 20) {
                    counted++;
                    ascents += loss > m + LossMonitor.DEFAULT_ALLOWANCE * Math.sqrt(v) ? 1 : 0;
                }
                double delta = loss - m;
                m += alpha * delta;
                v = (1 - alpha) * (v + alpha * delta * delta);
            }
            LossEvent e = events.get(t);
            assertEquals(t, e.step());
            assertEquals(loss, e.batchLoss());
            assertEquals(m, e.smoothedBatchLoss(), 1e-14 * Math.abs(m));
            assertTrue(Double.isNaN(e.objective()) && Double.isNaN(e.heldOutLoss()) && Double.isNaN(e.gradientNorm()));
            assertEquals(4, e.batchSize());
            assertEquals(0.05, e.stepSize());
        }
        RunSummary summary = diagnostics.summary();
        assertEquals((double) ascents / counted, monitor.ascentShare(), 1e-15);
        assertEquals(monitor.ascentShare(), summary.ascentShare);
        assertEquals(Math.sqrt(v) / Math.abs(m), summary.lossOscillation, 1e-12 * summary.lossOscillation);
        assertTrue(ascents > 0 && ascents < counted, ascents + " ascents of " + counted);
    }

    @Test
    void objectiveCadenceIsRespectedAndTheFiguresAreExact() {
        LossMonitor monitor = LossMonitor.defaults().withObjectiveCadence(Cadence.every(7))
                .withReportEvery(1_000_000).withHeldOutCadence(Cadence.never());
        Recorder recorder = new Recorder();
        List<LossEvent> events = new ArrayList<>();
        Diagnostics diagnostics = host(monitor, events);
        Fit fit = Minimizer.builder().batchSize(10).stepSize(0.02).maxSteps(100).seed(4).build()
                .fit(PROBLEM.data, FitOptions.builder().listener(diagnostics).listener(recorder).build());
        // Steps 0, 7, …, 98: 15 measurements, each with an event (and no other events).
        assertEquals(15, events.size());
        assertEquals(15, monitor.objectiveMeasurements());
        LinearObjective objective = PROBLEM.objective();
        double[] gradient = new double[5];
        double best = Double.POSITIVE_INFINITY;
        for (int k = 0; k < 15; k++) {
            LossEvent e = events.get(k);
            assertEquals(7L * k, e.step());
            double[] h = recorder.parameters.get(7 * k);
            double value = objective.gradient(h, gradient);
            assertEquals(value, e.objective(), 1e-13 * value);
            double norm = Math.sqrt(NoiseStatistics.normSquared(gradient, 5));
            assertEquals(norm, e.gradientNorm(), 1e-12 * norm);
            best = Math.min(best, value);
        }
        RunSummary summary = diagnostics.summary();
        assertEquals(events.get(0).objective(), summary.initialObjective);
        assertEquals(events.get(0).gradientNorm(), summary.initialGradientNorm);
        assertEquals(events.get(14).gradientNorm(), summary.gradientNorm);
        // The fit ends on its last iterate, so its final objective (step 100) is the latest measurement;
        // the previous one is the newest at least an epoch (20 steps) older: step 77.
        assertEquals(fit.finalObjective(), summary.latestObjective);
        assertEquals(events.get(11).objective(), summary.previousObjective);
        assertEquals((summary.previousObjective - summary.latestObjective) / summary.previousObjective,
                summary.recentRelativeDecrease, 1e-15);
        assertEquals(Math.min(best, fit.finalObjective()), summary.bestObjective);
    }

    @Test
    void averagedFitDoesNotReportItsFinalObjectiveAsTheLastIterates() {
        LossMonitor monitor = LossMonitor.defaults().withObjectiveCadence(Cadence.every(25));
        Diagnostics diagnostics = host(monitor, new ArrayList<>());
        Fit fit = Minimizer.builder().batchSize(10).stepSize(0.02).maxSteps(100).averaging(Averaging.polyakRuppert())
                .build().fit(PROBLEM.data, FitOptions.listeners(diagnostics));
        assertTrue(fit.averaged());
        assertEquals(monitor.latestObjective(), diagnostics.summary().latestObjective);
        assertTrue(diagnostics.summary().latestObjective != fit.finalObjective());
    }

    @Test
    void heldOutLossEqualsTheDirectMeanOverHeldOutSamples() {
        LeastSquaresProblem heldOut = LeastSquaresProblem.gaussian(32, 50, 4, 0.5);
        LossMonitor monitor = LossMonitor.defaults().withHeldOutCadence(Cadence.every(10))
                .withObjectiveCadence(Cadence.never()).withReportEvery(1_000_000);
        Recorder recorder = new Recorder();
        List<LossEvent> events = new ArrayList<>();
        Diagnostics diagnostics = host(monitor, events);
        Minimizer.builder().batchSize(5).stepSize(0.02).maxSteps(100).build().fit(PROBLEM.data,
                FitOptions.builder().listener(diagnostics).listener(recorder).heldOut(heldOut.data).build());
        assertEquals(10, events.size());
        assertEquals(10, monitor.heldOutMeasurements());
        LinearObjective direct = LinearObjective.of(heldOut.data, Losses.squared(), Penalty.none(), true);
        for (int k = 0; k < 10; k++) {
            double[] h = recorder.parameters.get(10 * k);
            double sum = 0;
            for (int i = 0; i < 50; i++) {
                sum += direct.sampleLoss(h, i);
            }
            assertEquals(sum / 50, events.get(k).heldOutLoss(), 1e-13 * sum / 50);
            assertTrue(Double.isNaN(events.get(k).objective()));
        }
        assertEquals(events.get(9).heldOutLoss(), monitor.latestHeldOutLoss());
    }

    @Test
    void withoutHeldOutDataTheHeldOutCadenceCostsNothing() {
        LossMonitor monitor = LossMonitor.defaults().withHeldOutCadence(Cadence.every(1))
                .withObjectiveCadence(Cadence.never());
        Diagnostics diagnostics = host(monitor, new ArrayList<>());
        Fit fit = Minimizer.builder().maxSteps(50).build().fit(PROBLEM.data, FitOptions.listeners(diagnostics));
        assertEquals(0, monitor.heldOutMeasurements());
        assertEquals(0, fit.probeEvaluations());
        assertTrue(diagnostics.failures().isEmpty());
    }

    private static Diagnostics host(LossMonitor monitor, List<LossEvent> events) {
        return Diagnostics.builder().monitor(monitor)
                .subscribe(e -> events.add((LossEvent) e), EventFilter.of(EventKind.LOSS)).build();
    }

    /** Records h_t and the batch loss at every step. */
    static final class Recorder implements FitListener {
        final List<double[]> parameters = new ArrayList<>();
        final List<Double> losses = new ArrayList<>();

        @Override
        public void step(StepView view, FitControl control) {
            double[] h = new double[view.dimension()];
            view.copyParameters(h);
            parameters.add(h);
            losses.add(view.batchLoss());
        }
    }
}
