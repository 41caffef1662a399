package dev.riskmin.examples.bench;

import dev.riskmin.data.Dataset;

import java.util.SplittableRandom;
import java.util.stream.IntStream;

/**
 * Seeded synthetic data for the benchmarks: standard-normal features (well conditioned: the
 * covariance is the identity), targets from a planted linear model β with β<sub>j</sub> ~ N(0, 1/d),
 * so that x·β has unit variance whatever d is. Generation is split into fixed chunks, each with its
 * own generator, so the data do not depend on how many threads generate them.
 */
public final class SyntheticData {
    private static final int CHUNK = 1 << 20;

    private SyntheticData() {
    }

    /** @return count independent N(0, 1) draws */
    public static double[] gaussian(int count, long seed) {
        double[] out = new double[count];
        int chunks = (count + CHUNK - 1) / CHUNK;
        IntStream.range(0, chunks).parallel().forEach(c -> {
            SplittableRandom rng = new SplittableRandom(seed * 0x9E3779B97F4A7C15L + c);
            for (int k = c * CHUNK, end = Math.min(count, k + CHUNK); k < end; k++) {
                out[k] = rng.nextGaussian();
            }
        });
        return out;
    }

    /** @return the planted coefficients, β<sub>j</sub> ~ N(0, 1/d) */
    public static double[] plantedCoefficients(int d, long seed) {
        double[] beta = gaussian(d, seed ^ 0x5DEECE66DL);
        double s = 1.0 / Math.sqrt(d);
        for (int j = 0; j < d; j++) {
            beta[j] *= s;
        }
        return beta;
    }

    /**
     * y<sub>i</sub> = x<sub>i</sub>·β + σ e<sub>i</sub> with e<sub>i</sub> ~ N(0, 1), or, for labels,
     * y<sub>i</sub> = 1 if x<sub>i</sub>·β + σ e<sub>i</sub> &gt; 0 and 0 otherwise.
     *
     * @param x row-major, n rows of d features; read only
     */
    public static double[] targets(double[] x, int n, int d, double[] beta, double sigma, boolean labels, long seed) {
        double[] y = new double[n];
        int chunks = (n + CHUNK - 1) / CHUNK;
        IntStream.range(0, chunks).parallel().forEach(c -> {
            SplittableRandom rng = new SplittableRandom(seed * 0xBF58476D1CE4E5B9L + c);
            for (int i = c * CHUNK, end = Math.min(n, i + CHUNK); i < end; i++) {
                double z = 0;
                for (int j = 0, base = i * d; j < d; j++) {
                    z += x[base + j] * beta[j];
                }
                z += sigma * rng.nextGaussian();
                y[i] = labels ? (z > 0 ? 1.0 : 0.0) : z;
            }
        });
        return y;
    }

    /** A dense classification data set over x (wrapped, not copied) with planted labels. */
    public static Dataset denseLabels(double[] x, int n, int d, long seed) {
        double[] y = targets(x, n, d, plantedCoefficients(d, seed), 0.5, true, seed);
        return Dataset.builder().flatFeatures(x, n, d, false).targets(y).build();
    }

    /**
     * A CSR classification data set: n rows with {@code perRow} distinct columns drawn uniformly from
     * [0, columns), sorted, values N(0, 1), labels from a planted β as above.
     */
    public static Dataset sparseLabels(int n, int columns, int perRow, long seed) {
        int[] rowStart = new int[n + 1];
        for (int i = 0; i <= n; i++) {
            rowStart[i] = i * perRow;
        }
        int[] index = new int[n * perRow];
        double[] values = new double[n * perRow];
        double[] y = new double[n];
        double[] beta = plantedCoefficients(columns, seed);
        int chunks = (n + CHUNK - 1) / CHUNK;
        IntStream.range(0, chunks).parallel().forEach(c -> {
            SplittableRandom rng = new SplittableRandom(seed * 0x94D049BB133111EBL + c);
            int[] row = new int[perRow];
            for (int i = c * CHUNK, end = Math.min(n, i + CHUNK); i < end; i++) {
                int filled = 0;
                while (filled < perRow) {
                    int col = rng.nextInt(columns);
                    boolean seen = false;
                    for (int k = 0; k < filled && !seen; k++) {
                        seen = row[k] == col;
                    }
                    if (!seen) {
                        row[filled++] = col;
                    }
                }
                java.util.Arrays.sort(row);
                double z = 0;
                for (int k = 0; k < perRow; k++) {
                    double v = rng.nextGaussian();
                    index[i * perRow + k] = row[k];
                    values[i * perRow + k] = v;
                    z += v * beta[row[k]] * Math.sqrt((double) columns / perRow);
                }
                y[i] = z + 0.5 * rng.nextGaussian() > 0 ? 1.0 : 0.0;
            }
        });
        return Dataset.builder().sparseFeatures(n, columns, rowStart, index, values).targets(y).build();
    }
}
