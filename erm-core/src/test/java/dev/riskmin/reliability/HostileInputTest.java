package dev.riskmin.reliability;

import dev.riskmin.testing.Cases;
import org.junit.jupiter.api.Test;

import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;
import java.util.concurrent.ExecutionException;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.TimeoutException;

import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Generated hostile input over the public API ({@link HostileCase}): every case either fits with
 * finite parameters or is refused with an IllegalArgumentException / IllegalStateException whose
 * message names the problem — never a NaN model, another exception, or a hang.
 *
 * <p>The number of cases is the system property {@value #CASES_PROPERTY} (default
 * {@value #DEFAULT_CASES}; the Maven profile {@code hostile-long} of erm-core runs 1,000,000). All cases run in
 * one test so that one failure does not hide the others: failures are counted with their seeds and
 * the first few are reported in full. Each case is bounded twice: by the fit's own time budget
 * ({@link HostileCase#TIME_LIMIT}) and by a watchdog that waits {@value #CASE_TIMEOUT_MS} ms for
 * the case on one long-lived worker thread (no thread per case).
 */
class HostileInputTest {
    static final String CASES_PROPERTY = "riskmin.hostile.cases";
    static final int DEFAULT_CASES = 10_000;
    /** Replays one case: {@code -Driskmin.hostile.seed=<seed from a failure report>}. */
    static final String SEED_PROPERTY = "riskmin.hostile.seed";
    static final long CASE_TIMEOUT_MS = 5_000;
    private static final int REPORTED = 5;

    private static ExecutorService newWorker() {
        return Executors.newSingleThreadExecutor(task -> {
            Thread t = new Thread(task, "hostile-case-worker");
            t.setDaemon(true); // a case stuck without checking its interrupt must not hold the JVM
            return t;
        });
    }

    @Test
    void everyCaseFitsFinitelyOrIsRefusedWithAMessageNamingTheProblem() throws InterruptedException {
        int cases = Integer.getInteger(CASES_PROPERTY, DEFAULT_CASES);
        Long only = Long.getLong(SEED_PROPERTY);
        Iterable<Long> seeds = only != null ? List.of(only) : Cases.seeds(cases).boxed()::iterator;
        if (only != null) {
            cases = 1;
        }
        Map<String, Integer> fitted = new TreeMap<>();
        Map<String, Integer> refused = new TreeMap<>();
        Map<String, Integer> failedKinds = new TreeMap<>();
        Map<String, String> reports = new TreeMap<>(); // the first failure of each kind
        List<String> failedSeeds = new ArrayList<>();
        long slowestNanos = 0;
        long slowestSeed = 0;
        long start = System.nanoTime();
        ExecutorService worker = newWorker();
        try {
            for (long seed : seeds) {
                HostileCase c = new HostileCase(seed);
                long t0 = System.nanoTime();
                Future<HostileOutcome> future = worker.submit(() -> HostileOutcome.of(c));
                HostileOutcome outcome;
                try {
                    outcome = future.get(CASE_TIMEOUT_MS, TimeUnit.MILLISECONDS);
                } catch (TimeoutException e) {
                    outcome = HostileOutcome.failed("hang", c, "no outcome within " + CASE_TIMEOUT_MS + " ms", null);
                    future.cancel(true);
                    worker.shutdownNow();
                    worker = newWorker();
                } catch (ExecutionException e) {
                    outcome = HostileOutcome.failed("harness", c, "the harness threw", e.getCause());
                }
                long nanos = System.nanoTime() - t0;
                if (nanos > slowestNanos) {
                    slowestNanos = nanos;
                    slowestSeed = seed;
                }
                switch (outcome.kind()) {
                    case FITTED:
                        fitted.merge(outcome.label(), 1, Integer::sum);
                        break;
                    case REFUSED:
                        refused.merge(outcome.label(), 1, Integer::sum);
                        break;
                    default:
                        failedKinds.merge(outcome.label(), 1, Integer::sum);
                        failedSeeds.add(seed + " (" + outcome.label() + ")");
                        if (reports.size() < REPORTED) {
                            reports.putIfAbsent(outcome.label(), outcome.detail());
                        }
                }
            }
        } finally {
            worker.shutdownNow();
            worker.awaitTermination(10, TimeUnit.SECONDS);
        }
        double seconds = (System.nanoTime() - start) / 1e9;
        int fittedCount = fitted.values().stream().mapToInt(Integer::intValue).sum();
        int refusedCount = refused.values().stream().mapToInt(Integer::intValue).sum();
        System.out.printf(java.util.Locale.ROOT,
                "hostile input: %d cases in %.1f s (slowest %.0f ms, seed %d): %d fitted %s, %d refused %s,"
                        + " %d failed %s%n", cases, seconds, slowestNanos / 1e6, slowestSeed, fittedCount, fitted,
                refusedCount, refused, failedSeeds.size(), failedKinds);
        assertTrue(failedSeeds.isEmpty(), failedSeeds.size() + " of " + cases + " cases failed " + failedKinds
                + "; seeds " + failedSeeds.subList(0, Math.min(50, failedSeeds.size())) + "\nfirst "
                + "of each kind:\n" + String.join("\n\n", reports.values()));
    }
}
