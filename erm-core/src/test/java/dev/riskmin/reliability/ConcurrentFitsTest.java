package dev.riskmin.reliability;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.data.Dataset;
import dev.riskmin.hook.FitControl;
import dev.riskmin.hook.FitListener;
import dev.riskmin.hook.RunInfo;
import dev.riskmin.hook.StepView;
import dev.riskmin.loss.Losses;
import dev.riskmin.method.Averaging;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.model.LinearModel;
import dev.riskmin.model.MulticlassModel;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.sampling.Sampling;
import dev.riskmin.testing.Cases;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.concurrent.Callable;
import java.util.concurrent.CyclicBarrier;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicInteger;
import java.util.function.Function;
import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertSame;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * One {@link Minimizer} shared by 16 threads that fit at once gives each thread exactly (bit for bit)
 * the result of a sequential fit of the same data with the same seed; each fit's listener sees that
 * fit's events only, on its own thread; fitted models predict concurrently exactly as sequentially.
 */
class ConcurrentFitsTest {
    private static final int THREADS = 16;
    private static final int ROUNDS = 3;
    private static final int DATASETS = 4;

    /** Four datasets of different sizes (so a listener can tell them apart), in four target forms. */
    private static final class Data {
        final Dataset[] dense = new Dataset[DATASETS];
        final Dataset[] sparse = new Dataset[DATASETS];
        final Dataset[] binary = new Dataset[DATASETS];
        final Dataset[] classes = new Dataset[DATASETS];

        Data() {
            for (int k = 0; k < DATASETS; k++) {
                RandomGenerator r = Cases.rng(100 + k);
                int n = 200 + 30 * k;
                int d = 6;
                double[][] x = Cases.gaussianMatrix(r, n, d);
                double[] w = Cases.gaussianVector(r, d, 1.0);
                double[] y = Cases.linearTargets(r, x, w, 0.5, 0.4);
                int[] labels = new int[n];
                int[] three = new int[n];
                for (int i = 0; i < n; i++) {
                    labels[i] = y[i] + 0.5 * r.nextGaussian() > 0.5 ? 1 : 0;
                    three[i] = (int) Math.floorMod((long) Math.floor(y[i]), 3);
                }
                dense[k] = Dataset.of(x, y);
                binary[k] = Dataset.of(x, Cases.asDoubles(labels));
                classes[k] = Dataset.builder().features(x).labels(three, 3).build();
                int[] rowStart = new int[n + 1];
                int[] columns = new int[n * d];
                double[] values = new double[n * d];
                int e = 0;
                for (int i = 0; i < n; i++) {
                    for (int j = 0; j < d; j++) {
                        if (r.nextInt(3) == 0) {
                            columns[e] = j;
                            values[e++] = x[i][j];
                        }
                    }
                    rowStart[i + 1] = e;
                }
                sparse[k] = Dataset.builder().sparseFeatures(n, d, rowStart, Arrays.copyOf(columns, e),
                        Arrays.copyOf(values, e)).targets(y).build();
            }
        }
    }

    private static final Data DATA = new Data();

    record Config(String name, Minimizer minimizer, Function<Integer, Dataset> data) {
        @Override
        public String toString() {
            return name;
        }
    }

    static List<Config> configs() {
        return List.of(
                new Config("sgd, default", Minimizer.builder().seed(1).epochs(3).build(), k -> DATA.dense[k]),
                new Config("sgd lazy sparse elastic net", Minimizer.builder().penalty(Penalty.elasticNet(1e-3, 1e-2))
                        .batchSize(4).seed(2).epochs(3).build(), k -> DATA.sparse[k]),
                new Config("saga l1", Minimizer.builder().updateRule(UpdateRule.saga()).penalty(Penalty.l1(1e-2))
                        .seed(3).epochs(3).build(), k -> DATA.dense[k]),
                new Config("adam with replacement, averaged", Minimizer.builder().updateRule(UpdateRule.adam())
                        .sampling(Sampling.withReplacement()).batchSize(5).stepSize(0.01)
                        .averaging(Averaging.polyakRuppert()).seed(4).epochs(3).build(), k -> DATA.dense[k]),
                new Config("svrg importance", Minimizer.builder().updateRule(UpdateRule.svrg())
                        .sampling(Sampling.importance()).batchSize(3).seed(5).epochs(3).build(), k -> DATA.dense[k]),
                new Config("hinge, calibrated default schedule, standardized", Minimizer.builder().loss(Losses.hinge())
                        .standardize(true).seed(6).epochs(3).build(), k -> DATA.binary[k]),
                new Config("softmax stratified nesterov", Minimizer.builder().loss(Losses.softmax())
                        .updateRule(UpdateRule.nesterov(0.5)).sampling(Sampling.stratified()).batchSize(6).seed(7)
                        .epochs(3).build(), k -> DATA.classes[k]));
    }

    /** Records one fit's events and checks that they all belong to that fit. */
    static final class OwnFitLog implements FitListener {
        final int expectedN;
        final List<String> problems = new ArrayList<>();
        Thread thread;
        RunInfo run;
        long steps;
        int epochs;
        Fit finished;

        OwnFitLog(int expectedN) {
            this.expectedN = expectedN;
        }

        private void sameThread(String where) {
            if (thread == null) {
                thread = Thread.currentThread();
            } else if (thread != Thread.currentThread()) {
                problems.add(where + " on thread " + Thread.currentThread().getName() + ", not " + thread.getName());
            }
        }

