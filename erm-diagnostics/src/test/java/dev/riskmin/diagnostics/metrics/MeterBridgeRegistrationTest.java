package dev.riskmin.diagnostics.metrics;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.diagnostics.Decision;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.diagnostics.LossEvent;
import dev.riskmin.diagnostics.StoppingEvent;
import dev.riskmin.diagnostics.estimator.Cadence;
import dev.riskmin.diagnostics.estimator.LossMonitor;
import dev.riskmin.diagnostics.sink.TraceRecorder;
import dev.riskmin.diagnostics.stopping.GradientNormCriterion;
import dev.riskmin.sampling.Sampling;
import dev.riskmin.testing.LeastSquaresProblem;
import io.micrometer.core.instrument.Counter;
import io.micrometer.core.instrument.FunctionCounter;
import io.micrometer.core.instrument.Gauge;
import io.micrometer.core.instrument.Meter;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import org.junit.jupiter.api.Test;

import java.util.List;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import java.util.concurrent.atomic.AtomicInteger;
import java.util.function.ToDoubleFunction;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Registration rules, closing, failing registries and concurrent fits.
 */
class MeterBridgeRegistrationTest {
    private static final LeastSquaresProblem PROBLEM = LeastSquaresProblem.gaussian(21, 1000, 4, 0.5);

    static {
        Quiet.micrometer();
    }

    /** A registry that refuses to create meters once its budget of creations is spent. */
    static final class FailingRegistry extends SimpleMeterRegistry {
        final AtomicInteger budget;

        FailingRegistry(int creations) {
            this.budget = new AtomicInteger(creations);
        }

        private void spend(Meter.Id id) {
            if (budget.getAndDecrement() <= 0) {
                throw new IllegalStateException("registry refuses " + id.getName());
            }
        }

        @Override
        protected Counter newCounter(Meter.Id id) {
            spend(id);
            return super.newCounter(id);
        }

        @Override
        protected <T> Gauge newGauge(Meter.Id id, T obj, ToDoubleFunction<T> valueFunction) {
            spend(id);
            return super.newGauge(id, obj, valueFunction);
        }

        @Override
        protected <T> FunctionCounter newFunctionCounter(Meter.Id id, T obj, ToDoubleFunction<T> countFunction) {
            spend(id);
            return super.newFunctionCounter(id, obj, countFunction);
        }
    }

    record Run(Fit fit, Diagnostics diagnostics, TraceRecorder recorder) {
    }

    static Run fit(MeterBridge bridge, long seed) {
        TraceRecorder recorder = TraceRecorder.unbounded();
        Diagnostics.Builder b = Diagnostics.builder()
                .monitor(LossMonitor.defaults().withObjectiveCadence(Cadence.every(25)))
                .monitor(GradientNormCriterion.relative(1e-3))
                .subscribe(recorder);
        FitOptions.Builder options = FitOptions.builder();
        if (bridge != null) {
            b.subscribe(bridge);
            options.listener(bridge);
        }
        Diagnostics diagnostics = b.build();
        Fit fit = Minimizer.builder().sampling(Sampling.withReplacement()).batchSize(4).epochs(4).seed(seed).build()
                .fit(PROBLEM.data, options.listener(diagnostics).build());
        return new Run(fit, diagnostics, recorder);
    }

    static LossEvent objectiveEvent(double objective) {
        return new LossEvent(1, 0, Double.NaN, Double.NaN, objective, Double.NaN, Double.NaN, Double.NaN, 4);
    }

    @Test
    void reservedTagKeysAndUnpairedTagsAreRefusedNamingTheValue() {
        SimpleMeterRegistry registry = new SimpleMeterRegistry();
        IllegalArgumentException reserved = assertThrows(IllegalArgumentException.class,
                () -> MeterBridge.register(registry, "model", "a", "condition", "x"));
        assertTrue(reserved.getMessage().contains("(condition)"), reserved.getMessage());
        IllegalArgumentException odd = assertThrows(IllegalArgumentException.class,
                () -> MeterBridge.register(registry, "model", "a", "fit"));
        assertTrue(odd.getMessage().contains("(3 strings)"), odd.getMessage());
        IllegalArgumentException missing = assertThrows(IllegalArgumentException.class,
                () -> MeterBridge.register(registry, "model", null));
        assertEquals("tags[1] is null", missing.getMessage());
        assertEquals(List.of(), registry.getMeters());
    }

