package dev.riskmin.data;

import java.util.Arrays;

/**
 * Feature standardization fitted on training data: x'<sub>j</sub> = (x<sub>j</sub> − m<sub>j</sub>) / s<sub>j</sub>
 * for every column j, and the exact map of linear parameters between the standardized and the
 * original feature scale.
 *
 * <h2>What is fitted</h2>
 * With the dataset's normalized weights ω<sub>i</sub> (mean one; all ones when the dataset has no
 * weights, see {@link Dataset#normalizedWeight(int)}) and W = Σ<sub>i</sub> ω<sub>i</sub>:
 * <ul>
 *   <li><b>dense features</b> ({@link #fit}): m<sub>j</sub> = Σ ω<sub>i</sub> x<sub>ij</sub> / W, the
 *       weighted mean, and s<sub>j</sub> = √(Σ ω<sub>i</sub> (x<sub>ij</sub> − m<sub>j</sub>)² / W), the weighted
 *       population standard deviation (divisor W, not W − 1: the scale is a property of the
 *       training set, not an estimate of a wider population);</li>
 *   <li><b>sparse features</b> ({@link #fit} on {@link SparseFeatures}, or {@link #fitScaling} on any
 *       features): m<sub>j</sub> = 0 and s<sub>j</sub> = √(Σ ω<sub>i</sub> x<sub>ij</sub>² / W), the weighted
 *       root mean square.</li>
 * </ul>
 *
 * <p><b>Constant columns.</b> When s<sub>j</sub> = 0 the column is constant on every row of positive
 * weight, and s<sub>j</sub> = 1 is used instead: the column is only centred. Dividing by zero would
 * turn the column into NaN; any positive scale is otherwise harmless, because the centred column is
 * identically zero on the training rows, so its coefficient changes no training loss (with a penalty
 * it stays at zero). Scale 1 keeps the column in its own units when a new row differs from the
 * training constant, instead of multiplying that difference by an arbitrary large factor. A column
 * of zeros in sparse data likewise gets s<sub>j</sub> = 1.
 *
 * <p><b>Why sparse features are not centred.</b> Subtracting m<sub>j</sub> ≠ 0 turns every implicit
 * zero of column j into −m<sub>j</sub>, so the centred matrix is dense: memory grows from the
 * number of stored entries to n·d and every pass costs O(n·d) instead of O(stored entries). The
 * price of not centring: the columns keep their means, so the intercept and the coefficients stay
 * correlated and the curvature of the objective is less evenly spread than after full
 * standardization when a column's mean is large against its spread. Dividing by the root mean
 * square (rather than the standard deviation, which would need the mean) gives every column unit
 * second moment Σ ω<sub>i</sub> x'<sub>ij</sub>² / W = 1, which equalizes the diagonal of the
 * uncentred second-moment matrix XᵀΩX/W and so the per-coordinate curvature of the squared loss;
 * the root mean square is at least the standard deviation, with equality when the mean is zero.
 * A stored entry stays stored and a zero stays zero.
 *
 * <h2>Parameters on the two scales</h2>
 * For a linear model with z = Σ<sub>j</sub> w'<sub>j</sub> x'<sub>j</sub> + b' on standardized
 * features, substituting x'<sub>j</sub> = (x<sub>j</sub> − m<sub>j</sub>)/s<sub>j</sub> gives the same z on
 * original features with
 * <pre>
 *   w_j = w'_j / s_j,        b = b' − Σ_j w'_j m_j / s_j          ({@link #toOriginalScale})
 *   w'_j = w_j s_j,          b' = b + Σ_j w_j m_j                 ({@link #fromOriginalScale})
 * </pre>
 * applied to each of K blocks (one per class) of a parameter vector laid out as in
 * {@code dev.riskmin.objective.MulticlassObjective}: block k holds w at [k·t, k·t + d) and b at
 * k·t + d with stride t = d + 1, or t = d without intercepts. Without an intercept the shift
 * Σ w'<sub>j</sub> m<sub>j</sub>/s<sub>j</sub> has nowhere to go, so the maps refuse a standardizer that
 * centres (use {@link #fitScaling} for models without intercept).
 *
 * @implNote The dense fit is one pass over the row-major array with the weighted form of
 * Welford's update (B. P. Welford, "Note on a method for calculating corrected sums of squares and
 * products", Technometrics 4(3), 1962, 419–420; weighted form D. H. D. West, "Updating mean and
 * variance estimates: an improved method", Comm. ACM 22(9), 1979, 532–535, from memory): for a row
 * of weight ω, W ← W + ω, δ = x − m, m ← m + (ω/W) δ, S ← S + ω δ (x − m), and s² = S/W at the end.
 * Unlike Σx² − W m², which loses all digits when |m| ≫ s, its error grows only like the condition
 * number |m|/s (T. F. Chan, G. H. Golub and R. J. LeVeque, "Algorithms for computing the sample
 * variance: analysis and recommendations", The American Statistician 37(3), 1983, 242–247).
 * The root mean square sums non-negative terms, which has no cancellation to guard against.
 *
 * <p>Immutable and thread-safe. {@link #applyToRow} allocates nothing.
 */