        @Override
        public void started(RunInfo info) {
            sameThread("started");
            if (run != null) {
                problems.add("started twice");
            }
            run = info;
            if (info.sampleCount() != expectedN) {
                problems.add("started with n = " + info.sampleCount() + ", not " + expectedN);
            }
        }

        @Override
        public void step(StepView view, FitControl control) {
            sameThread("step");
            if (view.step() != steps) {
                problems.add("step " + view.step() + " where " + steps + " was due");
            }
            if (view.sampleCount() != expectedN) {
                problems.add("a step of a fit with n = " + view.sampleCount());
            }
            steps++;
        }

        @Override
        public void epochEnded(StepView view, FitControl control) {
            sameThread("epochEnded");
            epochs++;
            if (view.epoch() != epochs) {
                problems.add("epoch " + view.epoch() + " where " + epochs + " was due");
            }
        }

        @Override
        public void finished(Fit fit) {
            sameThread("finished");
            finished = fit;
        }
    }

    /** One fit with its own log; checks the log against the fit it returned. */
    private static Fit fitAndCheck(Config c, int k) {
        Dataset data = c.data().apply(k);
        OwnFitLog log = new OwnFitLog(data.size());
        Fit fit = c.minimizer().fit(data, FitOptions.listeners(log));
        assertTrue(log.problems.isEmpty(), log.problems.toString());
        assertSame(fit, log.finished, "finished() got another fit");
        assertEquals(fit.steps(), log.steps, "one step event per step");
        assertEquals(Thread.currentThread(), log.thread);
        return fit;
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("configs")
    void sixteenThreadsSharingOneMinimizerGetTheSequentialResultsBitForBit(Config c) throws Exception {
        double[][] expected = new double[DATASETS][];
        for (int k = 0; k < DATASETS; k++) {
            expected[k] = fitAndCheck(c, k).parameters();
        }
        CyclicBarrier start = new CyclicBarrier(THREADS);
        AtomicInteger names = new AtomicInteger();
        ExecutorService pool = Executors.newFixedThreadPool(THREADS,
                task -> new Thread(task, "concurrent-fit-" + names.incrementAndGet()));
        try {
            List<Future<double[][]>> results = new ArrayList<>();
            for (int t = 0; t < THREADS; t++) {
                int k = t % DATASETS;
                Callable<double[][]> work = () -> {
                    start.await(30, TimeUnit.SECONDS); // all sixteen fit at once
                    double[][] out = new double[ROUNDS][];
                    for (int round = 0; round < ROUNDS; round++) {
                        out[round] = fitAndCheck(c, k).parameters();
                    }
                    return out;
                };
                results.add(pool.submit(work));
            }
            for (int t = 0; t < THREADS; t++) {
                double[][] got = results.get(t).get(60, TimeUnit.SECONDS);
                for (double[] parameters : got) {
                    assertArrayEquals(expected[t % DATASETS], parameters, 0.0, "thread " + t);
                }
            }
        } finally {
            pool.shutdownNow();
            assertTrue(pool.awaitTermination(30, TimeUnit.SECONDS));
        }
    }

    @Test
    void fittedModelsPredictConcurrentlyExactlyAsSequentially() throws Exception {
        LinearModel logistic = Minimizer.builder().loss(Losses.logistic()).seed(8).epochs(3).build()
                .fit(DATA.binary[0]).model();
        MulticlassModel softmax = Minimizer.builder().loss(Losses.softmax()).seed(9).epochs(3).build()
                .fit(DATA.classes[0]).multiclassModel();
        RandomGenerator r = Cases.rng(77);
        double[][] rows = Cases.gaussianMatrix(r, 2000, 6);
        double[] expected = predictions(logistic, softmax, rows);
        CyclicBarrier start = new CyclicBarrier(THREADS);
        ExecutorService pool = Executors.newFixedThreadPool(THREADS, task -> new Thread(task, "concurrent-predict"));
        try {
            List<Future<double[]>> results = new ArrayList<>();
            for (int t = 0; t < THREADS; t++) {
                results.add(pool.submit(() -> {
                    start.await(30, TimeUnit.SECONDS);
                    return predictions(logistic, softmax, rows);
                }));
            }
            for (Future<double[]> f : results) {
                assertArrayEquals(expected, f.get(60, TimeUnit.SECONDS), 0.0);
            }
        } finally {
            pool.shutdownNow();
            assertTrue(pool.awaitTermination(30, TimeUnit.SECONDS));
        }
    }

    /** Every prediction the two models offer, for every row, repeated so the threads overlap. */
    private static double[] predictions(LinearModel binary, MulticlassModel multiclass, double[][] rows) {
        double[] out = new double[rows.length * 6];
        double[] probabilities = new double[3];
        for (int repeat = 0; repeat < 20; repeat++) {
            for (int i = 0; i < rows.length; i++) {
                out[6 * i] = binary.decisionValue(rows[i]);
                out[6 * i + 1] = binary.probability(rows[i]);
                out[6 * i + 2] = multiclass.predictClass(rows[i]);
                multiclass.probabilities(rows[i], probabilities);
                System.arraycopy(probabilities, 0, out, 6 * i + 3, 3);
            }
        }
        return out;
    }
}
