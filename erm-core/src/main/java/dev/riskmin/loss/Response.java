package dev.riskmin.loss;

/**
 * How a fitted linear model turns its decision value z into a prediction, as implied by the loss
 * it was fitted with.
 */
public enum Response {
    /** The prediction is z itself (regression losses). */
    IDENTITY,
    /** The prediction is the mean e<sup>z</sup> (Poisson regression with log link). */
    EXPONENTIAL,
    /** The prediction is a class; P(y = 1) = σ(z) = 1/(1 + e<sup>−z</sup>) (logistic loss). */
    LOGISTIC,
    /** The prediction is a class by the sign of z; no probability is defined (hinge-type losses). */
    MARGIN,
    /** K decision values; P(class k) = softmax(z)<sub>k</sub> (softmax cross-entropy). */
    SOFTMAX,
    /** K decision values; the class is the arg max, no probability (multiclass hinge). */
    ARGMAX
}
