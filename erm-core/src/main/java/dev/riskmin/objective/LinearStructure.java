package dev.riskmin.objective;

import dev.riskmin.data.FeatureMatrix;

/**
 * The structure of a single-output linear objective, f<sub>i</sub>(h) = ω<sub>i</sub> ℓ(z<sub>i</sub>, y<sub>i</sub>)
 * with z<sub>i</sub> = w·x<sub>i</sub> + b: the gradient of sample i is ω<sub>i</sub> ℓ'(z<sub>i</sub>, y<sub>i</sub>) (x<sub>i</sub>, 1),
 * so an update rule may store one scalar per sample instead of a gradient (SAGA for linear models,
 * Defazio, Bach &amp; Lacoste-Julien 2014, §4).
 */
public interface LinearStructure {

    FeatureMatrix features();

    /** @return whether h ends with an intercept b = h[d] */
    boolean hasIntercept();

    /** @return z<sub>i</sub> = w·x<sub>i</sub> + b */
    double prediction(double[] h, int i);

    /** @return ω<sub>i</sub> ℓ(z, y<sub>i</sub>) */
    double weightedLoss(double z, int i);

    /** @return ω<sub>i</sub> ∂ℓ/∂z at (z, y<sub>i</sub>) */
    double weightedDerivative(double z, int i);

    /** g[0..d) += scale · x<sub>i</sub>, and g[d] += scale when there is an intercept. */
    void addFeatures(int i, double scale, double[] g);

    /**
     * @return whether the objective splits large batch gradients across threads, in which case update
     * rules should go through {@link Objective#batchGradient} rather than their own per-row loops
     */
    default boolean splitsBatches() {
        return false;
    }
}
