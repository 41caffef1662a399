package dev.riskmin.data;

/**
 * Training data: a feature matrix x (n rows, d columns), targets y<sub>i</sub>, optional
 * non-negative sample weights w<sub>i</sub> (not all zero) and optional strata s<sub>i</sub> used
 * by stratified sampling.
 *
 * <p>Everything is validated once, here, so a fit never meets a NaN in its inputs: each failure is
 * an {@link IllegalArgumentException} whose message names the row, column and value. Arrays are
 * copied unless {@link Builder#flatFeatures(double[], int, int, boolean)} is told not to.
 *
 * <p>Weights enter the objective normalized to mean one, ω<sub>i</sub> = n w<sub>i</sub> / Σw, so
 * that the data term (1/n) Σ ω<sub>i</sub> ℓ<sub>i</sub> is the weighted mean loss and a
 * penalty's strength means the same whatever the weights' scale (see {@link #normalizedWeight(int)}).
 */
public final class Dataset {
    private final FeatureMatrix features;
    private final double[] targets;
    private final TargetKind targetKind;
    private final int classes;
    private final double[] normalizedWeights; // null: all ones
    private final double[] weights;           // null: all ones
    private final int[] strata;               // null: none
    private final int strataCount;

    private Dataset(Builder b) {
        if (b.features == null) {
            throw new IllegalArgumentException("dataset has no features");
        }
        if (b.targets == null) {
            throw new IllegalArgumentException("dataset has no targets");
        }
        this.features = b.features;
        int n = features.rows();
        if (b.targets.length != n) {
            throw new IllegalArgumentException("targets have " + b.targets.length + " entries, but features have "
                    + n + " rows");
        }
        this.targets = b.targets;
        this.targetKind = b.targetKind;
        this.classes = b.classes;
        if (b.weights != null) {
            this.normalizedWeights = SampleWeights.normalize(b.weights, n);
            this.weights = b.weights;
        } else {
            this.weights = null;
            this.normalizedWeights = null;
        }
        if (b.strata != null) {
            if (b.strata.length != n) {
                throw new IllegalArgumentException("strata have " + b.strata.length + " entries, but features have "
                        + n + " rows");
            }
            int max = -1;
            for (int i = 0; i < n; i++) {
                if (b.strata[i] < 0) {
                    throw new IllegalArgumentException("strata[" + i + "] (" + b.strata[i] + ") must be >= 0");
                }
                max = Math.max(max, b.strata[i]);
            }
            int[] counts = new int[max + 1];
            for (int s : b.strata) {
                counts[s]++;
            }
            for (int s = 0; s <= max; s++) {
                if (counts[s] == 0) {
                    throw new IllegalArgumentException("stratum " + s + " is empty: strata must be numbered 0.."
                            + max + " without gaps");
                }
            }
            this.strata = b.strata;
            this.strataCount = max + 1;
        } else {
            this.strata = null;
            this.strataCount = 0;
        }
    }

    /** @return a builder; set features and targets, then optionally weights and strata */
    public static Builder builder() {
        return new Builder();
    }

    /** Dense features and real targets, copied and validated. */
    public static Dataset of(double[][] x, double[] y) {
        return builder().features(x).targets(y).build();
    }

    /** Dense features and class labels 0 … K−1 with K = max label + 1 (at least 2), copied and validated. */
    public static Dataset of(double[][] x, int[] labels) {
        return builder().features(x).labels(labels).build();
    }

    public FeatureMatrix features() {
        return features;
    }

    /** @return n */
    public int size() {
        return features.rows();
    }

    /** @return d */
    public int dimension() {
        return features.columns();
    }

    /** @return y<sub>i</sub> (a class label as a whole number when {@link #targetKind()} is CLASSES) */
    public double target(int i) {
        return targets[i];
    }

    /** The backing targets, not a copy: read only. */
    public double[] targetsView() {
        return targets;
    }

    public TargetKind targetKind() {
        return targetKind;
    }

    /** @return K for class labels, 0 for real targets */
    public int classes() {
        return classes;
    }

    /** @return whether weights were given */
    public boolean weighted() {
        return weights != null;
    }

    /** @return the weight as given (1 when none were given) */
    public double weight(int i) {
        return weights == null ? 1.0 : weights[i];
    }

    /** @return ω<sub>i</sub> = n w<sub>i</sub> / Σ<sub>k</sub> w<sub>k</sub> (1 when no weights were given) */
    public double normalizedWeight(int i) {
        return normalizedWeights == null ? 1.0 : normalizedWeights[i];
    }

    /** The normalized weights ω (not a copy, read only), or null when every weight is one. */
    public double[] normalizedWeightsView() {
        return normalizedWeights;
    }

    /** @return whether strata were given */
    public boolean stratified() {
        return strata != null;
    }

    /** @return the number of strata (0 when none were given) */
    public int strataCount() {
        return strataCount;
    }

    /** @return the stratum of row i */
    public int stratum(int i) {
        if (strata == null) {
            throw new IllegalStateException("dataset has no strata");
        }
        return strata[i];
    }

    /** @return a copy of the strata, or null when none were given */
    public int[] strataCopy() {
        return strata == null ? null : strata.clone();
    }

