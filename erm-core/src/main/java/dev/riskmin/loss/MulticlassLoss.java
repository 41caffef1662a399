package dev.riskmin.loss;

/**
 * A loss ℓ(z, y) of K decision values z = (z<sub>0</sub>, …, z<sub>K−1</sub>) and a class label
 * y ∈ {0, …, K−1}. The values are read from {@code z[offset .. offset+K)}, so a caller can keep them
 * in a reusable buffer. Implementations are immutable, thread-safe and allocation-free.
 */
public interface MulticlassLoss {

    /** @return ℓ(z, y) */
    double value(double[] z, int offset, int classes, int y);

    /**
     * Writes ∂ℓ/∂z<sub>k</sub> into {@code gradient[gOffset + k]} for k = 0 … K−1 and returns ℓ(z, y).
     *
     * @param z        read only
     * @param gradient written
     */
    double gradient(double[] z, int offset, int classes, int y, double[] gradient, int gOffset);

    /** @return β, the largest eigenvalue of ∂²ℓ/∂z² over all z (+∞ if ℓ is not smooth) */
    double smoothness();

    boolean convex();

    /** @return SOFTMAX or ARGMAX */
    Response response();

    String name();
}
