package dev.riskmin.objective;

import dev.riskmin.data.SampleWeights;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.util.Allocations;

import java.util.Arrays;

/**
 * L(h) = (1/n) Σ<sub>i</sub> ω<sub>i</sub> ℓ<sub>i</sub>(h) + R(h) for a user-supplied {@link SampleFunction}.
 * The penalty acts on the coordinates the function marks as penalized.
 */
public final class GeneralObjective extends PenalizedObjective {
    private final SampleFunction f;
    private final double[] omega;
    private final int n;
    private final int p;

    private GeneralObjective(SampleFunction f, double[] weights, Penalty penalty) {
        super(PenaltyLayout.ofMask(penalty, penalizedMask(f)));
        this.f = f;
        this.n = f.size();
        this.p = f.dimension();
        if (n < 1) {
            throw new IllegalArgumentException("sample function size (" + n + ") must be >= 1");
        }
        if (p < 1) {
            throw new IllegalArgumentException("sample function dimension (" + p + ") must be >= 1");
        }
        if (weights != null) {
            omega = SampleWeights.normalize(weights, n);
        } else {
            omega = null;
        }
    }

    private static boolean[] penalizedMask(SampleFunction f) {
        int p = f.dimension();
        if (p < 1) {
            throw new IllegalArgumentException("sample function dimension (" + p + ") must be >= 1");
        }
        Allocations.requireParameters("sample function dimension (" + p + ")", p);
        boolean[] mask = new boolean[p];
        for (int j = 0; j < p; j++) {
            mask[j] = f.penalized(j);
        }
        return mask;
    }

    /** Unweighted: every ω<sub>i</sub> = 1. */
    public static GeneralObjective of(SampleFunction f, Penalty penalty) {
        return of(f, null, penalty);
    }

    /**
     * @param weights read only (copied after normalization), or null for all ones
     * @throws IllegalArgumentException naming the row of a negative or non-finite weight, or if all are zero
     */
    public static GeneralObjective of(SampleFunction f, double[] weights, Penalty penalty) {
        if (f == null || penalty == null) {
            throw new NullPointerException("function and penalty must not be null");
        }
        return new GeneralObjective(f, weights, penalty);
    }

    private double omega(int i) {
        return omega == null ? 1.0 : omega[i];
    }

    @Override
    public int size() {
        return n;
    }

    @Override
    public int dimension() {
        return p;
    }

    @Override
    public double sampleLoss(double[] h, int i) {
        return omega(i) * f.loss(h, i);
    }

    @Override
    public double addSampleGradient(double[] h, int i, double scale, double[] g) {
        double w = omega(i);
        return w * f.addGradient(h, i, scale * w, g);
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
        return omega(i) * f.smoothness(i);
    }
}
