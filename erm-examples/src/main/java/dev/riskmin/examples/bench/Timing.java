package dev.riskmin.examples.bench;

import java.util.Arrays;
import java.util.Locale;
import java.util.function.LongSupplier;

/** Small timing helpers: medians, a summing pass over an array, readable durations. */
public final class Timing {
    /** Keeps the summing pass's result reachable so the JIT cannot drop the loop. */
    private static volatile double sink;

    private Timing() {
    }

    /** @return the median (the mean of the two middle values for an even count); NaN if empty */
    public static double median(double[] values) {
        if (values.length == 0) {
            return Double.NaN;
        }
        double[] v = values.clone();
        Arrays.sort(v);
        int m = v.length / 2;
        return v.length % 2 == 1 ? v[m] : 0.5 * (v[m - 1] + v[m]);
    }

    /**
     * The median of the ratios a[r]/b[r] of runs made one after the other: a burst of load from
     * other processes then tends to move both sides of one ratio, which the ratio of two medians
     * would not undo.
     */
    public static double pairedRatio(double[] a, double[] b) {
        if (a.length != b.length) {
            throw new IllegalArgumentException("paired timings differ in length: " + a.length + " and " + b.length);
        }
        double[] r = new double[a.length];
        for (int k = 0; k < a.length; k++) {
            r[k] = a[k] / b[k];
        }
        return median(r);
    }

    /** @return the median of {@code reps} runs of the timed action (each returns nanoseconds) */
    public static double medianNanos(int reps, LongSupplier timed) {
        double[] t = new double[reps];
        for (int r = 0; r < reps; r++) {
            t[r] = timed.getAsLong();
        }
        return median(t);
    }

    /**
     * Times one sequential summing pass over x[0, length): the baseline "plain read" of an array.
     * Four independent sums keep the loop limited by memory rather than by the latency of one add
     * chain (a strict double sum cannot be reordered, so the JIT does not vectorize it).
     *
     * @return nanoseconds
     */
    public static long sequentialRead(double[] x, int length) {
        long start = System.nanoTime();
        double s0 = 0, s1 = 0, s2 = 0, s3 = 0;
        int k = 0;
        for (; k + 3 < length; k += 4) {
            s0 += x[k];
            s1 += x[k + 1];
            s2 += x[k + 2];
            s3 += x[k + 3];
        }
        for (; k < length; k++) {
            s0 += x[k];
        }
        long nanos = System.nanoTime() - start;
        sink = (s0 + s1) + (s2 + s3);
        return nanos;
    }

    /** @return "12.3 ms" or "4.56 s" */
    public static String duration(double nanos) {
        if (nanos >= 1e9) {
            return String.format(Locale.ROOT, "%.3g s", nanos / 1e9);
        }
        return String.format(Locale.ROOT, "%.3g ms", nanos / 1e6);
    }

    /** @return bytes per second as "1.23 GB/s" */
    public static String rate(double bytes, double nanos) {
        return String.format(Locale.ROOT, "%.3g GB/s", bytes / nanos);
    }

    /** Prints a progress line on standard error (standard output carries the rows). */
    public static void log(String format, Object... args) {
        System.err.println(String.format(Locale.ROOT, format, args));
    }
}
