package dev.riskmin.model;

import dev.riskmin.loss.Response;

/**
 * A K-class linear model z<sub>k</sub> = w<sub>k</sub>·x + b<sub>k</sub> on the original feature scale.
 * The class is arg max<sub>k</sub> z<sub>k</sub> (lowest k on ties); for softmax cross-entropy,
 * P(k | x) = e<sup>z<sub>k</sub></sup> / Σ<sub>m</sub> e<sup>z<sub>m</sub></sup>, computed after
 * subtracting max z so it cannot overflow.
 */
public final class MulticlassModel {
    private final double[] coefficients; // K x d row-major
    private final double[] intercepts;
    private final int classes;
    private final int dimension;
    private final Response response;
    private final String lossName;

    private MulticlassModel(double[] coefficients, double[] intercepts, int dimension, Response response,
                            String lossName) {
        this.coefficients = coefficients;
        this.intercepts = intercepts;
        this.classes = intercepts.length;
        this.dimension = dimension;
        this.response = response;
        this.lossName = lossName;
    }

    /**
     * @param coefficients read only (copied): K·d values, class k's weights at [k·d, (k+1)·d)
     * @param intercepts   read only (copied): K values
     * @throws IllegalArgumentException on a size mismatch or a non-finite parameter (named by index)
     */
    public static MulticlassModel of(double[] coefficients, double[] intercepts, int dimension, Response response,
                                     String lossName) {
        int k = intercepts.length;
        if (k < 2) {
            throw new IllegalArgumentException("classes (" + k + ") must be >= 2");
        }
        if (coefficients.length != (long) k * dimension) {
            throw new IllegalArgumentException("coefficients have " + coefficients.length + " entries, expected "
                    + k + " x " + dimension);
        }
        for (int j = 0; j < coefficients.length; j++) {
            if (!Double.isFinite(coefficients[j])) {
                throw new IllegalArgumentException("coefficients[" + (j / dimension) + ", " + (j % dimension) + "] is "
                        + coefficients[j]);
            }
        }
        for (int j = 0; j < k; j++) {
            if (!Double.isFinite(intercepts[j])) {
                throw new IllegalArgumentException("intercepts[" + j + "] is " + intercepts[j]);
            }
        }
        if (response != Response.SOFTMAX && response != Response.ARGMAX) {
            throw new IllegalArgumentException("response " + response + " is not a multiclass response");
        }
        return new MulticlassModel(coefficients.clone(), intercepts.clone(), dimension, response, lossName);
    }

    public int classes() {
        return classes;
    }

    public int dimension() {
        return dimension;
    }

    /** @return w<sub>k,j</sub> */
    public double coefficient(int k, int j) {
        return coefficients[k * dimension + j];
    }

    /** @return b<sub>k</sub> */
    public double intercept(int k) {
        return intercepts[k];
    }

    public Response response() {
        return response;
    }

    public String lossName() {
        return lossName;
    }

    /**
     * Writes z<sub>k</sub> into {@code out[0 .. K)}.
     *
     * @param x   read only; length d
     * @param out written; length ≥ K
     */
    public void decisionValues(double[] x, double[] out) {
        if (x.length != dimension) {
            throw new IllegalArgumentException("x has " + x.length + " features, the model has " + dimension);
        }
        if (out.length < classes) {
            throw new IllegalArgumentException("out has " + out.length + " entries, need " + classes);
        }
        for (int k = 0; k < classes; k++) {
            double z = intercepts[k];
            int base = k * dimension;
            for (int j = 0; j < dimension; j++) {
                z += coefficients[base + j] * x[j];
            }
            out[k] = z;
        }
    }

    /** @return arg max<sub>k</sub> z<sub>k</sub>, the lowest k on ties */
    public int predictClass(double[] x) {
        int best = 0;
        double bestZ = Double.NEGATIVE_INFINITY;
        for (int k = 0; k < classes; k++) {
            double z = intercepts[k];
            int base = k * dimension;
            if (x.length != dimension) {
                throw new IllegalArgumentException("x has " + x.length + " features, the model has " + dimension);
            }
            for (int j = 0; j < dimension; j++) {
                z += coefficients[base + j] * x[j];
            }
            if (z > bestZ) {
                bestZ = z;
                best = k;
            }
        }
        return best;
    }

    /** @return whether {@link #probabilities} is defined (softmax cross-entropy only) */
    public boolean hasProbability() {
        return response == Response.SOFTMAX;
    }

    /**
     * Writes P(k | x) into {@code out[0 .. K)}.
     *
     * @throws IllegalStateException if the loss defines no probability (multiclass hinge)
     */
    public void probabilities(double[] x, double[] out) {
        if (response != Response.SOFTMAX) {
            throw new IllegalStateException("the " + lossName + " loss defines no probability; use decisionValues");
        }
        decisionValues(x, out);
        double max = Double.NEGATIVE_INFINITY;
        for (int k = 0; k < classes; k++) {
            max = Math.max(max, out[k]);
        }
        double sum = 0;
        for (int k = 0; k < classes; k++) {
            out[k] = Math.exp(out[k] - max);
            sum += out[k];
        }
        for (int k = 0; k < classes; k++) {
            out[k] /= sum;
        }
    }
}
