package dev.riskmin.loss;

/**
 * Smoothed hinge loss with smoothing width γ &gt; 0 for binary labels: with s = +1 for y = 1 and
 * s = −1 for y ≤ 0 and the margin a = s z,
 * ℓ(z, y) = 0 if a ≥ 1; 1 − a − γ/2 if a ≤ 1 − γ; (1 − a)²/(2γ) otherwise.
 * It is the hinge loss with its kink replaced by a parabola of width γ, and lies within γ/2 of it.
 *
 * <ul>
 *   <li>derivative: −s min(1, max(0, (1 − a)/γ)), continuous;</li>
 *   <li>smoothness: 1/γ (ℓ'' = 1/γ on 1 − γ &lt; a &lt; 1, 0 elsewhere);</li>
 *   <li>convex: yes; targets: {0, 1} or {−1, +1}.</li>
 * </ul>
 *
 * <p>Source: S. Shalev-Shwartz &amp; T. Zhang, "Stochastic dual coordinate ascent methods for
 * regularized loss minimization", JMLR 14, 567–599, 2013 (the smoothed hinge of their experiments;
 * section from memory); METHODS §11.
 *
 * @implNote The parabola is evaluated as (1 − a)·((1 − a)/(2γ)), whose second factor is at most 1/2,
 * so a large γ cannot overflow it; the value stays finite for every finite z and γ.
 */
public final class SmoothedHingeLoss implements Loss {
    private final double gamma;

    SmoothedHingeLoss(double gamma) {
        this.gamma = gamma;
    }

    /** @return the smoothing width γ &gt; 0 */
    public double gamma() {
        return gamma;
    }

    @Override
    public double value(double z, double y) {
        double gap = 1.0 - (y > 0 ? z : -z);
        if (gap <= 0) {
            return 0.0;
        }
        if (gap >= gamma) {
            return gap - 0.5 * gamma;
        }
        return gap * (gap / (2.0 * gamma));
    }

    @Override
    public double derivative(double z, double y) {
        double s = y > 0 ? 1.0 : -1.0;
        double gap = 1.0 - s * z;
        if (gap <= 0) {
            return 0.0;
        }
        if (gap >= gamma) {
            return -s;
        }
        return -s * (gap / gamma);
    }

    @Override
    public double smoothness() {
        return 1.0 / gamma;
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
        return "smoothed-hinge(gamma=" + gamma + ")";
    }

    /** Equal when γ is equal bit for bit. */
    @Override
    public boolean equals(Object o) {
        return o instanceof SmoothedHingeLoss && Double.compare(((SmoothedHingeLoss) o).gamma, gamma) == 0;
    }

    @Override
    public int hashCode() {
        return Double.hashCode(gamma);
    }

    @Override
    public String toString() {
        return name();
    }
}
