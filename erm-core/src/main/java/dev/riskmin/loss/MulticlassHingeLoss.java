package dev.riskmin.loss;

/**
 * Multiclass hinge loss in the form of Crammer and Singer:
 * ℓ(z, y) = max(0, 1 + max<sub>k≠y</sub> z<sub>k</sub> − z<sub>y</sub>), zero once the true class leads every
 * other class by a margin of at least 1.
 *
 * <ul>
 *   <li>subgradient: with j the runner-up class (the smallest index k ≠ y with the largest z<sub>k</sub>),
 *       e<sub>j</sub> − e<sub>y</sub> if 1 + z<sub>j</sub> − z<sub>y</sub> &gt; 0, else 0 (at the kink this is the
 *       element of the subdifferential with the least magnitude);</li>
 *   <li>smoothness: +∞ (the subgradient jumps at the kink and where the runner-up changes);</li>
 *   <li>convex: yes (a maximum of affine functions); invariant under adding the same constant to
 *       every z<sub>k</sub>. With K = 1 there is no other class and the loss is 0.</li>
 * </ul>
 *
 * <p>Source: K. Crammer &amp; Y. Singer, "On the algorithmic implementation of multiclass kernel-based
 * vector machines", JMLR 2, 265–292, 2001; METHODS §11.
 *
 * @implNote The margin is formed without subtracting two overflowed terms, so it is +∞ only where
 * z<sub>j</sub> − z<sub>y</sub> exceeds the largest double and never NaN for finite z.
 */
public final class MulticlassHingeLoss implements MulticlassLoss {
    static final MulticlassHingeLoss INSTANCE = new MulticlassHingeLoss();

    private MulticlassHingeLoss() {
    }

    /**
     * @throws IllegalArgumentException naming y and K if y is outside [0, K)
     */
    @Override
    public double value(double[] z, int offset, int classes, int y) {
        MulticlassLabels.require(y, classes);
        int runnerUp = runnerUp(z, offset, classes, y);
        if (runnerUp < 0) {
            return 0.0;
        }
        double margin = (z[offset + runnerUp] - z[offset + y]) + 1.0;
        return margin > 0 ? margin : 0.0;
    }

    /**
     * @throws IllegalArgumentException naming y and K if y is outside [0, K)
     */
    @Override
    public double gradient(double[] z, int offset, int classes, int y, double[] gradient, int gOffset) {
        MulticlassLabels.require(y, classes);
        int runnerUp = runnerUp(z, offset, classes, y);
        double margin = runnerUp < 0 ? 0.0 : (z[offset + runnerUp] - z[offset + y]) + 1.0;
        for (int k = 0; k < classes; k++) {
            gradient[gOffset + k] = 0.0;
        }
        if (margin > 0) {
            gradient[gOffset + runnerUp] = 1.0;
            gradient[gOffset + y] = -1.0;
            return margin;
        }
        return 0.0;
    }

    /** @return the smallest k ≠ y with the largest z[offset + k], or −1 if K = 1 */
    private static int runnerUp(double[] z, int offset, int classes, int y) {
        int best = -1;
        double top = Double.NEGATIVE_INFINITY;
        for (int k = 0; k < classes; k++) {
            if (k != y && (best < 0 || z[offset + k] > top)) {
                best = k;
                top = z[offset + k];
            }
        }
        return best;
    }

    @Override
    public double smoothness() {
        return Double.POSITIVE_INFINITY;
    }

    @Override
    public boolean convex() {
        return true;
    }

    @Override
    public Response response() {
        return Response.ARGMAX;
    }

    @Override
    public String name() {
        return "multiclass-hinge";
    }

    @Override
    public String toString() {
        return name();
    }
}
