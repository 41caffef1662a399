package dev.riskmin.loss;

/**
 * Huber loss with threshold δ &gt; 0: with r = z − y,
 * ℓ(z, y) = r²/2 if |r| ≤ δ, and δ|r| − δ²/2 otherwise.
 *
 * <ul>
 *   <li>derivative: clip(r, −δ, δ), continuous;</li>
 *   <li>smoothness: 1 (ℓ'' = 1 on |r| &lt; δ, 0 outside);</li>
 *   <li>convex: yes; targets: any finite y.</li>
 * </ul>
 *
 * <p>Source: P. J. Huber, "Robust estimation of a location parameter", Ann. Math. Statist. 35(1),
 * 73–101, 1964; METHODS §11.
 *
 * @implNote The linear branch is evaluated as δ(|r| − δ/2), which cannot form ∞ − ∞ for a large δ.
 * The value grows linearly and stays finite for |r| up to about 1e300 as long as δ² does not
 * overflow.
 */
public final class HuberLoss implements Loss {
    private final double delta;

    HuberLoss(double delta) {
        this.delta = delta;
    }

    /** @return the threshold δ between the quadratic and the linear part */
    public double delta() {
        return delta;
    }

    @Override
    public double value(double z, double y) {
        double r = Math.abs(z - y);
        if (r <= delta) {
            return 0.5 * r * r;
        }
        return delta * (r - 0.5 * delta);
    }

    @Override
    public double derivative(double z, double y) {
        double r = z - y;
        if (r > delta) {
            return delta;
        }
        return r < -delta ? -delta : r;
    }

    @Override
    public double smoothness() {
        return 1.0;
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
        return "huber(delta=" + delta + ")";
    }

    /** Equal when δ is equal bit for bit. */
    @Override
    public boolean equals(Object o) {
        return o instanceof HuberLoss && Double.compare(((HuberLoss) o).delta, delta) == 0;
    }

    @Override
    public int hashCode() {
        return Double.hashCode(delta);
    }

    @Override
    public String toString() {
        return name();
    }
}