public final class Standardizer {
    private final double[] means;
    private final double[] scales;
    private final boolean centres;

    private Standardizer(double[] means, double[] scales) {
        this.means = means;
        this.scales = scales;
        boolean any = false;
        for (double m : means) {
            any |= m != 0.0;
        }
        this.centres = any;
    }

    /**
     * Fits the standardization of the class javadoc: centre and scale for dense features, scale by
     * the root mean square (no centring) for sparse features.
     *
     * @param data read only
     * @throws IllegalArgumentException naming the column if its mean or spread overflows the double range
     */
    public static Standardizer fit(Dataset data) {
        if (data == null) {
            throw new NullPointerException("data must not be null");
        }
        FeatureMatrix x = data.features();
        if (x instanceof DenseFeatures) {
            return fitDense((DenseFeatures) x, data.normalizedWeightsView());
        }
        return fitScaling(data);
    }

    /**
     * Fits scaling only, for dense or sparse features: m<sub>j</sub> = 0 and s<sub>j</sub> the weighted
     * root mean square of column j (1 for a column of zeros). Use it for a model without intercept,
     * whose parameters then map exactly between the two scales.
     *
     * @param data read only
     * @throws IllegalArgumentException naming the column if its sum of squares overflows
     */
    public static Standardizer fitScaling(Dataset data) {
        if (data == null) {
            throw new NullPointerException("data must not be null");
        }
        FeatureMatrix x = data.features();
        double[] omega = data.normalizedWeightsView();
        int n = x.rows();
        int d = x.columns();
        double[] squares = new double[d];
        double total = 0;
        if (x instanceof SparseFeatures) {
            SparseFeatures sp = (SparseFeatures) x;
            int[] rowStart = sp.rowStart();
            int[] columnIndex = sp.columnIndex();
            double[] values = sp.values();
            for (int i = 0; i < n; i++) {
                double w = omega == null ? 1.0 : omega[i];
                total += w;
                for (int k = rowStart[i], end = rowStart[i + 1]; k < end; k++) {
                    double v = values[k];
                    squares[columnIndex[k]] += w * (v * v);
                }
            }
        } else {
            double[] values = ((DenseFeatures) x).values();
            for (int i = 0; i < n; i++) {
                double w = omega == null ? 1.0 : omega[i];
                total += w;
                int base = i * d;
                for (int j = 0; j < d; j++) {
                    double v = values[base + j];
                    squares[j] += w * (v * v);
                }
            }
        }
        double[] scales = new double[d];
        for (int j = 0; j < d; j++) {
            double s = Math.sqrt(squares[j] / total);
            if (!Double.isFinite(s)) {
                throw new IllegalArgumentException("column " + j + ": the sum of squares overflows the double range;"
                        + " rescale the column before fitting");
            }
            scales[j] = s > 0 ? s : 1.0;
        }
        return new Standardizer(new double[d], scales);
    }

    private static Standardizer fitDense(DenseFeatures x, double[] omega) {
        final double[] values = x.values();
        final int n = x.rows();
        final int d = x.columns();
        double[] mean = new double[d];
        double[] sum = new double[d]; // S_j = Σ ω (x − m)² so far
        double total = 0;
        for (int i = 0; i < n; i++) {
            double w = omega == null ? 1.0 : omega[i];
            if (w == 0) {
                continue; // a row of zero weight leaves the fit unchanged; skipping it also avoids 0/0 below
            }
            total += w;
            double r = w / total;
            int base = i * d;
            for (int j = 0; j < d; j++) {
                double v = values[base + j];
                double delta = v - mean[j];
                mean[j] += r * delta;
                sum[j] += w * delta * (v - mean[j]);
            }
        }
        double[] scales = new double[d];
        for (int j = 0; j < d; j++) {
            double s = Math.sqrt(sum[j] / total);
            if (!Double.isFinite(mean[j]) || !Double.isFinite(s)) {
                throw new IllegalArgumentException("column " + j + ": mean (" + mean[j] + ") or standard deviation ("
                        + s + ") overflows the double range; rescale the column before fitting");
            }
            scales[j] = s > 0 ? s : 1.0;
        }
        return new Standardizer(mean, scales);
    }

