package dev.riskmin.diagnostics.metrics;

import dev.riskmin.diagnostics.AngleEvent;
import dev.riskmin.diagnostics.Decision;
import dev.riskmin.diagnostics.DiagnosticEvent;
import dev.riskmin.diagnostics.LossEvent;
import dev.riskmin.diagnostics.NoiseEvent;
import dev.riskmin.diagnostics.StoppingEvent;
import dev.riskmin.diagnostics.VerdictEvent;
import dev.riskmin.diagnostics.verdict.Condition;
import dev.riskmin.diagnostics.verdict.HealthVerdict;
import dev.riskmin.hook.Probe;
import dev.riskmin.hook.StepView;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import org.junit.jupiter.api.Test;

import java.lang.management.ManagementFactory;
import java.util.Map;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The bridge's per-step and per-event paths allocate nothing: the thread's allocated bytes
 * (com.sun.management.ThreadMXBean) over a million calls, after a warm-up that lets the JIT compile
 * them, must stay below a small constant (what the measurement itself costs).
 */
class MeterBridgeAllocationTest {
    private static final com.sun.management.ThreadMXBean THREADS =
            (com.sun.management.ThreadMXBean) ManagementFactory.getThreadMXBean();

    static {
        Quiet.micrometer();
    }

    /** A step view whose step, loss and step size change from call to call. */
    static final class MovingView implements StepView {
        long t;

        @Override
        public long step() {
            return t;
        }

        @Override
        public int epoch() {
            return (int) (t / 1000);
        }

        @Override
        public long draws() {
            return 8 * t;
        }

        @Override
        public int sampleCount() {
            return 8000;
        }

        @Override
        public int dimension() {
            return 3;
        }

        @Override
        public double stepSize() {
            return 0.1 / (1 + t);
        }

        @Override
        public double batchLoss() {
            return 1.0 / (1 + t);
        }

        @Override
        public int batchLength() {
            return 8;
        }

        @Override
        public int batchIndex(int k) {
            return k;
        }

        @Override
        public double batchScale(int k) {
            return 1;
        }

        @Override
        public double parameter(int j) {
            return 0;
        }

        @Override
        public void copyParameters(double[] into) {
        }

        @Override
        public double batchGradient(int j) {
            return 0;
        }

        @Override
        public void copyBatchGradient(double[] into) {
        }

        @Override
        public long gradientEvaluations() {
            return 8 * t;
        }

        @Override
        public long elapsedNanos() {
            return t;
        }

        @Override
        public Probe probe() {
            throw new UnsupportedOperationException("the bridge never probes");
        }
    }

    @Test
    void stepsAndEventsAllocateNothing() {
        SimpleMeterRegistry registry = new SimpleMeterRegistry();
        MeterBridge bridge = MeterBridge.register(registry, "model", "a");
        MovingView view = new MovingView();
        DiagnosticEvent[] events = {
                new LossEvent(1, 0, 0.5, 0.6, 0.55, 0.7, 0.01, 0.1, 8),
                new LossEvent(2, 0, 0.5, 0.6, Double.NaN, Double.NaN, Double.NaN, 0.1, 8),
                new NoiseEvent(1, 0, 8, 2.0, 0.25, 0.1, 20.0, 20),
                new AngleEvent(1, 0, 0.3, 0.4, 0.9, Double.NaN, Double.NaN),
                new StoppingEvent(1, 0, "gradient-norm", 0.5, 0.01, Decision.CONTINUE, "0.5 > 0.01"),
                new StoppingEvent(1, 0, "norm-test", 2.0, 1.0, Decision.GROW_BATCH, "2 > 1"),
                new VerdictEvent(1, 0, new HealthVerdict(Condition.STILL_DESCENDING, "s", "a", Map.of()))};
        bridge.started(null);
        int calls = 1_000_000;
        run(bridge, view, events, 200_000); // warm-up: registers the stopping tests' meters, compiles the paths
        long before = THREADS.getThreadAllocatedBytes(Thread.currentThread().getId());
        run(bridge, view, events, calls);
        long allocated = THREADS.getThreadAllocatedBytes(Thread.currentThread().getId()) - before;
        assertTrue(allocated < 2048, allocated + " B over " + calls + " steps and events");
        // The calls did land (a loop the JIT removed would also allocate nothing).
        assertEquals(1_200_000, registry.get("riskmin.fit.steps").functionCounter().count());
        assertEquals(1_200_000.0 / events.length, registry.get("riskmin.stopping.decisions")
                .tags("test", "norm-test", "decision", "grow_batch").counter().count(), 1.0);
    }

    private static void run(MeterBridge bridge, MovingView view, DiagnosticEvent[] events, int calls) {
        for (int i = 0; i < calls; i++) {
            view.t++;
            bridge.step(view, null);
            bridge.onEvent(events[i % events.length]);
        }
    }
}
