package dev.riskmin.objective;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTimeoutPreemptively;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

import dev.riskmin.data.Dataset;
import dev.riskmin.loss.Loss;
import dev.riskmin.loss.Losses;
import dev.riskmin.loss.Response;
import dev.riskmin.loss.TargetDomain;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.testing.Cases;
import java.lang.management.ManagementFactory;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.random.RandomGenerator;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/**
 * The parallel batch gradient of {@link LinearObjective} with {@link GradientThreads}: equal to the
 * one-thread gradient up to rounding, the same bits on every evaluation, sequential below the
 * threshold, exceptions of a worker rethrown on the caller, no allocation per batch, and no thread
 * left after {@link GradientThreads#close()}.
 */
class ParallelBatchGradientTest {
    private static final int N = 3000;
    private static final int D = 50;

    /** Logistic labels on Gaussian features, about 60% of them zero (so the sparse path has work). */
    private static Dataset data(boolean sparse, boolean weighted, long seed) {
        RandomGenerator rng = Cases.rng(seed);
        double[][] x = new double[N][D];
        for (int i = 0; i < N; i++) {
            for (int j = 0; j < D; j++) {
                x[i][j] = rng.nextDouble() < 0.6 ? 0.0 : rng.nextGaussian();
            }
        }
        double[] y = Cases.asDoubles(Cases.logisticLabels(rng, x, Cases.gaussianVector(rng, D, 0.3), 0.2));
        Dataset.Builder builder = Dataset.builder().targets(y);
        if (sparse) {
            int[] rowStart = new int[N + 1];
            List<Integer> columns = new ArrayList<>();
            List<Double> values = new ArrayList<>();
            for (int i = 0; i < N; i++) {
                for (int j = 0; j < D; j++) {
                    if (x[i][j] != 0) {
                        columns.add(j);
                        values.add(x[i][j]);
                    }
                }
                rowStart[i + 1] = columns.size();
            }
            builder.sparseFeatures(N, D, rowStart, columns.stream().mapToInt(Integer::intValue).toArray(),
                    values.stream().mapToDouble(Double::doubleValue).toArray());
        } else {
            builder.features(x);
        }
        if (weighted) {
            double[] w = new double[N];
            for (int i = 0; i < N; i++) {
                w[i] = 0.2 + 2 * rng.nextDouble();
            }
            builder.weights(w);
        }
        return builder.build();
    }

    private static int[] batch(RandomGenerator rng, int length) {
        int[] batch = new int[length + 7];
        for (int k = 0; k < batch.length; k++) {
            batch[k] = rng.nextInt(N);
        }
        return batch;
    }

    @ParameterizedTest(name = "sparse={0}, weighted={1}, threads={2}, B={3}")
    @CsvSource({"false, false, 2, 2048", "true, false, 2, 2048", "false, true, 3, 2047", "true, true, 4, 1500",
            "false, false, 2, 1024", "false, true, 7, 4001"})
    void splitGradientMatchesOneThreadToRounding(boolean sparse, boolean weighted, int threads, int length) {
        // Both compute (1/B) Σ s_k ω_i ℓ'(z_i)(x_i, 1) + ∇R; only the association of the sum differs, so
        // every coordinate must agree to 1e-12 relative to the sum of absolute terms' scale (elementary
        // floating-point error bound; common practice, no source).
        Dataset data = data(sparse, weighted, 11);
        Penalty penalty = Penalty.elasticNet(0.01, 0.02);
        LinearObjective one = LinearObjective.of(data, Losses.logistic(), penalty, true);
        try (GradientThreads workers = GradientThreads.of(threads, 1024)) {
            LinearObjective split = LinearObjective.of(data, Losses.logistic(), penalty, true, workers);
            RandomGenerator rng = Cases.rng(12);
            int p = D + 1;
            double[] g1 = new double[p];
            double[] g2 = new double[p];
            double worst = 0;
            for (int step = 0; step < 20; step++) {
                double[] h = Cases.gaussianVector(rng, p, 0.5);
                int[] batch = batch(rng, length);
                double[] scales = step % 2 == 0 ? null : Cases.gaussianVector(rng, batch.length, 1.0);
                double loss1 = one.batchGradient(h, batch, scales, 7, length, g1);
                double loss2 = split.batchGradient(h, batch, scales, 7, length, g2);
                assertTrue(workers.running(), "B = " + length + " >= 1024 should start the workers");
                assertEquals(loss1, loss2, 1e-12 * Math.abs(loss1), "batch loss at step " + step);
                double scale = 0;
                for (double v : g1) {
                    scale = Math.max(scale, Math.abs(v));
                }
                for (int j = 0; j < p; j++) {
                    double difference = Math.abs(g1[j] - g2[j]) / scale;
                    worst = Math.max(worst, difference);
                    assertTrue(difference <= 1e-12, "coordinate " + j + " at step " + step + ": " + g1[j] + " vs "
                            + g2[j]);
                }
            }
            System.out.println("split batch gradient, " + (sparse ? "sparse" : "dense") + ", T = " + threads + ", B = "
                    + length + ": largest relative difference from one thread " + worst);
        }
    }

