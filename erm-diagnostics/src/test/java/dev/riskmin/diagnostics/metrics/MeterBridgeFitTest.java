package dev.riskmin.diagnostics.metrics;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.StopReason;
import dev.riskmin.data.Dataset;
import dev.riskmin.diagnostics.AngleEvent;
import dev.riskmin.diagnostics.Decision;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.diagnostics.LossEvent;
import dev.riskmin.diagnostics.NoiseEvent;
import dev.riskmin.diagnostics.StoppingEvent;
import dev.riskmin.diagnostics.estimator.AngleMonitor;
import dev.riskmin.diagnostics.estimator.Cadence;
import dev.riskmin.diagnostics.estimator.LossMonitor;
import dev.riskmin.diagnostics.estimator.NoiseMonitor;
import dev.riskmin.diagnostics.estimator.OscillationMonitor;
import dev.riskmin.diagnostics.sink.TraceRecorder;
import dev.riskmin.diagnostics.stopping.GradientNormCriterion;
import dev.riskmin.diagnostics.stopping.NormTestCriterion;
import dev.riskmin.diagnostics.verdict.Condition;
import dev.riskmin.hook.FitControl;
import dev.riskmin.hook.FitListener;
import dev.riskmin.hook.StepView;
import dev.riskmin.sampling.Sampling;
import dev.riskmin.testing.LeastSquaresProblem;
import io.micrometer.core.instrument.Meter;
import io.micrometer.core.instrument.MeterRegistry;
import io.micrometer.core.instrument.Tag;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

import java.lang.ref.WeakReference;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;
import java.util.Set;
import java.util.TreeSet;
import java.util.function.ToDoubleFunction;
import java.util.stream.Collectors;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The bridge on real fits: Minimizer + Diagnostics with the four estimators, two stopping tests, an
 * in-memory recorder and the bridge. Every gauge must read the last measured value of its figure in
 * the recorded events (exactly: the bridge copies, it does not compute), every counter the number of
 * matching events or listener calls.
 */
class MeterBridgeFitTest {
    private static final LeastSquaresProblem PROBLEM = LeastSquaresProblem.gaussian(11, 2000, 5, 0.5);
    // Held-out rows overlap the training rows: the test checks that the figure is carried, not what it means.
    private static final Dataset HELD_OUT = Dataset.of(Arrays.copyOf(PROBLEM.x, 300), Arrays.copyOf(PROBLEM.y, 300));
    private static final Tag MODEL = Tag.of("model", "demand");

    /** The last step's figures as the fit itself reported them. */
    static final class LastStep implements FitListener {
        long steps;
        double stepSize = Double.NaN;
        double batchLoss = Double.NaN;
        int batchSize;
        int epochs;

        @Override
        public void step(StepView view, FitControl control) {
            steps++;
            stepSize = view.stepSize();
            batchLoss = view.batchLoss();
            batchSize = view.batchLength();
        }

        @Override
        public void epochEnded(StepView view, FitControl control) {
            epochs++;
        }
    }

    record Run(Fit fit, Diagnostics diagnostics, TraceRecorder recorder, LastStep last) {
    }

    static Minimizer.Builder minimizer() {
        return Minimizer.builder().sampling(Sampling.withReplacement()).batchSize(8).epochs(12);
    }

    static Run fit(MeterBridge bridge, long seed) {
        TraceRecorder recorder = TraceRecorder.unbounded();
        Diagnostics diagnostics = Diagnostics.builder()
                // Short cadences: the default budgets would measure the objective rarely in so short a fit.
                .monitor(NoiseMonitor.every(20))
                .monitor(AngleMonitor.certified(PROBLEM.optimum, PROBLEM.optimalObjective).withCadence(Cadence.every(20)))
                .monitor(LossMonitor.defaults().withObjectiveCadence(Cadence.every(20))
                        .withHeldOutCadence(Cadence.every(30)))
                .monitor(OscillationMonitor.defaults())
                .monitor(GradientNormCriterion.relative(0.01))
                .monitor(NormTestCriterion.defaults().withMaxBatch(32))
                .subscribe(recorder)
                .subscribe(bridge)
                .build();
        LastStep last = new LastStep();
        FitOptions options = FitOptions.builder().listener(bridge).listener(diagnostics).listener(last)
                .heldOut(HELD_OUT).build();
        Fit fit = minimizer().seed(seed).build().fit(PROBLEM.data, options);
        assertTrue(diagnostics.failures().isEmpty(), diagnostics.failures().toString());
        assertTrue(fit.listenerFailures().isEmpty(), fit.listenerFailures().toString());
        return new Run(fit, diagnostics, recorder, last);
    }

