package dev.riskmin.testing;

import java.util.random.RandomGenerator;
import java.util.random.RandomGeneratorFactory;
import java.util.stream.LongStream;

/**
 * Seeded case generation for property-style tests. Use as
 * {@code @ParameterizedTest(name = "seed={0}") @MethodSource("dev.riskmin.testing.Cases#seeds200")}
 * so that the display name carries the seed and any failure can be replayed with {@link #rng(long)}.
 */
public final class Cases {
    private Cases() {
    }

    /** Seeds 1 … 200, each a distinct case. */
    public static LongStream seeds200() {
        return seeds(200);
    }

    /** Seeds 1 … 50. */
    public static LongStream seeds50() {
        return seeds(50);
    }

    /** Seeds 1 … 20. */
    public static LongStream seeds20() {
        return seeds(20);
    }

    /** Seeds 1 … count, spread out so neighbouring cases share no generator state. */
    public static LongStream seeds(int count) {
        return LongStream.rangeClosed(1, count).map(k -> 0x9E3779B97F4A7C15L * k + 12345L);
    }

    /** The generator every case draws from; the same seed gives the same sequence on every JVM. */
    public static RandomGenerator rng(long seed) {
        return RandomGeneratorFactory.of("L64X128MixRandom").create(seed);
    }

    /** A standard normal draw (Box–Muller on the given generator). */
    public static double normal(RandomGenerator rng) {
        return rng.nextGaussian();
    }

    /** An n-by-d matrix of independent N(0, 1) entries. */
    public static double[][] gaussianMatrix(RandomGenerator rng, int n, int d) {
        double[][] x = new double[n][d];
        for (int i = 0; i < n; i++) {
            for (int j = 0; j < d; j++) {
                x[i][j] = rng.nextGaussian();
            }
        }
        return x;
    }

    /** A vector of independent N(0, scale²) entries. */
    public static double[] gaussianVector(RandomGenerator rng, int d, double scale) {
        double[] v = new double[d];
        for (int j = 0; j < d; j++) {
            v[j] = scale * rng.nextGaussian();
        }
        return v;
    }

    /** y<sub>i</sub> = x<sub>i</sub>·w + b + noise·N(0,1). */
    public static double[] linearTargets(RandomGenerator rng, double[][] x, double[] w, double b, double noise) {
        double[] y = new double[x.length];
        for (int i = 0; i < x.length; i++) {
            double z = b;
            for (int j = 0; j < w.length; j++) {
                z += x[i][j] * w[j];
            }
            y[i] = z + noise * rng.nextGaussian();
        }
        return y;
    }

    /** Labels in {0, 1} drawn from P(y = 1) = σ(x<sub>i</sub>·w + b). */
    public static int[] logisticLabels(RandomGenerator rng, double[][] x, double[] w, double b) {
        int[] y = new int[x.length];
        for (int i = 0; i < x.length; i++) {
            double z = b;
            for (int j = 0; j < w.length; j++) {
                z += x[i][j] * w[j];
            }
            y[i] = rng.nextDouble() < 1.0 / (1.0 + Math.exp(-z)) ? 1 : 0;
        }
        return y;
    }

    /** Converts int labels to doubles. */
    public static double[] asDoubles(int[] labels) {
        double[] y = new double[labels.length];
        for (int i = 0; i < labels.length; i++) {
            y[i] = labels[i];
        }
        return y;
    }

    /** Relative difference |a − b| / max(|a|, |b|, tiny). */
    public static double relativeError(double a, double b) {
        double scale = Math.max(Math.max(Math.abs(a), Math.abs(b)), 1e-300);
        return Math.abs(a - b) / scale;
    }

    /** The number of agreeing significant digits, −log10 of the relative error (capped at 17). */
    public static double digits(double actual, double expected) {
        double rel = Math.abs(actual - expected) / Math.abs(expected);
        return rel == 0 ? 17.0 : Math.min(17.0, -Math.log10(rel));
    }
}