    @Test
    void repeatedEvaluationGivesTheSameBits() {
        Dataset data = data(false, true, 21);
        try (GradientThreads workers = GradientThreads.of(2, 1024)) {
            LinearObjective split = LinearObjective.of(data, Losses.logistic(), Penalty.l2(0.01), true, workers);
            RandomGenerator rng = Cases.rng(22);
            double[] h = Cases.gaussianVector(rng, D + 1, 0.5);
            int[] batch = batch(rng, 2048);
            double[] first = new double[D + 1];
            double[] again = new double[D + 1];
            double firstLoss = split.batchGradient(h, batch, null, 0, 2048, first);
            for (int k = 0; k < 200; k++) {
                double loss = split.batchGradient(h, batch, null, 0, 2048, again);
                assertEquals(Double.doubleToRawLongBits(firstLoss), Double.doubleToRawLongBits(loss), "loss, run " + k);
                assertArrayEquals(first, again, 0.0, "gradient, run " + k);
            }
        }
    }

    @Test
    void batchesBelowTheThresholdStayOnTheCallingThreadBitForBit() {
        Dataset data = data(true, false, 31);
        LinearObjective one = LinearObjective.of(data, Losses.squared(), Penalty.l2(0.01), true);
        try (GradientThreads workers = GradientThreads.of(2, 1024)) {
            LinearObjective split = LinearObjective.of(data, Losses.squared(), Penalty.l2(0.01), true, workers);
            RandomGenerator rng = Cases.rng(32);
            double[] h = Cases.gaussianVector(rng, D + 1, 0.5);
            int[] batch = batch(rng, 1023);
            double[] g1 = new double[D + 1];
            double[] g2 = new double[D + 1];
            assertEquals(one.batchGradient(h, batch, null, 0, 1023, g1), split.batchGradient(h, batch, null, 0, 1023, g2));
            assertArrayEquals(g1, g2, 0.0);
            assertFalse(workers.running(), "a batch below the threshold started the workers");
        }
    }

    /** The squared loss, throwing from its derivative when called on a worker thread. */
    static final class FailingOnWorkers implements Loss {
        private final Loss inner = Losses.squared();
        volatile boolean armed = true;

        @Override
        public double value(double z, double y) {
            return inner.value(z, y);
        }

        @Override
        public double derivative(double z, double y) {
            if (armed && Thread.currentThread().getName().startsWith(GradientThreads.THREAD_NAME_PREFIX)) {
                throw new IllegalStateException("deliberate failure on " + Thread.currentThread().getName());
            }
            return inner.derivative(z, y);
        }

        @Override
        public double smoothness() {
            return inner.smoothness();
        }

        @Override
        public boolean convex() {
            return true;
        }

        @Override
        public TargetDomain domain() {
            return inner.domain();
        }