    /**
     * A standardizer with given parameters, e.g. restored from storage.
     *
     * @param means  read only (copied); finite
     * @param scales read only (copied); finite and &gt; 0, same length as means
     * @throws IllegalArgumentException naming the index of a bad entry, or the two lengths
     */
    public static Standardizer of(double[] means, double[] scales) {
        if (means == null || scales == null) {
            throw new NullPointerException("means and scales must not be null");
        }
        if (means.length != scales.length) {
            throw new IllegalArgumentException("means have " + means.length + " entries, but scales have "
                    + scales.length);
        }
        if (means.length == 0) {
            throw new IllegalArgumentException("means and scales are empty: need at least one column");
        }
        for (int j = 0; j < means.length; j++) {
            if (!Double.isFinite(means[j])) {
                throw new IllegalArgumentException("means[" + j + "] (" + means[j] + ") must be finite");
            }
            if (!(scales[j] > 0) || Double.isInfinite(scales[j])) {
                throw new IllegalArgumentException("scales[" + j + "] (" + scales[j] + ") must be finite and > 0");
            }
        }
        return new Standardizer(means.clone(), scales.clone());
    }

    /** @return d, the number of columns */
    public int dimension() {
        return means.length;
    }

    /** @return a copy of m (all zeros when nothing is centred) */
    public double[] means() {
        return means.clone();
    }

    /** @return a copy of s (every entry finite and &gt; 0) */
    public double[] scales() {
        return scales.clone();
    }

    /** @return whether some m<sub>j</sub> ≠ 0, i.e. whether parameters need an intercept to map exactly */
    public boolean centres() {
        return centres;
    }

    /**
     * Standardizes a dataset's features; targets, weights and strata are kept.
     * Dense features stay dense. Sparse features stay sparse with the same pattern of stored entries,
     * which requires that this standardizer does not centre.
     *
     * @param data read only; d columns
     * @return a new dataset with x'<sub>ij</sub> = (x<sub>ij</sub> − m<sub>j</sub>) / s<sub>j</sub>
     * @throws IllegalArgumentException if the column count differs from d, if sparse features would
     *                                  have to be centred, or if a standardized entry overflows
     */
    public Dataset apply(Dataset data) {
        if (data == null) {
            throw new NullPointerException("data must not be null");
        }
        FeatureMatrix x = data.features();
        int d = means.length;
        if (x.columns() != d) {
            throw new IllegalArgumentException("data have " + x.columns() + " columns, but the standardizer was fitted on "
                    + d);
        }
        int n = x.rows();
        if (x instanceof SparseFeatures) {
            if (centres) {
                int j = firstCentredColumn();
                throw new IllegalArgumentException("sparse features cannot be centred without making them dense (means["
                        + j + "] = " + means[j] + "); fit the standardizer on sparse data or with fitScaling");
            }
            SparseFeatures sp = (SparseFeatures) x;
            int[] columnIndex = sp.columnIndex();
            double[] values = sp.values();
            double[] out = new double[values.length];
            for (int k = 0; k < values.length; k++) {
                out[k] = values[k] / scales[columnIndex[k]];
            }
            return data.withFeatures(SparseFeatures.of(n, d, sp.rowStart(), columnIndex, out));
        }
        double[] values = ((DenseFeatures) x).values();
        double[] out = new double[values.length];
        for (int i = 0; i < n; i++) {
            int base = i * d;
            for (int j = 0; j < d; j++) {
                out[base + j] = (values[base + j] - means[j]) / scales[j];
            }
        }
        // ofFlat validates, so an overflowing entry is reported with its row and column.
        return data.withFeatures(DenseFeatures.ofFlat(out, n, d, false));
    }

    /**
     * Standardizes one dense row, e.g. before predicting with a model fitted on standardized data.
     * {@code out} may be {@code x} itself.
     *
     * @param x   read only; length d
     * @param out written; length d
     * @throws IllegalArgumentException naming the lengths if either is not d
     */
    public void applyToRow(double[] x, double[] out) {
        final int d = means.length;
        if (x.length != d || out.length != d) {
            throw new IllegalArgumentException("x has " + x.length + " and out has " + out.length
                    + " entries, the standardizer has " + d + " columns");
        }
        final double[] m = means;
        final double[] s = scales;
        for (int j = 0; j < d; j++) {
            out[j] = (x[j] - m[j]) / s[j];
        }
    }

