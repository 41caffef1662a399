package dev.riskmin.loss;

/**
 * ε-insensitive loss with tube half-width ε ≥ 0: ℓ(z, y) = max(0, |z − y| − ε), zero inside the tube
 * |z − y| ≤ ε and absolute outside it (ε = 0 gives the absolute loss).
 *
 * <ul>
 *   <li>derivative: sign(z − y) if |z − y| &gt; ε, else 0 (at the kinks |z − y| = ε this is the
 *       element of the subdifferential with the least magnitude);</li>
 *   <li>smoothness: +∞ (the derivative jumps by 1 at |z − y| = ε);</li>
 *   <li>convex: yes; targets: any finite y.</li>
 * </ul>
 *
 * <p>Source: V. N. Vapnik, <i>The Nature of Statistical Learning Theory</i>, Springer, 1995 (support
 * vector regression); METHODS §11.
 */
public final class EpsilonInsensitiveLoss implements Loss {
    private final double epsilon;

    EpsilonInsensitiveLoss(double epsilon) {
        this.epsilon = epsilon;
    }

    /** @return the tube half-width ε ≥ 0 */
    public double epsilon() {
        return epsilon;
    }

    @Override
    public double value(double z, double y) {
        double excess = Math.abs(z - y) - epsilon;
        return excess > 0 ? excess : 0.0;
    }

    @Override
    public double derivative(double z, double y) {
        double r = z - y;
        if (r > epsilon) {
            return 1.0;
        }
        return r < -epsilon ? -1.0 : 0.0;
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
        return "epsilon-insensitive(epsilon=" + epsilon + ")";
    }

    /** Equal when ε is equal bit for bit. */
    @Override
    public boolean equals(Object o) {
        return o instanceof EpsilonInsensitiveLoss && Double.compare(((EpsilonInsensitiveLoss) o).epsilon, epsilon) == 0;
    }

    @Override
    public int hashCode() {
        return Double.hashCode(epsilon);
    }

    @Override
    public String toString() {
        return name();
    }
}
