package dev.riskmin.reliability;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.StopReason;
import dev.riskmin.data.Dataset;
import dev.riskmin.hook.FitControl;
import dev.riskmin.hook.FitListener;
import dev.riskmin.hook.StepView;
import dev.riskmin.loss.Losses;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.objective.GeneralObjective;
import dev.riskmin.objective.SampleFunction;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.sampling.Sampling;
import dev.riskmin.testing.LeastSquaresProblem;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.function.Executable;

import java.util.ArrayList;
import java.util.List;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

/**
 * Requests whose memory could never be had are refused up front — quickly, without an
 * OutOfMemoryError and without a long collection first — with an IllegalArgumentException that
 * names the request and its size. (The model file's dimension and size limits are checked in
 * {@code ModelFileLimitsTest}.)
 */
class OutOfMemorySizedRequestsTest {
    private static final LeastSquaresProblem PROBLEM = LeastSquaresProblem.gaussian(41, 100, 3, 0.3);

    /** Runs the request, which must be refused within a second, naming every fragment. */
    private static void refused(Executable request, String... fragments) {
        long start = System.nanoTime();
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, request);
        double seconds = (System.nanoTime() - start) / 1e9;
        assertTrue(seconds < 1, "took " + seconds + " s: " + e.getMessage());
        for (String f : fragments) {
            assertTrue(e.getMessage().contains(f), "'" + f + "' missing from: " + e.getMessage());
        }
    }

    /** The heap-limit checks below need a heap under 16 GiB (the build gives tests 2 GiB). */
    private static void assumeSmallHeap() {
        assumeTrue(Runtime.getRuntime().maxMemory() < (16L << 30), "a heap of 16 GiB or more");
    }

    @Test
    void flatFeaturesWhoseRowsTimesColumnsOverflowAnIntAreRefusedNamingBoth() {
        refused(() -> Dataset.builder().flatFeatures(new double[12], 1 << 20, 1 << 12, false),
                "rows (1048576)", "columns (4096)", "4294967296");
    }

    @Test
    void rowsWhoseEntriesExceedTheLargestArrayAreRefusedBeforeCopying() {
        double[] row = new double[1 << 16];
        double[][] x = new double[1 << 16][];
        java.util.Arrays.fill(x, row); // 2^32 entries, 512 KiB of memory: one row shared by every reference
        refused(() -> Dataset.of(x, new double[1 << 16]), "65536 rows", "65536 columns", "4294967296 entries");
    }

    @Test
    void batchSizeTooLargeForTheHeapIsRefusedAtTheFitNamingIt() {
        Minimizer m = Minimizer.builder().sampling(Sampling.withReplacement()).batchSize(Integer.MAX_VALUE).build();
        refused(() -> m.fit(PROBLEM.data), "batchSize (2147483647)", "largest Java array");
        assumeSmallHeap();
        Minimizer half = Minimizer.builder().sampling(Sampling.importance()).batchSize(1 << 30).build();
        refused(() -> half.fit(PROBLEM.data), "batchSize (1073741824)", "maximum heap");
    }

    @Test
    void requestedAndProbeBatchesTooLargeForTheHeapAreRefusedToTheListenerAndTheFitGoesOn() {
        List<String> messages = new ArrayList<>();
        FitListener greedy = new FitListener() {
            @Override
            public void step(StepView view, FitControl control) {
                if (view.step() == 3) {
                    try {
                        control.requestBatchSize(Integer.MAX_VALUE);
                    } catch (IllegalArgumentException e) {
                        messages.add(e.getMessage());
                    }
                    try {
                        view.probe().independentBatchGradient(Integer.MAX_VALUE, new double[view.dimension()]);
                    } catch (IllegalArgumentException e) {
                        messages.add(e.getMessage());
                    }
                }
            }
        };
        Fit fit = Minimizer.builder().sampling(Sampling.withReplacement()).epochs(2).build()
                .fit(PROBLEM.data, FitOptions.listeners(greedy));
        assertEquals(StopReason.EPOCH_BUDGET, fit.stopReason());
        assertEquals(1, fit.finalBatchSize(), "the refused request changed nothing");
        assertEquals(2, messages.size(), messages.toString());
        assertTrue(messages.get(0).contains("requested batch size (2147483647)"), messages.get(0));
        assertTrue(messages.get(1).contains("independent batch size (2147483647)"), messages.get(1));
    }

    @Test
    void strayHugeClassLabelIsRefusedNamingTheClassesAndParameters() {
        double[][] x = PROBLEM.x;
        int[] labels = new int[x.length];
        for (int i = 0; i < labels.length; i++) {
            labels[i] = i % 2;
        }
        labels[7] = 1_000_000_000; // K = 10^9 + 1 classes of 4 parameters each
        Minimizer m = Minimizer.builder().loss(Losses.softmax()).build();
        refused(() -> m.fit(x, labels), "1000000001 classes", "4000000004 parameters");
        labels[7] = Integer.MAX_VALUE; // K would overflow an int
        refused(() -> m.fit(x, labels), "labels[7] (2147483647)");
    }

    /** A user's model of n = 2^20 samples and p parameters, that must never be evaluated here. */
    private record Huge(int size, int dimension) implements SampleFunction {
        @Override
        public double loss(double[] h, int i) {
            throw new AssertionError("evaluated");
        }

        @Override
        public double addGradient(double[] h, int i, double scale, double[] g) {
            throw new AssertionError("evaluated");
        }
    }

    @Test
    void sagaTableOfAGeneralObjectiveOverTheLimitIsRefusedNamingItsSize() {
        GeneralObjective objective = GeneralObjective.of(new Huge(1 << 20, 1 << 8), Penalty.none());
        Minimizer m = Minimizer.builder().updateRule(UpdateRule.saga()).stepSize(0.1).build();
        refused(() -> m.fit(objective, FitOptions.none()), "1048576 x 256", "268435456 gradient entries");
    }

    @Test
    void generalObjectiveOfAnAbsurdDimensionIsRefusedNamingIt() {
        refused(() -> GeneralObjective.of(new Huge(10, Integer.MAX_VALUE), Penalty.none()),
                "sample function dimension (2147483647)");
        assumeSmallHeap();
        refused(() -> GeneralObjective.of(new Huge(10, 1 << 30), Penalty.none()),
                "sample function dimension (1073741824)", "maximum heap");
    }
}
