package dev.riskmin.loss;

/**
 * Hinge loss for binary labels: with s = +1 for y = 1 and s = −1 for y ≤ 0 (so {0, 1} and {−1, +1}
 * labels give the same loss), ℓ(z, y) = max(0, 1 − s z).
 *
 * <ul>
 *   <li>derivative: −s if s z &lt; 1, else 0 (at the kink s z = 1 this is the element of the
 *       subdifferential −s·[0, 1] with the least magnitude);</li>
 *   <li>smoothness: +∞ (the derivative jumps at s z = 1);</li>
 *   <li>convex: yes; targets: {0, 1} or {−1, +1}.</li>
 * </ul>
 *
 * <p>Source: C. Cortes &amp; V. Vapnik, "Support-vector networks", Machine Learning 20(3), 273–297,
 * 1995; METHODS §11.
 */
public final class HingeLoss implements Loss {
    static final HingeLoss INSTANCE = new HingeLoss();

    private HingeLoss() {
    }

    @Override
    public double value(double z, double y) {
        double gap = 1.0 - (y > 0 ? z : -z);
        return gap > 0 ? gap : 0.0;
    }

    @Override
    public double derivative(double z, double y) {
        if (y > 0) {
            return z < 1.0 ? -1.0 : 0.0;
        }
        return -z < 1.0 ? 1.0 : 0.0;
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
    public TargetDomain domain() {
        return TargetDomain.BINARY;
    }

    @Override
    public Response response() {
        return Response.MARGIN;
    }

    @Override
    public String name() {
        return "hinge";
    }

    @Override
    public String toString() {
        return name();
    }
}
