package dev.riskmin.diagnostics.estimator;

import dev.riskmin.objective.Objective;

/**
 * Per-sample gradients of a whole problem, computed directly from the objective (as the probe
 * defines them: the sample's weighted loss gradient plus the smooth penalty gradient), and the exact
 * noise figures written out by definition — the independent side of the estimator tests.
 */
final class Gradients {
    final int n;
    final int p;
    final double[] rows;   // n × p, row-major
    final double[] mean;   // G

    private Gradients(int n, int p, double[] rows) {
        this.n = n;
        this.p = p;
        this.rows = rows;
        this.mean = new double[p];
        for (int i = 0; i < n; i++) {
            for (int c = 0; c < p; c++) {
                mean[c] += rows[i * p + c] / n;
            }
        }
    }

    static Gradients of(Objective objective, double[] h) {
        int n = objective.size();
        int p = objective.dimension();
        double[] rows = new double[n * p];
        double[] g = new double[p];
        for (int i = 0; i < n; i++) {
            java.util.Arrays.fill(g, 0);
            objective.addSampleGradient(h, i, 1.0, g);
            objective.addPenaltyGradient(h, 1.0, g);
            System.arraycopy(g, 0, rows, i * p, p);
        }
        return new Gradients(n, p, rows);
    }

    static Gradients of(double[][] g) {
        int p = g[0].length;
        double[] rows = new double[g.length * p];
        for (int i = 0; i < g.length; i++) {
            System.arraycopy(g[i], 0, rows, i * p, p);
        }
        return new Gradients(g.length, p, rows);
    }

    double component(int i, int c) {
        return rows[i * p + c];
    }

    /** tr Σ = (1/n) Σ ‖g_i − G‖², by definition. */
    double traceSigma() {
        return traceSigma(allMembers());
    }

    /** tr S² = n tr Σ/(n − 1). */
    double traceS2() {
        return traceSigma() * n / (n - 1);
    }

    /** tr S²<sub>h</sub> of the given members, by definition: (1/(N_h − 1)) Σ ‖g_i − G_h‖². */
    double traceS2(int[] members) {
        return traceSigma(members) * members.length / (members.length - 1);
    }

    double traceSigma(int[] members) {
        double[] m = meanOf(members);
        double sum = 0;
        for (int i : members) {
            for (int c = 0; c < p; c++) {
                double d = component(i, c) - m[c];
                sum += d * d;
            }
        }
        return sum / members.length;
    }

    double[] meanOf(int[] members) {
        double[] m = new double[p];
        for (int i : members) {
            for (int c = 0; c < p; c++) {
                m[c] += component(i, c);
            }
        }
        for (int c = 0; c < p; c++) {
            m[c] /= members.length;
        }
        return m;
    }

    double normSquaredOfMean() {
        double s = 0;
        for (double v : mean) {
            s += v * v;
        }
        return s;
    }

    /** The rows of the given samples (with repeats), as a B × p block. */
    double[] block(int[] batch) {
        double[] out = new double[batch.length * p];
        for (int k = 0; k < batch.length; k++) {
            System.arraycopy(rows, batch[k] * p, out, k * p, p);
        }
        return out;
    }

    private int[] allMembers() {
        int[] all = new int[n];
        for (int i = 0; i < n; i++) {
            all[i] = i;
        }
        return all;
    }
}
