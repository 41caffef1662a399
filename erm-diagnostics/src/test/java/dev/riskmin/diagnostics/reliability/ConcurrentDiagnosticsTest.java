package dev.riskmin.diagnostics.reliability;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.diagnostics.DiagnosticEvent;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.diagnostics.EventKind;
import dev.riskmin.diagnostics.sink.TraceRecorder;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.sampling.Sampling;
import dev.riskmin.testing.LeastSquaresProblem;
import org.junit.jupiter.api.Test;

import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.CyclicBarrier;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import java.util.concurrent.TimeUnit;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Sixteen threads fit at once with one shared {@link Minimizer}, each with its own {@link Diagnostics}:
 * every thread's diagnostics record exactly the events (and verdict) of a sequential fit of the
 * same data — no event of another fit, none lost — and the fits' parameters are those of the
 * sequential fits bit for bit.
 */
class ConcurrentDiagnosticsTest {
    private static final int THREADS = 16;
    private static final LeastSquaresProblem[] PROBLEMS = {
            LeastSquaresProblem.gaussian(61, 300, 5, 0.4), LeastSquaresProblem.gaussian(62, 340, 5, 0.4),
            LeastSquaresProblem.gaussian(63, 380, 5, 0.4), LeastSquaresProblem.gaussian(64, 420, 5, 0.4)};
    private static final Minimizer MINIMIZER = Minimizer.builder().updateRule(UpdateRule.svrg())
            .sampling(Sampling.withReplacement()).batchSize(4).epochs(8).seed(3).build();

    private record Run(double[] parameters, List<DiagnosticEvent> events) {
    }

    private static Run run(int k) {
        TraceRecorder recorder = TraceRecorder.unbounded();
        Diagnostics diagnostics = Monitors.standardWith(recorder);
        Fit fit = MINIMIZER.fit(PROBLEMS[k].data, FitOptions.listeners(diagnostics));
        assertTrue(diagnostics.failures().isEmpty(), diagnostics.failures().toString());
        assertEquals(PROBLEMS[k].data.size(), diagnostics.run().sampleCount());
        return new Run(fit.parameters(), recorder.events());
    }

    @Test
    void eachThreadsDiagnosticsRecordExactlyItsOwnFitsEvents() throws Exception {
        Run[] expected = new Run[PROBLEMS.length];
        for (int k = 0; k < PROBLEMS.length; k++) {
            expected[k] = run(k);
            assertTrue(expected[k].events().size() > 20, "events " + expected[k].events().size());
            assertEquals(1, expected[k].events().stream().filter(e -> e.kind() == EventKind.VERDICT).count());
        }
        CyclicBarrier start = new CyclicBarrier(THREADS);
        ExecutorService pool = Executors.newFixedThreadPool(THREADS, task -> new Thread(task, "diagnosed-fit"));
        try {
            List<Future<Run>> results = new ArrayList<>();
            for (int t = 0; t < THREADS; t++) {
                int k = t % PROBLEMS.length;
                results.add(pool.submit(() -> {
                    start.await(30, TimeUnit.SECONDS);
                    return run(k);
                }));
            }
            for (int t = 0; t < THREADS; t++) {
                Run got = results.get(t).get(60, TimeUnit.SECONDS);
                Run want = expected[t % PROBLEMS.length];
                assertArrayEquals(want.parameters(), got.parameters(), 0.0, "thread " + t);
                assertEquals(want.events(), got.events(), "thread " + t);
            }
        } finally {
            pool.shutdownNow();
            assertTrue(pool.awaitTermination(30, TimeUnit.SECONDS));
        }
    }
}
