package dev.riskmin.objective;

/**
 * A user's differentiable parametric model, seen as n per-sample losses ℓ<sub>i</sub>(h) over a
 * parameter vector h of length p. The library adds the penalty, the averaging and the sample
 * weights; the model supplies losses and gradients.
 *
 * <p>Implementations must be allocation-free in {@link #addGradient} to keep the fit loop
 * allocation-free, and must not keep state between calls (the fit may evaluate any sample at any
 * parameter, in any order).
 */
public interface SampleFunction {

    /** @return n */
    int size();

    /** @return p */
    int dimension();

    /** @return ℓ<sub>i</sub>(h) */
    double loss(double[] h, int i);

    /**
     * g += scale · ∇ℓ<sub>i</sub>(h).
     *
     * @param h read only
     * @param g written (accumulated into)
     * @return ℓ<sub>i</sub>(h)
     */
    double addGradient(double[] h, int i, double scale, double[] g);

    /** @return whether the penalty applies to coordinate j (default: every coordinate) */
    default boolean penalized(int j) {
        return true;
    }

    /** @return a Lipschitz constant of ∇ℓ<sub>i</sub>, or +∞ when unknown (the default) */
    default double smoothness(int i) {
        return Double.POSITIVE_INFINITY;
    }
}