    static double gauge(MeterRegistry registry, String name) {
        return registry.get(name).tags(List.of(MODEL)).gauge().value();
    }

    static double counter(MeterRegistry registry, String name, String... tags) {
        return registry.get(name).tags(List.of(MODEL)).tags(tags).counter().count();
    }

    static double functionCounter(MeterRegistry registry, String name) {
        return registry.get(name).tags(List.of(MODEL)).functionCounter().count();
    }

    static <E> double lastMeasured(List<E> events, ToDoubleFunction<E> field) {
        double value = Double.NaN;
        for (E e : events) {
            double v = field.applyAsDouble(e);
            if (!Double.isNaN(v)) {
                value = v;
            }
        }
        return value;
    }

    private static SimpleMeterRegistry registry;
    private static Run run;

    static {
        Quiet.micrometer();
    }

    @BeforeAll
    static void fitOnce() {
        registry = new SimpleMeterRegistry();
        run = fit(MeterBridge.register(registry, List.of(MODEL)), 1);
        // Measured: 315 steps, 3.00 epochs, stopped CONVERGED by the gradient-norm test; 42 loss, 16 noise,
        // 16 angle and 11 stopping events (CONTINUE, GROW_BATCH and one STOP).
        assertEquals(StopReason.CONVERGED, run.fit().stopReason(), run.fit().toString());
    }

    @Test
    void registersTheDocumentedNamesEachCarryingTheCallersTag() {
        Set<String> names = registry.getMeters().stream().map(m -> m.getId().getName())
                .collect(Collectors.toCollection(TreeSet::new));
        Set<String> expected = new TreeSet<>(Set.of("riskmin.fits.started", "riskmin.fits.finished", "riskmin.fit.steps",
                "riskmin.fit.epochs", "riskmin.fit.step.size", "riskmin.fit.batch.size", "riskmin.fit.batch.loss",
                "riskmin.fit.batch.loss.smoothed", "riskmin.fit.objective", "riskmin.fit.heldout.loss",
                "riskmin.fit.suboptimality", "riskmin.gradient.norm", "riskmin.gradient.norm.squared",
                "riskmin.gradient.noise.trace", "riskmin.gradient.noise.batch.variance", "riskmin.gradient.noise.scale",
                "riskmin.batch.size.suggested", "riskmin.descent.cosine", "riskmin.descent.cosine.mean",
                "riskmin.descent.share", "riskmin.descent.angle.optimum", "riskmin.stopping.decisions",
                "riskmin.stopping.statistic", "riskmin.stopping.threshold", "riskmin.verdict", "riskmin.verdicts"));
        assertEquals(expected, names);
        for (Meter m : registry.getMeters()) {
            assertEquals("demand", m.getId().getTag("model"), m.getId().toString());
        }
        // 17 figures + 3 function counters + 11 stop reasons + 6 verdict gauges + 6 verdict counters,
        // and per stopping test 2 gauges + 5 decision counters.
        assertEquals(17 + 3 + StopReason.values().length + 2 * Condition.values().length + 2 * (2 + 5),
                registry.getMeters().size());
        assertEquals("samples", registry.get("riskmin.gradient.noise.scale").gauge().getId().getBaseUnit());
        assertEquals("degrees", registry.get("riskmin.descent.angle.optimum").gauge().getId().getBaseUnit());
    }

