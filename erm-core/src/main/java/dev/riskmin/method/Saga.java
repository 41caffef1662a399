package dev.riskmin.method;

import dev.riskmin.objective.LinearStructure;
import dev.riskmin.objective.Objective;
import dev.riskmin.util.Allocations;

import java.util.Arrays;

/**
 * SAGA (Defazio, Bach &amp; Lacoste-Julien, NIPS 2014): a table keeps the last gradient seen for
 * every sample, φ<sub>i</sub>, and its mean φ̄; a step moves along
 * d = (1/B) Σ<sub>k</sub> s<sub>k</sub> (∇f<sub>i<sub>k</sub></sub>(h) − φ<sub>i<sub>k</sub></sub>) + φ̄, then
 * h ← prox<sub>εR</sub>(h − ε d) and φ<sub>i</sub> ← ∇f<sub>i</sub>(h) for the batch (METHODS §7).
 *
 * <p>For a linear model the gradient of sample i is α<sub>i</sub> (x<sub>i</sub>, 1) with the scalar
 * α<sub>i</sub> = ω<sub>i</sub> ℓ'(z<sub>i</sub>, y<sub>i</sub>), so the table holds n scalars rather than n
 * gradients (the paper, §4). Other objectives store n full gradients, refused above
 * {@value #MAX_TABLE_ENTRIES} entries. The table starts from a full pass at h<sub>0</sub> (n evaluations),
 * so the first epoch is already unbiased.
 */
final class Saga implements UpdateRule {
    static final Saga INSTANCE = new Saga();
    /** 2^27 doubles = 1 GiB: beyond this the gradient table of a general objective is refused. */
    static final long MAX_TABLE_ENTRIES = 1L << 27;

    private Saga() {
    }

    @Override
    public Updater start(Objective objective, double[] h0, int stepsPerEpoch) {
        LinearStructure linear = objective.linearStructure();
        if (linear != null) {
            return new LinearState(objective, linear, h0);
        }
        long entries = (long) objective.size() * objective.dimension();
        if (entries > MAX_TABLE_ENTRIES) {
            throw new IllegalArgumentException("SAGA on a general objective stores n x p = " + objective.size() + " x "
                    + objective.dimension() + " = " + entries + " gradient entries (" + (entries * 8 >> 20)
                    + " MiB), more than the limit of " + MAX_TABLE_ENTRIES + "; use SVRG, which stores none");
        }
        Allocations.require("SAGA's gradient table of n x p = " + objective.size() + " x " + objective.dimension(),
                entries, Double.BYTES);
        return new TableState(objective, h0);
    }

    @Override
    public boolean varianceReduced() {
        return true;
    }

    @Override
    public String name() {
        return "saga";
    }

    @Override
    public String toString() {
        return name();
    }

    /** γ = 1/(3L), the step of the paper's main theorem (constant from memory; METHODS §7). */
    @Override
    public double defaultStepSize(double lipschitz) {
        return 1.0 / (3.0 * lipschitz);
    }

    /** Linear models: one scalar per sample. */
    private static final class LinearState implements Updater {
        private final Objective objective;
        private final LinearStructure linear;
        private final double[] alpha;
        private final double[] tableMean;
        private final double[] direction;
        private double[] fresh = new double[1];
        private final double invN;
        private long evaluations;

        LinearState(Objective objective, LinearStructure linear, double[] h0) {
            this.objective = objective;
            this.linear = linear;
            int n = objective.size();
            this.alpha = new double[n];
            this.tableMean = new double[h0.length];
            this.direction = new double[h0.length];
            this.invN = 1.0 / n;
            for (int i = 0; i < n; i++) {
                double a = linear.weightedDerivative(linear.prediction(h0, i), i);
                alpha[i] = a;
                linear.addFeatures(i, a * invN, tableMean);
            }
            evaluations = n;
        }

        @Override
        public double gradient(double[] h, int[] batch, double[] scales, int length, double[] gradient) {
            if (fresh.length < length) {
                fresh = new double[length]; // grows only when a listener asks for a larger batch
            }
            Arrays.fill(gradient, 0.0);
            System.arraycopy(tableMean, 0, direction, 0, direction.length);
            double inv = 1.0 / length;
            double loss = 0;
            for (int k = 0; k < length; k++) {
                int i = batch[k];
                double s = scales == null ? inv : scales[k] * inv;
                double z = linear.prediction(h, i);
                double a = linear.weightedDerivative(z, i);
                loss += s * linear.weightedLoss(z, i);
                linear.addFeatures(i, s * a, gradient);
                double change = a - alpha[i];
                if (change != 0) {
                    linear.addFeatures(i, s * change, direction);
                }
                fresh[k] = a;
            }
            objective.addPenaltyGradient(h, 1.0, gradient);
            objective.addPenaltyGradient(h, 1.0, direction);
            for (int k = 0; k < length; k++) {
                int i = batch[k];
                double change = fresh[k] - alpha[i];
                if (change != 0) {
                    linear.addFeatures(i, change * invN, tableMean);
                    alpha[i] = fresh[k];
                }
            }
            evaluations += length;
            return loss;
        }

        @Override
        public void update(double[] h, double[] gradient, double stepSize) {
            Moves.proximalDescent(h, direction, stepSize, objective);
        }

        @Override
        public long gradientEvaluations() {
            return evaluations;
        }
    }

    /** General objectives: one stored gradient per sample. */
    private static final class TableState implements Updater {
        private final Objective objective;
        private final double[] table; // n x p row-major
        private final double[] tableMean;
        private final double[] direction;
        private final double[] sample;
        private final int p;
        private final double invN;
        private long evaluations;

        TableState(Objective objective, double[] h0) {
            this.objective = objective;
            int n = objective.size();
            this.p = h0.length;
            this.table = new double[Math.toIntExact((long) n * p)];
            this.tableMean = new double[p];
            this.direction = new double[p];
            this.sample = new double[p];
            this.invN = 1.0 / n;
            for (int i = 0; i < n; i++) {
                Arrays.fill(sample, 0.0);
                objective.addSampleGradient(h0, i, 1.0, sample);
                System.arraycopy(sample, 0, table, i * p, p);
                for (int j = 0; j < p; j++) {
                    tableMean[j] += sample[j] * invN;
                }
            }
            evaluations = n;
        }

        @Override
        public double gradient(double[] h, int[] batch, double[] scales, int length, double[] gradient) {
            Arrays.fill(gradient, 0.0);
            System.arraycopy(tableMean, 0, direction, 0, p);
            double inv = 1.0 / length;
            double loss = 0;
            for (int k = 0; k < length; k++) {
                int i = batch[k];
                double s = scales == null ? inv : scales[k] * inv;
                Arrays.fill(sample, 0.0);
                loss += s * objective.addSampleGradient(h, i, 1.0, sample);
                int base = i * p;
                for (int j = 0; j < p; j++) {
                    double g = sample[j];
                    double old = table[base + j];
                    gradient[j] += s * g;
                    direction[j] += s * (g - old);
                    tableMean[j] += (g - old) * invN;
                    table[base + j] = g;
                }
            }
            objective.addPenaltyGradient(h, 1.0, gradient);
            objective.addPenaltyGradient(h, 1.0, direction);
            evaluations += length;
            return loss;
        }

        @Override
        public void update(double[] h, double[] gradient, double stepSize) {
            Moves.proximalDescent(h, direction, stepSize, objective);
        }

        @Override
        public long gradientEvaluations() {
            return evaluations;
        }
    }
}