        @Override
        public Response response() {
            return inner.response();
        }

        @Override
        public String name() {
            return "failing squared";
        }
    }

    @Test
    void aWorkerExceptionIsRethrownOnTheCallerWithoutHanging() {
        Dataset data = data(false, false, 41);
        FailingOnWorkers loss = new FailingOnWorkers();
        try (GradientThreads workers = GradientThreads.of(3, 1024)) {
            LinearObjective split = LinearObjective.of(data, loss, Penalty.none(), true, workers);
            RandomGenerator rng = Cases.rng(42);
            double[] h = Cases.gaussianVector(rng, D + 1, 0.5);
            int[] batch = batch(rng, 3000);
            double[] g = new double[D + 1];
            assertTimeoutPreemptively(Duration.ofSeconds(20), () -> {
                IllegalStateException e = assertThrows(IllegalStateException.class,
                        () -> split.batchGradient(h, batch, null, 0, 3000, g));
                assertTrue(e.getMessage().startsWith("deliberate failure on riskmin-gradient-"), e.getMessage());
                // The workers survive their chunk's failure: the next batch is evaluated normally.
                loss.armed = false;
                split.batchGradient(h, batch, null, 0, 3000, g);
            });
            for (double v : g) {
                assertTrue(Double.isFinite(v));
            }
        }
    }

    private static List<Thread> gradientThreads() {
        List<Thread> found = new ArrayList<>();
        for (Thread t : Thread.getAllStackTraces().keySet()) {
            if (t.getName().startsWith(GradientThreads.THREAD_NAME_PREFIX) && t.isAlive()) {
                found.add(t);
            }
        }
        return found;
    }

    @Test
    void threadsStartAtTheFirstLargeBatchAndEndAtClose() {
        Dataset data = data(false, false, 51);
        assertTrue(gradientThreads().isEmpty(), "gradient threads left over from elsewhere: " + gradientThreads());
        GradientThreads workers = GradientThreads.of(3, 1024);
        LinearObjective split = LinearObjective.of(data, Losses.squared(), Penalty.none(), true, workers);
        double[] h = new double[D + 1];
        double[] g = new double[D + 1];
        int[] batch = batch(Cases.rng(52), 2048);
        assertTrue(gradientThreads().isEmpty(), "threads started before the first large batch");
        split.batchGradient(h, batch, null, 0, 2048, g);
        List<Thread> running = gradientThreads();
        assertEquals(2, running.size(), "T - 1 = 2 workers expected: " + running);
        for (Thread t : running) {
            assertTrue(t.isDaemon(), t.getName() + " should be a daemon thread");
        }
        workers.close();
        workers.close(); // idempotent
        assertTrue(gradientThreads().isEmpty(), "threads alive after close: " + gradientThreads());
        IllegalStateException closed = assertThrows(IllegalStateException.class,
                () -> split.batchGradient(h, batch, null, 0, 2048, g));
        assertEquals("the gradient threads of this fit are closed", closed.getMessage());
        split.batchGradient(h, batch, null, 0, 100, g); // small batches never needed the threads
    }

