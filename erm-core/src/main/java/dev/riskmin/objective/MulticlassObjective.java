package dev.riskmin.objective;

import dev.riskmin.data.Dataset;
import dev.riskmin.data.FeatureMatrix;
import dev.riskmin.data.TargetKind;
import dev.riskmin.loss.MulticlassLoss;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.util.Allocations;

import java.util.Arrays;

/**
 * The objective of a K-class linear model, L(h) = (1/n) Σ<sub>i</sub> ω<sub>i</sub> ℓ(z<sub>i</sub>, y<sub>i</sub>) + Σ<sub>k</sub> R(w<sub>k</sub>),
 * with z<sub>ik</sub> = w<sub>k</sub>·x<sub>i</sub> + b<sub>k</sub>. Parameters are K blocks, block k holding
 * w<sub>k</sub> at h[k·s .. k·s + d) and b<sub>k</sub> at h[k·s + d] with stride s = d + 1 (s = d without
 * intercepts). By the chain rule the gradient of block k is ω<sub>i</sub> (∂ℓ/∂z<sub>k</sub>) (x<sub>i</sub>, 1).
 */
public final class MulticlassObjective extends PenalizedObjective {
    private final FeatureMatrix x;
    private final double[] y;
    private final double[] omega;
    private final MulticlassLoss loss;
    private final int n;
    private final int d;
    private final int classes;
    private final int stride;
    private final boolean intercept;
    private final double[] z;
    private final double[] dz;

    private MulticlassObjective(Dataset data, MulticlassLoss loss, Penalty penalty, boolean intercept) {
        super(PenaltyLayout.blocks(penalty, requireClasses(data, loss), data.dimension(), intercept));
        this.x = data.features();
        this.y = data.targetsView();
        this.omega = data.normalizedWeightsView();
        this.loss = loss;
        this.n = data.size();
        this.d = data.dimension();
        this.classes = data.classes();
        this.intercept = intercept;
        this.stride = intercept ? d + 1 : d;
        this.z = new double[classes];
        this.dz = new double[classes];
    }

    private static int requireClasses(Dataset data, MulticlassLoss loss) {
        if (data.targetKind() != TargetKind.CLASSES) {
            throw new IllegalArgumentException("the " + loss.name()
                    + " loss needs class labels 0..K-1; build the dataset with labels(int[], K)");
        }
        // K comes from the largest label, so one stray label can ask for billions of parameters.
        long parameters = (long) data.classes() * (data.dimension() + 1L);
        Allocations.requireParameters("a model of " + data.classes() + " classes (the largest label + 1) x "
                + (data.dimension() + 1) + " = " + parameters + " parameters", parameters);
        return data.classes();
    }

    /** @throws IllegalArgumentException if the dataset does not hold class labels */
    public static MulticlassObjective of(Dataset data, MulticlassLoss loss, Penalty penalty, boolean intercept) {
        if (data == null || loss == null || penalty == null) {
            throw new NullPointerException("data, loss and penalty must not be null");
        }
        return new MulticlassObjective(data, loss, penalty, intercept);
    }

    public MulticlassLoss loss() {
        return loss;
    }

    public int classes() {
        return classes;
    }

    public boolean hasIntercept() {
        return intercept;
    }

    @Override
    public int size() {
        return n;
    }

    @Override
    public int dimension() {
        return classes * stride;
    }

    /** Writes z<sub>ik</sub> for k &lt; K into {@code out[0 .. K)}. */
    public void predictions(double[] h, int i, double[] out) {
        for (int k = 0; k < classes; k++) {
            double v = x.dot(i, h, k * stride);
            out[k] = intercept ? v + h[k * stride + d] : v;
        }
    }

    private double omega(int i) {
        return omega == null ? 1.0 : omega[i];
    }

    @Override
    public double sampleLoss(double[] h, int i) {
        predictions(h, i, z);
        return omega(i) * loss.value(z, 0, classes, (int) y[i]);
    }

    @Override
    public double addSampleGradient(double[] h, int i, double scale, double[] g) {
        predictions(h, i, z);
        double w = omega(i);
        double value = loss.gradient(z, 0, classes, (int) y[i], dz, 0);
        double c = scale * w;
        for (int k = 0; k < classes; k++) {
            double a = c * dz[k];
            if (a != 0) {
                x.addRow(i, a, g, k * stride);
                if (intercept) {
                    g[k * stride + d] += a;
                }
            }
        }
        return w * value;
    }

    @Override
    public double batchGradient(double[] h, int[] batch, double[] scales, int from, int length, double[] g) {
        Arrays.fill(g, 0.0);
        double inv = 1.0 / length;
        double sum = 0;
        for (int k = 0; k < length; k++) {
            double s = scales == null ? inv : scales[from + k] * inv;
            sum += s * addSampleGradient(h, batch[from + k], s, g);
        }
        layout.addGradient(h, 1.0, g);
        return sum;
    }

    @Override
    public double value(double[] h) {
        double sum = 0;
        for (int i = 0; i < n; i++) {
            sum += sampleLoss(h, i);
        }
        return sum / n + layout.value(h);
    }

    @Override
    public double gradient(double[] h, double[] g) {
        Arrays.fill(g, 0.0);
        double inv = 1.0 / n;
        double sum = 0;
        for (int i = 0; i < n; i++) {
            sum += addSampleGradient(h, i, inv, g);
        }
        layout.addGradient(h, 1.0, g);
        return sum * inv + layout.value(h);
    }

    @Override
    public double sampleSmoothness(int i) {
        return loss.smoothness() * omega(i) * (x.rowSquaredNorm(i) + (intercept ? 1.0 : 0.0));
    }
}
