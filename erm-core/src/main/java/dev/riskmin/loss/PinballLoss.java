package dev.riskmin.loss;

/**
 * Pinball (quantile) loss at level τ ∈ (0, 1): with r = y − z,
 * ℓ(z, y) = max(τ r, (τ − 1) r), i.e. τ r for r ≥ 0 and (1 − τ)(−r) for r &lt; 0. Its minimizer in z
 * over a distribution of y is the τ-quantile.
 *
 * <ul>
 *   <li>derivative: −τ if y &gt; z, 1 − τ if y &lt; z, and 0 at the kink y = z (the element of the
 *       subdifferential [−τ, 1 − τ] with the least magnitude);</li>
 *   <li>smoothness: +∞ (the derivative jumps by 1 at z = y);</li>
 *   <li>convex: yes; targets: any finite y.</li>
 * </ul>
 *
 * <p>Source: R. Koenker &amp; G. Bassett, "Regression quantiles", Econometrica 46(1), 33–50, 1978;
 * METHODS §11.
 */
public final class PinballLoss implements Loss {
    private final double tau;

    PinballLoss(double tau) {
        this.tau = tau;
    }

    /** @return the quantile level τ ∈ (0, 1) */
    public double tau() {
        return tau;
    }

    @Override
    public double value(double z, double y) {
        double r = y - z;
        return r >= 0 ? tau * r : (tau - 1.0) * r;
    }

    @Override
    public double derivative(double z, double y) {
        if (y > z) {
            return -tau;
        }
        return y < z ? 1.0 - tau : 0.0;
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
        return "pinball(tau=" + tau + ")";
    }

    /** Equal when τ is equal bit for bit. */
    @Override
    public boolean equals(Object o) {
        return o instanceof PinballLoss && Double.compare(((PinballLoss) o).tau, tau) == 0;
    }

    @Override
    public int hashCode() {
        return Double.hashCode(tau);
    }

    @Override
    public String toString() {
        return name();
    }
}