    @Test
    void gaugesReadTheLastMeasuredValueOfEachEventFigure() {
        TraceRecorder r = run.recorder();
        List<LossEvent> loss = r.losses();
        List<NoiseEvent> noise = r.noise();
        List<AngleEvent> angles = r.angles();
        assertFalse(loss.isEmpty() || noise.isEmpty() || angles.isEmpty(), "every estimator published");
        assertEquals(lastMeasured(loss, LossEvent::smoothedBatchLoss), gauge(registry, "riskmin.fit.batch.loss.smoothed"));
        assertEquals(lastMeasured(loss, LossEvent::objective), gauge(registry, "riskmin.fit.objective"));
        assertEquals(lastMeasured(loss, LossEvent::heldOutLoss), gauge(registry, "riskmin.fit.heldout.loss"));
        assertEquals(lastMeasured(loss, LossEvent::gradientNorm), gauge(registry, "riskmin.gradient.norm"));
        assertEquals(lastMeasured(noise, NoiseEvent::traceCovariance), gauge(registry, "riskmin.gradient.noise.trace"));
        assertEquals(lastMeasured(noise, NoiseEvent::batchMeanVariance),
                gauge(registry, "riskmin.gradient.noise.batch.variance"));
        assertEquals(lastMeasured(noise, NoiseEvent::gradientNormSquared), gauge(registry, "riskmin.gradient.norm.squared"));
        assertEquals(lastMeasured(noise, NoiseEvent::noiseScale), gauge(registry, "riskmin.gradient.noise.scale"));
        assertEquals(noise.get(noise.size() - 1).suggestedBatchSize(), gauge(registry, "riskmin.batch.size.suggested"));
        assertEquals(lastMeasured(angles, AngleEvent::cosine), gauge(registry, "riskmin.descent.cosine"));
        assertEquals(lastMeasured(angles, AngleEvent::meanCosine), gauge(registry, "riskmin.descent.cosine.mean"));
        assertEquals(lastMeasured(angles, AngleEvent::descentShare), gauge(registry, "riskmin.descent.share"));
        assertEquals(lastMeasured(angles, AngleEvent::angleToOptimum), gauge(registry, "riskmin.descent.angle.optimum"));
        assertEquals(lastMeasured(angles, AngleEvent::suboptimality), gauge(registry, "riskmin.fit.suboptimality"));
        // The per-step figures come from the fit's last step.
        assertEquals(run.last().stepSize, gauge(registry, "riskmin.fit.step.size"));
        assertEquals(run.last().batchSize, gauge(registry, "riskmin.fit.batch.size"));
        assertEquals(run.last().batchLoss, gauge(registry, "riskmin.fit.batch.loss"));
        // Every figure above was measured at least once (a NaN gauge would pass an equality with NaN).
        for (String name : List.of("riskmin.fit.objective", "riskmin.fit.heldout.loss", "riskmin.gradient.norm",
                "riskmin.gradient.noise.scale", "riskmin.descent.angle.optimum", "riskmin.fit.suboptimality",
                "riskmin.fit.batch.loss.smoothed", "riskmin.descent.share")) {
            assertTrue(Double.isFinite(gauge(registry, name)), name + " = " + gauge(registry, name));
        }
        for (String test : List.of("gradient-norm", "norm-test")) {
            List<StoppingEvent> events = r.stopping().stream().filter(e -> e.test().equals(test)).toList();
            assertEquals(lastMeasured(events, StoppingEvent::statistic),
                    registry.get("riskmin.stopping.statistic").tags("test", test).gauge().value(), test);
            assertEquals(lastMeasured(events, StoppingEvent::threshold),
                    registry.get("riskmin.stopping.threshold").tags("test", test).gauge().value(), test);
        }
    }

