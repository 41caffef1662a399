package dev.riskmin.model;

import dev.riskmin.loss.LogisticLoss;
import dev.riskmin.loss.Response;

import java.util.Arrays;

/**
 * A single-output linear model z = w·x + b on the original feature scale, with the prediction its
 * loss implies ({@link Response}): z for regression, e<sup>z</sup> for Poisson regression, the class
 * 1 when z &gt; 0 (else 0) for binary classifiers, and P(y = 1) = σ(z) for the logistic loss.
 */
public final class LinearModel {
    private final double[] coefficients;
    private final double intercept;
    private final Response response;
    private final String lossName;

    private LinearModel(double[] coefficients, double intercept, Response response, String lossName) {
        this.coefficients = coefficients;
        this.intercept = intercept;
        this.response = response;
        this.lossName = lossName;
    }

    /**
     * @param coefficients read only (copied); finite
     * @throws IllegalArgumentException naming the index of a non-finite coefficient
     */
    public static LinearModel of(double[] coefficients, double intercept, Response response, String lossName) {
        for (int j = 0; j < coefficients.length; j++) {
            if (!Double.isFinite(coefficients[j])) {
                throw new IllegalArgumentException("coefficients[" + j + "] is " + coefficients[j]);
            }
        }
        if (!Double.isFinite(intercept)) {
            throw new IllegalArgumentException("intercept is " + intercept);
        }
        if (response == Response.SOFTMAX || response == Response.ARGMAX) {
            throw new IllegalArgumentException("response " + response + " needs a MulticlassModel");
        }
        return new LinearModel(coefficients.clone(), intercept, response, lossName);
    }

    /** @return d */
    public int dimension() {
        return coefficients.length;
    }

    /** @return a copy of w */
    public double[] coefficients() {
        return coefficients.clone();
    }

    /** @return w<sub>j</sub> */
    public double coefficient(int j) {
        return coefficients[j];
    }

    public double intercept() {
        return intercept;
    }

    public Response response() {
        return response;
    }

    /** @return the name of the loss the model was fitted with */
    public String lossName() {
        return lossName;
    }

    /**
     * @param x read only; length d
     * @return z = w·x + b
     * @throws IllegalArgumentException if x has the wrong length
     */
    public double decisionValue(double[] x) {
        if (x.length != coefficients.length) {
            throw new IllegalArgumentException("x has " + x.length + " features, the model has " + coefficients.length);
        }
        double z = intercept;
        for (int j = 0; j < x.length; j++) {
            z += coefficients[j] * x[j];
        }
        return z;
    }

    /**
     * @return z (regression), e<sup>z</sup> (Poisson), or the class 1.0 / 0.0 by the sign of z (classifiers)
     */
    public double predict(double[] x) {
        double z = decisionValue(x);
        switch (response) {
            case IDENTITY:
                return z;
            case EXPONENTIAL:
                return Math.exp(z);
            default:
                return z > 0 ? 1.0 : 0.0;
        }
    }

    /** @return whether {@link #probability} is defined (logistic loss only) */
    public boolean hasProbability() {
        return response == Response.LOGISTIC;
    }

    /**
     * @return P(y = 1 | x) = σ(w·x + b)
     * @throws IllegalStateException if the loss defines no probability (e.g. hinge)
     */
    public double probability(double[] x) {
        if (response != Response.LOGISTIC) {
            throw new IllegalStateException("the " + lossName + " loss defines no probability; use decisionValue");
        }
        return LogisticLoss.sigmoid(decisionValue(x));
    }

    @Override
    public String toString() {
        return "LinearModel[" + lossName + ", b=" + intercept + ", w=" + Arrays.toString(coefficients) + "]";
    }
}