    @Test
    void aSecondBridgeWithTheSameTagsIsRefusedAndTheFirstKeepsReporting() {
        SimpleMeterRegistry registry = new SimpleMeterRegistry();
        // Common tags added by the registry change every id; the check must still see the repeat.
        registry.config().commonTags("region", "north");
        MeterBridge first = MeterBridge.register(registry, "model", "a");
        int meters = registry.getMeters().size();
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> MeterBridge.register(registry, "model", "a"));
        assertTrue(e.getMessage().contains("riskmin.") && e.getMessage().contains("model"), e.getMessage());
        assertEquals(meters, registry.getMeters().size(), "the refused bridge left nothing behind");
        first.onEvent(objectiveEvent(0.25));
        assertEquals(0.25, registry.get("riskmin.fit.objective").tags("model", "a", "region", "north").gauge().value());
        // Another tag value is another set of meters.
        MeterBridge second = MeterBridge.register(registry, "model", "b");
        second.onEvent(objectiveEvent(0.5));
        assertEquals(0.25, registry.get("riskmin.fit.objective").tags("model", "a").gauge().value());
        assertEquals(0.5, registry.get("riskmin.fit.objective").tags("model", "b").gauge().value());
        assertEquals(2 * meters, registry.getMeters().size());
    }

    @Test
    void closeRemovesEveryMeterIncludingTheStoppingTestsAndFreesTheTags() {
        SimpleMeterRegistry registry = new SimpleMeterRegistry();
        MeterBridge bridge = MeterBridge.register(registry, "model", "a");
        bridge.onEvent(new StoppingEvent(3, 0, "pflug", -1.5, 0.0, Decision.CUT_STEP, "S < 0"));
        assertEquals(1, registry.get("riskmin.stopping.decisions").tags("test", "pflug", "decision", "cut_step")
                .counter().count());
        assertEquals(-1.5, registry.get("riskmin.stopping.statistic").tags("test", "pflug").gauge().value());
        assertEquals(bridge.meters().size(), registry.getMeters().size());
        bridge.close();
        assertEquals(List.of(), registry.getMeters());
        assertEquals(List.of(), bridge.meters());
        // Events after closing register nothing again.
        bridge.onEvent(new StoppingEvent(4, 0, "norm-test", 1.0, 2.0, Decision.CONTINUE, ""));
        bridge.onEvent(objectiveEvent(0.1));
        assertEquals(List.of(), registry.getMeters());
        bridge.close(); // idempotent
        MeterBridge again = MeterBridge.register(registry, "model", "a");
        assertEquals(again.meters().size(), registry.getMeters().size());
        assertTrue(Double.isNaN(registry.get("riskmin.fit.objective").gauge().value()), "a fresh state");
    }

    @Test
    void aRegistryThatFailsWhileTheBridgeIsBuiltKeepsNoneOfItsMeters() {
        FailingRegistry registry = new FailingRegistry(10);
        IllegalStateException e = assertThrows(IllegalStateException.class, () -> MeterBridge.register(registry, "model", "a"));
        assertTrue(e.getMessage().startsWith("registry refuses riskmin."), e.getMessage());
        assertEquals(List.of(), registry.getMeters());
    }

    @Test
    void aRegistryThatFailsDuringTheFitNeitherStopsNorChangesTheFit() {
        Fit plain = fit(null, 7).fit();
        FailingRegistry registry = new FailingRegistry(Integer.MAX_VALUE);
        MeterBridge bridge = MeterBridge.register(registry, "model", "a");
        registry.budget.set(0); // the stopping test's meters, registered at its first event, fail
        ch.qos.logback.classic.Logger log = (ch.qos.logback.classic.Logger) org.slf4j.LoggerFactory.getLogger(
                Diagnostics.class);
        ch.qos.logback.classic.Level level = log.getLevel();
        log.setLevel(ch.qos.logback.classic.Level.ERROR); // the host's WARN line stays off the test output
        Run run;
        try {
            run = fit(bridge, 7);
        } finally {
            log.setLevel(level);
        }
        assertEquals(plain.stopReason(), run.fit().stopReason());
        assertEquals(plain.steps(), run.fit().steps());
        assertArrayEquals(plain.parameters(), run.fit().parameters(), "bit for bit");
        List<String> failures = run.diagnostics().failures();
        assertEquals(1, failures.size(), failures.toString());
        assertTrue(failures.get(0).contains(MeterBridge.class.getName()) && failures.get(0).contains("registry refuses"),
                failures.get(0));
        // The fit-listener half was not detached: its counters still count.
        assertEquals(run.fit().steps(), registry.get("riskmin.fit.steps").functionCounter().count());
        // The half-registered stopping meters were removed, so a later fit registers them afresh.
        assertEquals(0, registry.find("riskmin.stopping.statistic").meters().size());
        assertEquals(0, registry.find("riskmin.stopping.decisions").meters().size());
        registry.budget.set(Integer.MAX_VALUE);
        Run later = fit(bridge, 8);
        assertEquals(List.of(), later.diagnostics().failures());
        assertEquals(later.recorder().stopping().size(), registry.get("riskmin.stopping.decisions").counters().stream()
                .mapToDouble(Counter::count).sum());
    }

    @Test
    void concurrentFitsWithTheirOwnBridgesShareOneRegistry() throws Exception {
        SimpleMeterRegistry registry = new SimpleMeterRegistry();
        MeterBridge a = MeterBridge.register(registry, "fit", "a");
        MeterBridge b = MeterBridge.register(registry, "fit", "b");
        MeterBridge shared = MeterBridge.register(registry, "fit", "shared");
        ExecutorService pool = Executors.newFixedThreadPool(2);
        try {
            Future<Run> ra = pool.submit(() -> fit(a, 1));
            Future<Run> rb = pool.submit(() -> fit(b, 2));
            Future<Run> s1 = pool.submit(() -> fit(shared, 3));
            Future<Run> s2 = pool.submit(() -> fit(shared, 4));
            for (var pair : List.of(new Object[] {"a", ra.get()}, new Object[] {"b", rb.get()})) {
                String tag = (String) pair[0];
                Run run = (Run) pair[1];
                assertEquals(run.fit().steps(), registry.get("riskmin.fit.steps").tag("fit", tag).functionCounter().count());
                double objective = Double.NaN;
                for (LossEvent e : run.recorder().losses()) {
                    objective = Double.isNaN(e.objective()) ? objective : e.objective();
                }
                assertEquals(objective, registry.get("riskmin.fit.objective").tag("fit", tag).gauge().value(), tag);
            }
            // One bridge fed by two fits at once: its counters are still exact.
            long steps = s1.get().fit().steps() + s2.get().fit().steps();
            assertEquals(steps, registry.get("riskmin.fit.steps").tag("fit", "shared").functionCounter().count());
            assertEquals(2, registry.get("riskmin.fits.started").tag("fit", "shared").functionCounter().count());
        } finally {
            pool.shutdownNow();
        }
    }
}