    /**
     * Maps linear parameters fitted on standardized features to the original scale:
     * w<sub>j</sub> = w'<sub>j</sub>/s<sub>j</sub> and b = b' − Σ<sub>j</sub> w'<sub>j</sub> m<sub>j</sub>/s<sub>j</sub>
     * in each block, so that w·x + b = w'·x' + b' for every row x (up to rounding).
     *
     * @param h         read only; {@code blocks} blocks of stride d + 1 (intercept) or d
     * @param blocks    K ≥ 1, the number of outputs (1 for a single-output model)
     * @param intercept whether each block ends with an intercept
     * @return the parameters on the original scale, in the same layout
     * @throws IllegalArgumentException if h has the wrong length, blocks &lt; 1, intercept is false
     *                                  while this standardizer centres (the shift would be lost), or a
     *                                  parameter maps beyond the double range (naming it and its column)
     */
    public double[] toOriginalScale(double[] h, int blocks, boolean intercept) {
        int stride = checkLayout(h, blocks, intercept);
        int d = means.length;
        double[] out = new double[h.length];
        for (int k = 0; k < blocks; k++) {
            int base = k * stride;
            double shift = 0;
            for (int j = 0; j < d; j++) {
                double w = h[base + j] / scales[j];
                out[base + j] = w;
                shift += w * means[j];
            }
            if (intercept) {
                out[base + d] = h[base + d] - shift;
            }
        }
        requireFinite(h, out, stride, "original");
        return out;
    }

    /**
     * The inverse of {@link #toOriginalScale}: w'<sub>j</sub> = w<sub>j</sub> s<sub>j</sub> and
     * b' = b + Σ<sub>j</sub> w<sub>j</sub> m<sub>j</sub> in each block, e.g. to warm-start a fit on
     * standardized features from a model on the original scale.
     *
     * @param h         read only; {@code blocks} blocks of stride d + 1 (intercept) or d
     * @param blocks    K ≥ 1
     * @param intercept whether each block ends with an intercept
     * @return the parameters on the standardized scale, in the same layout
     * @throws IllegalArgumentException as for {@link #toOriginalScale}
     */
    public double[] fromOriginalScale(double[] h, int blocks, boolean intercept) {
        int stride = checkLayout(h, blocks, intercept);
        int d = means.length;
        double[] out = new double[h.length];
        for (int k = 0; k < blocks; k++) {
            int base = k * stride;
            double shift = 0;
            for (int j = 0; j < d; j++) {
                double w = h[base + j];
                out[base + j] = w * scales[j];
                shift += w * means[j];
            }
            if (intercept) {
                out[base + d] = h[base + d] + shift;
            }
        }
        requireFinite(h, out, stride, "standardized");
        return out;
    }

    /** Refuses a mapping that overflowed: finite parameters must map to finite ones, or the caller hears why. */
    private void requireFinite(double[] h, double[] out, int stride, String scale) {
        int d = means.length;
        for (int i = 0; i < out.length; i++) {
            if (!Double.isFinite(out[i])) {
                int j = i % stride;
                String why = j < d
                        ? "column " + j + " has scale " + scales[j]
                        : "the intercept absorbs the coefficients times the column means";
                throw new IllegalArgumentException("parameter h[" + i + "] (" + h[i] + ") is " + out[i] + " on the "
                        + scale + " scale, beyond the double range: " + why);
            }
        }
    }

    private int checkLayout(double[] h, int blocks, boolean intercept) {
        if (h == null) {
            throw new NullPointerException("h must not be null");
        }
        if (blocks < 1) {
            throw new IllegalArgumentException("blocks (" + blocks + ") must be >= 1");
        }
        int d = means.length;
        int stride = intercept ? d + 1 : d;
        if (h.length != (long) blocks * stride) {
            throw new IllegalArgumentException("h has " + h.length + " entries, expected blocks (" + blocks + ") x "
                    + (intercept ? "(d + 1)" : "d") + " = " + (long) blocks * stride);
        }
        if (!intercept && centres) {
            int j = firstCentredColumn();
            throw new IllegalArgumentException("intercept (false) cannot absorb the centring of column " + j
                    + " (means[" + j + "] = " + means[j] + "): map with an intercept or fit the standardizer"
                    + " with fitScaling");
        }
        return stride;
    }

    private int firstCentredColumn() {
        for (int j = 0; j < means.length; j++) {
            if (means[j] != 0.0) {
                return j;
            }
        }
        return -1;
    }

    @Override
    public String toString() {
        return "Standardizer[d=" + means.length + (centres ? ", centred" : ", scaled only") + ", means="
                + Arrays.toString(means) + ", scales=" + Arrays.toString(scales) + "]";
    }
}