    /** @return a dataset with the same targets, weights and strata but other features (same rows) */
    public Dataset withFeatures(FeatureMatrix replacement) {
        Builder b = toBuilder();
        b.features = replacement;
        return b.build();
    }

    /** @return a dataset with the same data and the given strata (copied) */
    public Dataset withStrata(int[] newStrata) {
        return toBuilder().strata(newStrata).build();
    }

    private Builder toBuilder() {
        Builder b = new Builder();
        b.features = features;
        b.targets = targets;
        b.targetKind = targetKind;
        b.classes = classes;
        b.weights = weights;
        b.strata = strata;
        return b;
    }

    @Override
    public String toString() {
        return "Dataset[n=" + size() + ", d=" + dimension() + ", " + (features instanceof SparseFeatures ? "sparse" : "dense")
                + ", " + (targetKind == TargetKind.CLASSES ? classes + " classes" : "real targets")
                + (weights != null ? ", weighted" : "") + (strata != null ? ", " + strataCount + " strata" : "") + "]";
    }

    /** Collects the parts of a dataset; {@link #build()} validates them and may be called once per builder state. */
    public static final class Builder {
        private FeatureMatrix features;
        private double[] targets;
        private TargetKind targetKind = TargetKind.REAL;
        private int classes;
        private double[] weights;
        private int[] strata;

        private Builder() {
        }

        /** Dense features from rows (copied, validated). */
        public Builder features(double[][] x) {
            this.features = DenseFeatures.of(x);
            return this;
        }

        /** Dense features from a flat row-major array, wrapped without copying when {@code copy} is false. */
        public Builder flatFeatures(double[] values, int rows, int columns, boolean copy) {
            this.features = DenseFeatures.ofFlat(values, rows, columns, copy);
            return this;
        }

        /** Sparse features from CSR arrays (copied, validated). */
        public Builder sparseFeatures(int rows, int columns, int[] rowStart, int[] columnIndex, double[] values) {
            this.features = SparseFeatures.of(rows, columns, rowStart, columnIndex, values);
            return this;
        }

        /** Features already built (and validated). */
        public Builder features(FeatureMatrix matrix) {
            if (matrix == null) {
                throw new NullPointerException("features must not be null");
            }
            this.features = matrix;
            return this;
        }

        /**
         * Real targets (copied). Binary labels in {0, 1} or {−1, +1}, counts and proportions are
         * real targets too: the loss checks its own domain when a fit starts.
         *
         * @throws IllegalArgumentException naming the row if a target is not finite
         */
        public Builder targets(double[] y) {
            if (y == null) {
                throw new NullPointerException("targets must not be null");
            }
            for (int i = 0; i < y.length; i++) {
                if (!Double.isFinite(y[i])) {
                    throw new IllegalArgumentException("y[" + i + "] is " + y[i] + " (targets must be finite)");
                }
            }
            this.targets = y.clone();
            this.targetKind = TargetKind.REAL;
            this.classes = 0;
            return this;
        }

        /** Class labels 0 … K−1 with K = max label + 1 (at least 2). */
        public Builder labels(int[] labels) {
            if (labels == null) {
                throw new NullPointerException("labels must not be null");
            }
            int max = 1;
            for (int i = 0; i < labels.length; i++) {
                if (labels[i] == Integer.MAX_VALUE) {
                    // K = max + 1 would overflow: name the label rather than a negative class count.
                    throw new IllegalArgumentException("labels[" + i + "] (" + labels[i]
                            + ") is too large: labels are 0..K-1 with K = the largest label + 1");
                }
                max = Math.max(max, labels[i]);
            }
            return labels(labels, max + 1);
        }

        /**
         * Class labels in [0, K).
         *
         * @throws IllegalArgumentException if K &lt; 2 or a label is outside [0, K), naming the row and label
         */
        public Builder labels(int[] labels, int classCount) {
            if (labels == null) {
                throw new NullPointerException("labels must not be null");
            }
            if (classCount < 2) {
                throw new IllegalArgumentException("classes (" + classCount + ") must be >= 2");
            }
            double[] y = new double[labels.length];
            for (int i = 0; i < labels.length; i++) {
                if (labels[i] < 0 || labels[i] >= classCount) {
                    throw new IllegalArgumentException("labels[" + i + "] (" + labels[i] + ") is outside [0, "
                            + classCount + ")");
                }
                y[i] = labels[i];
            }
            this.targets = y;
            this.targetKind = TargetKind.CLASSES;
            this.classes = classCount;
            return this;
        }

        /** Non-negative sample weights, not all zero (copied). */
        public Builder weights(double[] w) {
            if (w == null) {
                throw new NullPointerException("weights must not be null");
            }
            this.weights = w.clone();
            return this;
        }

        /** Strata 0 … S−1 without gaps, for stratified sampling (copied). */
        public Builder strata(int[] s) {
            if (s == null) {
                throw new NullPointerException("strata must not be null");
            }
            this.strata = s.clone();
            return this;
        }

        /**
         * @throws IllegalArgumentException if a part is missing, lengths disagree, weights are negative,
         *                                  non-finite or all zero, or a stratum is empty
         */
        public Dataset build() {
            return new Dataset(this);
        }
    }
}
