package dev.riskmin.objective;

import dev.riskmin.data.Dataset;
import dev.riskmin.data.DenseFeatures;
import dev.riskmin.data.FeatureMatrix;
import dev.riskmin.data.SparseFeatures;
import dev.riskmin.loss.Loss;
import dev.riskmin.penalty.Penalty;

/**
 * The objective of a single-output linear model, L(h) = (1/n) Σ<sub>i</sub> ω<sub>i</sub> ℓ(w·x<sub>i</sub> + b, y<sub>i</sub>) + R(w),
 * with h = (w<sub>0</sub>, …, w<sub>d−1</sub>, b) (or h = w without an intercept). The gradient of a
 * sample is ω<sub>i</sub> ℓ'(z<sub>i</sub>, y<sub>i</sub>) (x<sub>i</sub>, 1): one dot product and one scaled row addition,
 * on the flat dense array or the CSR arrays directly.
 *
 * <p>Every target is checked against the loss's domain at construction.
 */
public final class LinearObjective extends PenalizedObjective implements LinearStructure {
    private final FeatureMatrix x;
    private final DenseFeatures dense;   // non-null on the dense path
    private final SparseFeatures sparse; // non-null on the sparse path
    private final double[] y;
    private final double[] omega; // null: all ones
    private final Loss loss;
    private final int n;
    private final int d;
    private final boolean intercept;

    private LinearObjective(Dataset data, Loss loss, Penalty penalty, boolean intercept) {
        super(PenaltyLayout.blocks(penalty, 1, data.dimension(), intercept));
        this.x = data.features();
        this.dense = x instanceof DenseFeatures ? (DenseFeatures) x : null;
        this.sparse = x instanceof SparseFeatures ? (SparseFeatures) x : null;
        this.y = data.targetsView();
        this.omega = data.normalizedWeightsView();
        this.loss = loss;
        this.n = data.size();
        this.d = data.dimension();
        this.intercept = intercept;
        for (int i = 0; i < n; i++) {
            loss.requireTarget(y[i], i);
        }
    }

    /**
     * @param intercept whether h carries an unpenalized intercept b = h[d]
     * @throws IllegalArgumentException naming the row and value of the first target outside the loss's domain
     */
    public static LinearObjective of(Dataset data, Loss loss, Penalty penalty, boolean intercept) {
        if (data == null || loss == null || penalty == null) {
            throw new NullPointerException("data, loss and penalty must not be null");
        }
        return new LinearObjective(data, loss, penalty, intercept);
    }

    public Loss loss() {
        return loss;
    }

    @Override
    public FeatureMatrix features() {
        return x;
    }

    @Override
    public boolean hasIntercept() {
        return intercept;
    }

    @Override
    public int size() {
        return n;
    }

    @Override
    public int dimension() {
        return intercept ? d + 1 : d;
    }

    @Override
    public double prediction(double[] h, int i) {
        double z = dense != null ? dense.dot(i, h, 0) : x.dot(i, h, 0);
        return intercept ? z + h[d] : z;
    }

    private double omega(int i) {
        return omega == null ? 1.0 : omega[i];
    }

    @Override
    public double weightedLoss(double z, int i) {
        return omega(i) * loss.value(z, y[i]);
    }

    @Override
    public double weightedDerivative(double z, int i) {
        return omega(i) * loss.derivative(z, y[i]);
    }

    @Override
    public void addFeatures(int i, double scale, double[] g) {
        if (dense != null) {
            dense.addRow(i, scale, g, 0);
        } else {
            x.addRow(i, scale, g, 0);
        }
        if (intercept) {
            g[d] += scale;
        }
    }

    @Override
    public double sampleLoss(double[] h, int i) {
        return omega(i) * loss.value(prediction(h, i), y[i]);
    }

    @Override
    public double addSampleGradient(double[] h, int i, double scale, double[] g) {
        double z = prediction(h, i);
        double w = omega(i);
        addFeatures(i, scale * w * loss.derivative(z, y[i]), g);
        return w * loss.value(z, y[i]);
    }

    @Override
    public double batchGradient(double[] h, int[] batch, double[] scales, int from, int length, double[] g) {
        java.util.Arrays.fill(g, 0.0);
        double inv = 1.0 / length;
        double lossSum = 0;
        for (int k = 0; k < length; k++) {
            int i = batch[from + k];
            double s = scales == null ? inv : scales[from + k] * inv;
            double z = prediction(h, i);
            double w = omega(i) * s;
            lossSum += w * loss.value(z, y[i]);
            addFeatures(i, w * loss.derivative(z, y[i]), g);
        }
        layout.addGradient(h, 1.0, g);
        return lossSum;
    }

    @Override
    public double value(double[] h) {
        double sum = 0;
        for (int i = 0; i < n; i++) {
            sum += omega(i) * loss.value(prediction(h, i), y[i]);
        }
        return sum / n + layout.value(h);
    }

    @Override
    public double gradient(double[] h, double[] g) {
        java.util.Arrays.fill(g, 0.0);
        double inv = 1.0 / n;
        double sum = 0;
        for (int i = 0; i < n; i++) {
            double z = prediction(h, i);
            double w = omega(i);
            sum += w * loss.value(z, y[i]);
            addFeatures(i, inv * w * loss.derivative(z, y[i]), g);
        }
        layout.addGradient(h, 1.0, g);
        return sum * inv + layout.value(h);
    }

    @Override
    public double sampleSmoothness(int i) {
        return loss.smoothness() * omega(i) * (x.rowSquaredNorm(i) + (intercept ? 1.0 : 0.0));
    }

    @Override
    public LinearStructure linearStructure() {
        return this;
    }
}
