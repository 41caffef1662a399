package dev.riskmin.method;

import dev.riskmin.data.DenseFeatures;
import dev.riskmin.data.FeatureMatrix;
import dev.riskmin.data.SparseFeatures;
import dev.riskmin.objective.LinearStructure;
import dev.riskmin.objective.Objective;
import dev.riskmin.penalty.Penalty;

import java.util.Arrays;

/**
 * Proximal SGD for a single-output linear model with an elastic-net penalty, in O(non-zeros) per
 * step: the same iterates as {@link PlainSgd}'s general path (to rounding), without touching the
 * coordinates a batch does not touch.
 *
 * <ul>
 * <li>Lazy L2 scaling (Shalev-Shwartz, Singer &amp; Srebro, ICML 2007; Bottou 2012; METHODS §8): the
 * coefficients are kept as w = s·v. The step w ← (1 − ελ<sub>2</sub>) w − ε g<sub>data</sub> becomes
 * s ← (1 − ελ<sub>2</sub>) s and v ← v − (ε/s) g<sub>data</sub> on the batch's non-zeros only. When
 * s falls below 1e-100, or a factor is at most 1e-6 (e.g. ε = 1/λ<sub>2</sub>, where the factor is
 * 0), w is written out directly (O(d), rare).</li>
 * <li>Just-in-time L1 (in the spirit of the cumulative penalty of Tsuruoka, Tsujii &amp; Ananiadou,
 * ACL-IJCNLP 2009, but exact): u accumulates the soft-threshold ε<sub>t</sub>λ<sub>1</sub>/s<sub>t+1</sub>
 * of every step in v-units, q<sub>j</sub> the part already applied to coordinate j. Between two
 * touches a coordinate only shrinks toward zero by successive soft thresholds, whose composition
 * is one soft threshold by their sum, so applying u − q<sub>j</sub> when the coordinate is next read
 * gives exactly the iterate of proximal SGD (Tsuruoka et al.'s variant instead lets a coordinate
 * absorb penalty it missed; we keep the exact one so the fast and general paths agree).</li>
 * </ul>
 * The intercept is unpenalized and kept as it is. g<sub>B</sub> and h are written out only when the
 * fit loop asks (listeners, averaging, the periodic finiteness check).
 */
final class LinearSgd implements Updater {
    private static final double RESCALE_BELOW = 1e-100;
    private static final double DIRECT_FACTOR = 1e-6;

    private final LinearStructure linear;
    private final double[] denseX;      // non-null on the dense path
    private final int[] rowStart;       // non-null on the sparse path
    private final int[] columns;
    private final double[] values;
    private final int d;
    private final boolean intercept;
    private final double l1;
    private final double l2;
    private final double[] v;           // dense, or sparse without L1
    private final double[] applied;     // q_j, per coordinate (dense with L1)
    // Sparse with L1: v_j and q_j side by side (pairs[2j], pairs[2j+1]), so that a non-zero touches
    // one cache line, not two random lines of two large arrays.
    private final double[] pairs;
    private double scale = 1.0;         // s
    private double budget;              // u
    private double b;
    private double[] alpha = new double[1];
    private int[] rows = new int[1];
    private int length;
    private long evaluations;
    private final long nonZeros;

    LinearSgd(Objective objective, LinearStructure linear, double[] h0) {
        this.linear = linear;
        FeatureMatrix x = linear.features();
        this.d = x.columns();
        if (x instanceof DenseFeatures) {
            this.denseX = ((DenseFeatures) x).values();
            this.rowStart = null;
            this.columns = null;
            this.values = null;
        } else {
            SparseFeatures sp = (SparseFeatures) x;
            this.denseX = null;
            this.rowStart = sp.rowStart();
            this.columns = sp.columnIndex();
            this.values = sp.values();
        }
        this.nonZeros = x.storedEntries();
        this.intercept = linear.hasIntercept();
        Penalty penalty = objective.penalty();
        this.l1 = penalty.l1Strength();
        this.l2 = penalty.l2Strength();
        if (denseX == null && l1 > 0) {
            this.v = null;
            this.applied = null;
            this.pairs = new double[2 * d];
            for (int j = 0; j < d; j++) {
                pairs[2 * j] = h0[j];
            }
        } else {
            this.v = Arrays.copyOf(h0, d);
            this.applied = l1 > 0 ? new double[d] : null;
            this.pairs = null;
        }
        this.b = intercept ? h0[d] : 0.0;
    }

    /** @return whether this fast path applies: a single-output linear model with an elastic-net penalty */
    static boolean applies(Objective objective) {
        LinearStructure linear = objective.linearStructure();
        if (linear == null || !objective.penalty().elasticNetForm() || linear.splitsBatches()) {
            return false; // with threads, large batches go through the objective's parallel batch gradient
        }
        FeatureMatrix x = linear.features();
        int p = objective.dimension();
        // The structure's penalty layout must be "every coefficient, not the intercept".
        for (int j = 0; j < x.columns(); j++) {
            if (!objective.penalized(j)) {
                return false;
            }
        }
        return !linear.hasIntercept() || !objective.penalized(p - 1);
    }

    @Override
    public boolean lazy() {
        return true;
    }

    @Override
    public long touchedPerStep(int batchSize) {
        long perRow = denseX != null ? d : Math.max(1, nonZeros / Math.max(1, rowStart.length - 1));
        return (long) batchSize * perRow;
    }

