package dev.riskmin.objective;

import dev.riskmin.data.Dataset;
import dev.riskmin.loss.Loss;
import dev.riskmin.loss.Losses;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.testing.Cases;

import java.util.random.RandomGenerator;

/**
 * One seeded single-output linear problem for the objective tests: n in [5, 30], d in [1, 6], about
 * 40% zero features, with or without intercept and weights, squared or logistic loss (logistic
 * targets as {0,1}, ±1 or proportions), no penalty, L2 or elastic net, and a parameter vector whose
 * penalized coordinates stay at least 0.1 away from the L1 kink at zero.
 */
final class LinearCase {
    final int n;
    final int d;
    final double[][] x;
    final double[] y;
    final double[] weights;   // null: unweighted
    final Loss loss;
    final Penalty penalty;
    final boolean intercept;
    final double[] h;

    private LinearCase(RandomGenerator rng) {
        n = 5 + rng.nextInt(26);
        d = 1 + rng.nextInt(6);
        x = new double[n][d];
        for (int i = 0; i < n; i++) {
            for (int j = 0; j < d; j++) {
                x[i][j] = rng.nextDouble() < 0.4 ? 0.0 : rng.nextGaussian();
            }
        }
        boolean squared = rng.nextBoolean();
        loss = squared ? Losses.squared() : Losses.logistic();
        y = new double[n];
        int encoding = rng.nextInt(3);
        for (int i = 0; i < n; i++) {
            if (squared) {
                y[i] = 2 * rng.nextGaussian();
            } else if (encoding == 0) {
                y[i] = rng.nextInt(2);
            } else if (encoding == 1) {
                y[i] = 2 * rng.nextInt(2) - 1;
            } else {
                y[i] = rng.nextDouble();
            }
        }
        if (rng.nextBoolean()) {
            weights = new double[n];
            for (int i = 0; i < n; i++) {
                weights[i] = rng.nextDouble() < 0.1 ? 0.0 : 3 * rng.nextDouble();
            }
            weights[rng.nextInt(n)] = 1.0; // never all zero
        } else {
            weights = null;
        }
        switch (rng.nextInt(3)) {
            case 0:
                penalty = Penalty.none();
                break;
            case 1:
                penalty = Penalty.l2(rng.nextDouble());
                break;
            default:
                penalty = Penalty.elasticNet(0.5 * rng.nextDouble(), rng.nextDouble());
                break;
        }
        intercept = rng.nextBoolean();
        int p = intercept ? d + 1 : d;
        h = new double[p];
        for (int j = 0; j < p; j++) {
            double v = 0.1 + Math.abs(rng.nextGaussian());
            h[j] = rng.nextBoolean() ? v : -v;
        }
    }

    static LinearCase of(long seed) {
        return new LinearCase(Cases.rng(seed));
    }

    /** The dataset with dense features. */
    Dataset dense() {
        Dataset.Builder b = Dataset.builder().features(x).targets(y);
        if (weights != null) {
            b.weights(weights);
        }
        return b.build();
    }

    /** The same matrix in compressed sparse rows, zeros left out. */
    Dataset sparse() {
        int nnz = 0;
        for (double[] row : x) {
            for (double v : row) {
                if (v != 0) {
                    nnz++;
                }
            }
        }
        int[] rowStart = new int[n + 1];
        int[] columns = new int[nnz];
        double[] values = new double[nnz];
        int k = 0;
        for (int i = 0; i < n; i++) {
            rowStart[i] = k;
            for (int j = 0; j < d; j++) {
                if (x[i][j] != 0) {
                    columns[k] = j;
                    values[k] = x[i][j];
                    k++;
                }
            }
        }
        rowStart[n] = k;
        Dataset.Builder b = Dataset.builder().sparseFeatures(n, d, rowStart, columns, values).targets(y);
        if (weights != null) {
            b.weights(weights);
        }
        return b.build();
    }

    LinearObjective denseObjective() {
        return LinearObjective.of(dense(), loss, penalty, intercept);
    }

    LinearObjective sparseObjective() {
        return LinearObjective.of(sparse(), loss, penalty, intercept);
    }

    int dimension() {
        return h.length;
    }

    /** ‖a − b‖<sub>∞</sub> / max(‖a‖<sub>∞</sub>, tiny). */
    static double relativeDifference(double[] a, double[] b) {
        double diff = 0;
        double scale = 1e-300;
        for (int j = 0; j < a.length; j++) {
            diff = Math.max(diff, Math.abs(a[j] - b[j]));
            scale = Math.max(scale, Math.abs(a[j]));
        }
        return diff / scale;
    }

    @Override
    public String toString() {
        return "n=" + n + ", d=" + d + ", " + loss.name() + ", " + penalty.name() + ", intercept=" + intercept
                + ", weighted=" + (weights != null);
    }
}
