package dev.riskmin.loss;

/**
 * Absolute loss ℓ(z, y) = |z − y| (least absolute deviations), the median regression loss.
 *
 * <ul>
 *   <li>derivative: sign(z − y), and 0 at the kink z = y (the element of the subdifferential
 *       [−1, 1] with the least magnitude);</li>
 *   <li>smoothness: +∞ (the derivative jumps by 2 at z = y);</li>
 *   <li>convex: yes; targets: any finite y.</li>
 * </ul>
 *
 * <p>Source: common practice (least absolute deviations, Boscovich and Laplace; METHODS §11). It is
 * twice the pinball loss at τ = 1/2 (Koenker &amp; Bassett, Econometrica 46(1), 1978).
 *
 * @implNote The derivative compares z with y instead of taking the sign of z − y, so it stays
 * exact when z − y overflows; the value is +∞ only when |z − y| exceeds the largest double.
 */
public final class AbsoluteLoss implements Loss {
    static final AbsoluteLoss INSTANCE = new AbsoluteLoss();

    private AbsoluteLoss() {
    }

    @Override
    public double value(double z, double y) {
        return Math.abs(z - y);
    }

    @Override
    public double derivative(double z, double y) {
        if (z > y) {
            return 1.0;
        }
        return z < y ? -1.0 : 0.0;
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
        return TargetDomain.REAL;
    }

    @Override
    public Response response() {
        return Response.IDENTITY;
    }

    @Override
    public String name() {
        return "absolute";
    }

    @Override
    public String toString() {
        return name();
    }
}