    /** As {@link #catchUp} for the interleaved (sparse, L1) layout; returns the up-to-date v_j. */
    private double catchUpPair(int j) {
        int at = 2 * j;
        double x = pairs[at];
        double pending = budget - pairs[at + 1];
        if (pending > 0) {
            // Soft threshold without a data-dependent branch: coefficient signs are random, and a
            // mispredicted branch per non-zero costs more than the arithmetic.
            x = Math.copySign(Math.max(Math.abs(x) - pending, 0.0), x);
            pairs[at] = x;
        }
        pairs[at + 1] = budget;
        return x;
    }

    /** @return v_j after every pending threshold (O(1); for the O(d) paths) */
    private double coefficient(int j) {
        if (pairs != null) {
            return catchUpPair(j);
        }
        if (applied != null) {
            catchUp(j);
        }
        return v[j];
    }

    /** Applies the L1 thresholds coordinate j has missed since it was last read. */
    private void catchUp(int j) {
        double pending = budget - applied[j];
        if (pending > 0) {
            double x = v[j];
            v[j] = Math.copySign(Math.max(Math.abs(x) - pending, 0.0), x);
        }
        applied[j] = budget;
    }

    @Override
    public double gradient(double[] h, int[] batch, double[] scales, int len, double[] gradient) {
        if (alpha.length < len) {
            alpha = new double[len]; // grows only when a listener asks for a larger batch
            rows = new int[len];
        }
        double inv = 1.0 / len;
        double loss = 0;
        for (int k = 0; k < len; k++) {
            int i = batch[k];
            double dot = 0;
            if (denseX != null) {
                int base = i * d;
                if (applied != null) {
                    for (int j = 0; j < d; j++) {
                        catchUp(j);
                    }
                }
                double s0 = 0, s1 = 0, s2 = 0, s3 = 0;
                int j = 0;
                for (; j + 3 < d; j += 4) {
                    s0 += denseX[base + j] * v[j];
                    s1 += denseX[base + j + 1] * v[j + 1];
                    s2 += denseX[base + j + 2] * v[j + 2];
                    s3 += denseX[base + j + 3] * v[j + 3];
                }
                for (; j < d; j++) {
                    s0 += denseX[base + j] * v[j];
                }
                dot = (s0 + s1) + (s2 + s3);
            } else if (pairs != null) {
                for (int e = rowStart[i], end = rowStart[i + 1]; e < end; e++) {
                    dot += values[e] * catchUpPair(columns[e]);
                }
            } else {
                for (int e = rowStart[i], end = rowStart[i + 1]; e < end; e++) {
                    dot += values[e] * v[columns[e]];
                }
            }
            double z = scale * dot + b;
            double sk = scales == null ? inv : scales[k] * inv;
            alpha[k] = sk * linear.weightedDerivative(z, i);
            loss += sk * linear.weightedLoss(z, i);
            rows[k] = i;
        }
        length = len;
        evaluations += len;
        return loss;
    }

    @Override
    public void update(double[] h, double[] gradient, double stepSize) {
        if (l2 > 0) {
            double factor = 1.0 - stepSize * l2;
            if (!(factor > DIRECT_FACTOR)) {
                writeOut(factor);
            } else {
                scale *= factor;
                if (scale < RESCALE_BELOW) {
                    writeOut(1.0);
                }
            }
        }
        double step = stepSize / scale;
        double interceptStep = 0;
        for (int k = 0; k < length; k++) {
            double a = alpha[k];
            if (a == 0) {
                continue;
            }
            interceptStep += a;
            double c = step * a;
            int i = rows[k];
            if (denseX != null) {
                int base = i * d;
                for (int j = 0; j < d; j++) {
                    v[j] -= c * denseX[base + j];
                }
            } else if (pairs != null) {
                for (int e = rowStart[i], end = rowStart[i + 1]; e < end; e++) {
                    pairs[2 * columns[e]] -= c * values[e];
                }
            } else {
                for (int e = rowStart[i], end = rowStart[i + 1]; e < end; e++) {
                    v[columns[e]] -= c * values[e];
                }
            }
        }
        if (intercept) {
            b -= stepSize * interceptStep;
        }
        if (l1 > 0) {
            budget += stepSize * l1 / scale;
        }
    }

    /** w ← factor · s · v (after every pending threshold), s ← 1, u ← 0: an exact O(d) reset. */
    private void writeOut(double factor) {
        double c = factor * scale;
        for (int j = 0; j < d; j++) {
            double x = coefficient(j) * c;
            if (pairs != null) {
                pairs[2 * j] = x;
                pairs[2 * j + 1] = 0.0;
            } else {
                v[j] = x;
                if (applied != null) {
                    applied[j] = 0.0;
                }
            }
        }
        budget = 0.0;
        scale = 1.0;
    }

    @Override
    public void materialize(double[] h) {
        for (int j = 0; j < d; j++) {
            h[j] = scale * coefficient(j);
        }
        if (intercept) {
            h[d] = b;
        }
    }

    @Override
    public void fillGradient(double[] gradient) {
        Arrays.fill(gradient, 0.0);
        for (int k = 0; k < length; k++) {
            linear.addFeatures(rows[k], alpha[k], gradient);
        }
        if (l2 > 0) {
            for (int j = 0; j < d; j++) {
                gradient[j] += l2 * scale * coefficient(j);
            }
        }
    }

    @Override
    public long gradientEvaluations() {
        return evaluations;
    }
}