    @Test
    void countersCountStepsEpochsFitsDecisionsAndVerdicts() {
        assertEquals(run.fit().steps(), functionCounter(registry, "riskmin.fit.steps"));
        assertEquals(run.last().steps, run.fit().steps());
        assertEquals(run.last().epochs, functionCounter(registry, "riskmin.fit.epochs"));
        assertEquals(1, functionCounter(registry, "riskmin.fits.started"));
        for (StopReason reason : StopReason.values()) {
            assertEquals(reason == run.fit().stopReason() ? 1 : 0,
                    counter(registry, "riskmin.fits.finished", "reason", reason.name().toLowerCase(Locale.ROOT)), reason.name());
        }
        int distinctDecisions = 0;
        for (String test : List.of("gradient-norm", "norm-test")) {
            for (Decision d : Decision.values()) {
                long expected = run.recorder().stopping().stream()
                        .filter(e -> e.test().equals(test) && e.decision() == d).count();
                distinctDecisions += expected > 0 ? 1 : 0;
                assertEquals(expected, counter(registry, "riskmin.stopping.decisions", "test", test,
                        "decision", d.name().toLowerCase(Locale.ROOT)), test + " " + d);
            }
        }
        assertTrue(distinctDecisions >= 4, "the fit exercised several decisions: " + distinctDecisions);
        assertEquals(1, counter(registry, "riskmin.stopping.decisions", "test", "gradient-norm", "decision", "stop"));
        Condition verdict = run.diagnostics().verdict().condition();
        for (Condition c : Condition.values()) {
            String tag = c.name().toLowerCase(Locale.ROOT);
            assertEquals(c == verdict ? 1 : 0, registry.get("riskmin.verdict").tags(List.of(MODEL)).tag("condition", tag)
                    .gauge().value(), tag);
            assertEquals(c == verdict ? 1 : 0, counter(registry, "riskmin.verdicts", "condition", tag), tag);
        }
    }

    @Test
    void aSecondFitThroughTheSameBridgeAddsToTheCountersAndReplacesTheGauges() {
        SimpleMeterRegistry local = new SimpleMeterRegistry();
        MeterBridge bridge = MeterBridge.register(local, List.of(MODEL));
        Run first = fit(bridge, 1);
        Run second = fit(bridge, 2);
        assertEquals(first.fit().steps() + second.fit().steps(), functionCounter(local, "riskmin.fit.steps"));
        assertEquals(2, functionCounter(local, "riskmin.fits.started"));
        long decisions = first.recorder().stopping().size() + second.recorder().stopping().size();
        double counted = local.get("riskmin.stopping.decisions").counters().stream().mapToDouble(c -> c.count()).sum();
        assertEquals(decisions, counted);
        assertEquals(lastMeasured(second.recorder().losses(), LossEvent::objective), gauge(local, "riskmin.fit.objective"));
        assertEquals(second.last().batchLoss, gauge(local, "riskmin.fit.batch.loss"));
        double verdicts = local.get("riskmin.verdicts").counters().stream().mapToDouble(c -> c.count()).sum();
        assertEquals(2, verdicts);
        // The second fit's seed changes its figures, so the gauges cannot be the first fit's by accident.
        assertTrue(lastMeasured(first.recorder().losses(), LossEvent::objective)
                != lastMeasured(second.recorder().losses(), LossEvent::objective));
    }

    @Test
    void gaugeValuesSurviveGarbageCollectionAfterTheBridgeIsDropped() throws InterruptedException {
        SimpleMeterRegistry local = new SimpleMeterRegistry();
        WeakReference<MeterBridge> dropped = fitAndDrop(local);
        double objective = gauge(local, "riskmin.fit.objective");
        long steps = (long) functionCounter(local, "riskmin.fit.steps");
        // The registry read them once already; collect, then read again.
        for (int i = 0; i < 20 && dropped.get() != null; i++) {
            System.gc();
            Thread.sleep(10);
        }
        assertNull(dropped.get(), "the bridge was collected (nothing but its meters could hold its state)");
        assertTrue(Double.isFinite(objective), "objective " + objective);
        assertEquals(objective, gauge(local, "riskmin.fit.objective"));
        assertEquals(steps, functionCounter(local, "riskmin.fit.steps"));
        assertTrue(Double.isFinite(gauge(local, "riskmin.gradient.noise.scale")));
        assertEquals(1.0, local.get("riskmin.verdict").gauges().stream().mapToDouble(g -> g.value()).sum(),
                "exactly one condition is set");
        assertTrue(local.get("riskmin.stopping.statistic").tags("test", "gradient-norm").gauge().value() > 0);
    }

    private static WeakReference<MeterBridge> fitAndDrop(MeterRegistry registry) {
        MeterBridge bridge = MeterBridge.register(registry, List.of(MODEL));
        fit(bridge, 3);
        return new WeakReference<>(bridge);
    }
}
