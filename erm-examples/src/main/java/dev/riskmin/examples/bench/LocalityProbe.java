package dev.riskmin.examples.bench;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.SplittableRandom;

/**
 * Figure 2's control experiment, outside the library: the step's arithmetic alone (a dot product
 * with four sums, a logistic derivative, an axpy into the coefficients) over the rows of the same
 * array in three orders: sequential; a random permutation; and the random permutation with each run
 * of {@value #GATHER} rows first copied into a contiguous buffer and then processed from it. The
 * copy's loads do not depend on one another, so many cache misses are in flight at once, where the
 * step loop waits for one row at a time. It tells how much of figure 2's ratio belongs to the
 * memory system rather than to the fit loop, and what gathering rows would recover. Information
 * only: paired ratios against the sequential order, median of the repetitions.
 */
final class LocalityProbe {
    static final int GATHER = 1024;
    private static volatile double sink;

    private LocalityProbe() {
    }

    static List<ResultRow> run(BenchSettings s, double[] x, int d) {
        int n = x.length / d;
        int[] sequential = new int[n];
        for (int i = 0; i < n; i++) {
            sequential[i] = i;
        }
        int[] shuffled = sequential.clone();
        SplittableRandom rng = new SplittableRandom(2);
        for (int i = n - 1; i > 0; i--) {
            int j = rng.nextInt(i + 1);
            int t = shuffled[i];
            shuffled[i] = shuffled[j];
            shuffled[j] = t;
        }
        double[] v = new double[d];
        double[] buffer = new double[GATHER * d];
        int reps = s.repetitions() + 1;
        double[] seq = new double[reps];
        double[] rnd = new double[reps];
        double[] gathered = new double[reps];
        for (int r = 0; r < reps; r++) {
            long t0 = System.nanoTime();
            sink = pass(x, sequential, d, v);
            long t1 = System.nanoTime();
            sink = pass(x, shuffled, d, v);
            long t2 = System.nanoTime();
            sink = gatheredPass(x, shuffled, d, v, buffer);
            long t3 = System.nanoTime();
            seq[r] = t1 - t0;
            rnd[r] = t2 - t1;
            gathered[r] = t3 - t2;
        }
        // The first round compiles the loops; it is left out.
        seq = java.util.Arrays.copyOfRange(seq, 1, reps);
        rnd = java.util.Arrays.copyOfRange(rnd, 1, reps);
        gathered = java.util.Arrays.copyOfRange(gathered, 1, reps);
        double random = Timing.pairedRatio(rnd, seq);
        double gather = Timing.pairedRatio(gathered, seq);
        double perRow = Timing.median(seq) / n;
        Timing.log("[2] control loop d=%d: sequential %.0f ns/row, random %.2fx, gathered %.2fx", d, perRow, random,
                gather);
        List<ResultRow> rows = new ArrayList<>();
        String note = String.format(Locale.ROOT, "the step's arithmetic outside the library; sequential %.0f ns/row",
                perRow);
        rows.add(new ResultRow("2 control loop, random / sequential d=" + d, "random " + Timing.duration(Timing.median(rnd)),
                "sequential " + Timing.duration(Timing.median(seq)), random, null, note));
        rows.add(new ResultRow("2 control loop, gathered / sequential d=" + d, "random, " + GATHER
                + " rows gathered at a time " + Timing.duration(Timing.median(gathered)),
                "sequential " + Timing.duration(Timing.median(seq)), gather, null, note));
        return rows;
    }

    private static double step(double[] x, int base, int d, double[] v) {
        double s0 = 0, s1 = 0, s2 = 0, s3 = 0;
        int j = 0;
        for (; j + 3 < d; j += 4) {
            s0 += x[base + j] * v[j];
            s1 += x[base + j + 1] * v[j + 1];
            s2 += x[base + j + 2] * v[j + 2];
            s3 += x[base + j + 3] * v[j + 3];
        }
        for (; j < d; j++) {
            s0 += x[base + j] * v[j];
        }
        double z = (s0 + s1) + (s2 + s3);
        double c = 1e-3 * (1.0 / (1.0 + Math.exp(-z)) - 0.5);
        for (j = 0; j < d; j++) {
            v[j] -= c * x[base + j];
        }
        return z;
    }

    private static double pass(double[] x, int[] order, int d, double[] v) {
        double sum = 0;
        for (int i : order) {
            sum += step(x, i * d, d, v);
        }
        return sum;
    }

    private static double gatheredPass(double[] x, int[] order, int d, double[] v, double[] buffer) {
        double sum = 0;
        for (int k0 = 0; k0 < order.length; k0 += GATHER) {
            int m = Math.min(GATHER, order.length - k0);
            for (int k = 0; k < m; k++) {
                System.arraycopy(x, order[k0 + k] * d, buffer, k * d, d);
            }
            for (int k = 0; k < m; k++) {
                sum += step(buffer, k * d, d, v);
            }
        }
        return sum;
    }
}
