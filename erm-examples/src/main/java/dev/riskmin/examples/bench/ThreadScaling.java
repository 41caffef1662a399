package dev.riskmin.examples.bench;

import dev.riskmin.Fit;
import dev.riskmin.Minimizer;
import dev.riskmin.data.Dataset;
import dev.riskmin.loss.Losses;
import dev.riskmin.method.UpdateRule;

import java.lang.reflect.Method;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;

/**
 * Figure 7: two threads on a large batch. Plain SGD, logistic loss, dense n × 100 features of the
 * configured size, batch 1024 and 4096, 3 epochs; the whole fit is timed with
 * {@code threads(1)} and {@code threads(2)} alternating. Ratio = time(1) / time(2), target ≥ 1.6;
 * the row also says whether two 2-thread runs gave bit-identical parameters (a fail if not).
 *
 * <p>{@code Minimizer.Builder#threads(int)} is looked up by reflection because it is being added on
 * another branch; once it is merged, call it directly.
 */
final class ThreadScaling {
    /** SWITCH: the builder method looked up; replace the reflection once it exists. */
    static final String THREADS_OPTION = "threads";
    private static final int D = 100;
    private static final int[] BATCHES = {1024, 4096};
    private static final Target TARGET = Target.atLeast(1.6);

    private ThreadScaling() {
    }

    /** @return the builder's threads(int) method, or null */
    static Method threadsOption() {
        try {
            return Minimizer.Builder.class.getMethod(THREADS_OPTION, int.class);
        } catch (NoSuchMethodException e) {
            return null;
        }
    }

    static List<ResultRow> run(BenchSettings s) {
        Method threads = threadsOption();
        if (threads == null) {
            Timing.log("[7] Minimizer.Builder.%s(int) not available: skipped", THREADS_OPTION);
            List<ResultRow> rows = new ArrayList<>();
            for (int b : BATCHES) {
                rows.add(ResultRow.unavailable("7 two threads / one, B=" + b, "not available", TARGET,
                        "Minimizer.Builder." + THREADS_OPTION + "(int) not available"));
            }
            return rows;
        }
        int entries = s.denseEntries();
        int n = entries / D;
        Dataset data = SyntheticData.denseLabels(SyntheticData.gaussian(entries, 7), n, D, 7);
        int epochs = s.quick() ? 1 : 3;
        List<ResultRow> rows = new ArrayList<>();
        for (int b : BATCHES) {
            Minimizer one = build(threads, 1, b, epochs);
            Minimizer two = build(threads, 2, b, epochs);
            one.fit(data);
            Fit reference = two.fit(data);
            int reps = s.quick() ? 1 : 3;
            double[] t1 = new double[reps];
            double[] t2 = new double[reps];
            boolean identical = true;
            for (int r = 0; r < reps; r++) {
                long start = System.nanoTime();
                one.fit(data);
                t1[r] = System.nanoTime() - start;
                start = System.nanoTime();
                Fit again = two.fit(data);
                t2[r] = System.nanoTime() - start;
                identical &= Arrays.equals(reference.parameters(), again.parameters());
            }
            double a = Timing.median(t1);
            double c = Timing.median(t2);
            double ratio = Timing.pairedRatio(t1, t2);
            Timing.log("[7] B=%d: 1 thread %s, 2 threads %s, speed-up %.2f, identical %s", b, Timing.duration(a),
                    Timing.duration(c), ratio, identical);
            // A run-to-run difference fails the row whatever the speed-up: report it as ratio 0.
            rows.add(new ResultRow("7 two threads / one, B=" + b, "2 threads " + Timing.duration(c),
                    "1 thread " + Timing.duration(a), identical ? ratio : 0.0, TARGET,
                    String.format(Locale.ROOT, "%s; n=%d, d=%d, %d epochs", identical
                            ? "bit-identical run to run" : "NOT bit-identical run to run (speed-up " + ratio + ")",
                            n, D, epochs)));
        }
        return rows;
    }

    private static Minimizer build(Method threads, int count, int batch, int epochs) {
        Minimizer.Builder b = Minimizer.builder()
                .loss(Losses.logistic())
                .updateRule(UpdateRule.sgd())
                .batchSize(batch)
                .stepSize(2.0 / (D + 1))
                .epochs(epochs)
                .seed(7);
        try {
            threads.invoke(b, count);
        } catch (ReflectiveOperationException e) {
            throw new IllegalStateException("Minimizer.Builder." + THREADS_OPTION + "(" + count + ") failed: " + e, e);
        }
        return b.build();
    }
}