    @Test
    void parallelBatchesAllocateNothingOnEitherThread() {
        java.lang.management.ThreadMXBean bean = ManagementFactory.getThreadMXBean();
        assumeTrue(bean instanceof com.sun.management.ThreadMXBean, "no HotSpot thread allocation counter");
        com.sun.management.ThreadMXBean counters = (com.sun.management.ThreadMXBean) bean;
        assumeTrue(counters.isThreadAllocatedMemorySupported() && counters.isThreadAllocatedMemoryEnabled(),
                "thread allocation counter disabled");
        Dataset data = data(true, true, 61);
        try (GradientThreads workers = GradientThreads.of(2, 1024)) {
            LinearObjective split = LinearObjective.of(data, Losses.logistic(), Penalty.l2(0.01), true, workers);
            RandomGenerator rng = Cases.rng(62);
            double[] h = Cases.gaussianVector(rng, D + 1, 0.5);
            int[] batch = batch(rng, 2048);
            double[] scales = Cases.gaussianVector(rng, batch.length, 1.0);
            double[] g = new double[D + 1];
            double sink = 0;
            for (int k = 0; k < 2000; k++) { // warm-up: let the JIT compile both sides
                sink += split.batchGradient(h, batch, (k & 1) == 0 ? null : scales, 0, 2048, g);
            }
            List<Thread> running = gradientThreads();
            assertEquals(1, running.size());
            long worker = running.get(0).getId();
            long caller = Thread.currentThread().getId();
            long callerBefore = counters.getThreadAllocatedBytes(caller);
            long workerBefore = counters.getThreadAllocatedBytes(worker);
            for (int k = 0; k < 2000; k++) {
                sink += split.batchGradient(h, batch, (k & 1) == 0 ? null : scales, 0, 2048, g);
            }
            long callerBytes = counters.getThreadAllocatedBytes(caller) - callerBefore;
            long workerBytes = counters.getThreadAllocatedBytes(worker) - workerBefore;
            assertTrue(Double.isFinite(sink));
            System.out.println("allocation over 2,000 split batches of 2048: calling thread " + callerBytes
                    + " B, worker " + workerBytes + " B");
            // A small allowance for the measurement itself (common practice, no source).
            assertTrue(callerBytes <= 256, "calling thread allocated " + callerBytes + " B over 2,000 batches");
            assertTrue(workerBytes <= 256, "worker allocated " + workerBytes + " B over 2,000 batches");
        }
    }

    @Test
    void refusesBadThreadCountsAndThresholdsNamingThem() {
        IllegalArgumentException zero = assertThrows(IllegalArgumentException.class, () -> GradientThreads.of(0, 1024));
        assertEquals("threads (0) must be in [1, 64]", zero.getMessage());
        IllegalArgumentException many = assertThrows(IllegalArgumentException.class, () -> GradientThreads.of(65, 1024));
        assertEquals("threads (65) must be in [1, 64]", many.getMessage());
        IllegalArgumentException threshold = assertThrows(IllegalArgumentException.class, () -> GradientThreads.of(2, 0));
        assertEquals("parallelThreshold (0) must be >= 1", threshold.getMessage());
        try (GradientThreads one = GradientThreads.of(1, 1)) {
            Dataset data = data(false, false, 71);
            LinearObjective sequential = LinearObjective.of(data, Losses.squared(), Penalty.none(), true, one);
            double[] g = new double[D + 1];
            sequential.batchGradient(new double[D + 1], batch(Cases.rng(72), 2048), null, 0, 2048, g);
            assertFalse(one.running(), "one thread needs no workers");
        }
        assertThrows(NullPointerException.class,
                () -> LinearObjective.of(data(false, false, 73), Losses.squared(), Penalty.none(), true, null));
    }

    @Test
    void prefetchingRowsChangesNothingAndChecksTheRange() {
        for (boolean sparse : new boolean[] {false, true}) {
            LinearObjective objective = LinearObjective.of(data(sparse, false, 81), Losses.squared(), Penalty.none(), true);
            double[] h = Cases.gaussianVector(Cases.rng(82), D + 1, 1.0);
            double before = objective.value(h);
            objective.prefetchRows(0, N);
            objective.prefetchRows(N - 1, N);
            objective.prefetchRows(5, 5);
            assertEquals(Double.doubleToRawLongBits(before), Double.doubleToRawLongBits(objective.value(h)));
            IndexOutOfBoundsException e = assertThrows(IndexOutOfBoundsException.class,
                    () -> objective.prefetchRows(10, N + 1));
            assertEquals("rows [10, 3001) outside [0, 3000)", e.getMessage());
            assertThrows(IndexOutOfBoundsException.class, () -> objective.prefetchRows(-1, 3));
            assertThrows(IndexOutOfBoundsException.class, () -> objective.prefetchRows(4, 3));
        }
    }
}
