package dev.riskmin.loss;

/**
 * Poisson loss with the log link: the prediction is the rate μ = e<sup>z</sup> and
 * ℓ(z, y) = e<sup>z</sup> − y z, the negative Poisson log-likelihood without the term log(y!) that
 * does not depend on z. For a fixed y &gt; 0 it is minimal at z = log y.
 *
 * <ul>
 *   <li>derivative: e<sup>z</sup> − y;</li>
 *   <li>smoothness: +∞ (ℓ'' = e<sup>z</sup> is unbounded);</li>
 *   <li>convex: yes; targets: finite y ≥ 0 (counts or rates).</li>
 * </ul>
 *
 * <p>Source: P. McCullagh &amp; J. A. Nelder, <i>Generalized Linear Models</i>, 2nd ed., Chapman &amp;
 * Hall, 1989, ch. 6 (log-linear models; chapter number from memory); METHODS §11.
 *
 * <p>Non-finite values: for finite z the value is ±∞ only where |e<sup>z</sup> − y z| exceeds the
 * largest double, and the derivative is +∞ only where e<sup>z</sup> does (z &gt; about 709.78); neither
 * is ever NaN.
 *
 * @implNote When both e<sup>z</sup> and y z overflow, their difference is formed in log space as
 * y z · expm1(z − log y − log z), so that ∞ − ∞ never arises.
 */
public final class PoissonLoss implements Loss {
    static final PoissonLoss INSTANCE = new PoissonLoss();

    private PoissonLoss() {
    }

    @Override
    public double value(double z, double y) {
        double rate = Math.exp(z);
        double yz = y * z;
        if (rate == Double.POSITIVE_INFINITY && yz == Double.POSITIVE_INFINITY) {
            return bothOverflow(z, y);
        }
        return rate - yz;
    }

    /** e<sup>z</sup> − y z when both terms exceed the largest double (so z &gt; 709 and y &gt; 0). */
    private static double bothOverflow(double z, double y) {
        double logYz = Math.log(y) + Math.log(z);
        double t = z - logYz;
        if (t == 0) {
            return 0.0;
        }
        double magnitude = Math.exp(logYz + Math.log(Math.abs(Math.expm1(t))));
        return t > 0 ? magnitude : -magnitude;
    }

    @Override
    public double derivative(double z, double y) {
        return Math.exp(z) - y;
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
        return TargetDomain.NON_NEGATIVE;
    }

    @Override
    public Response response() {
        return Response.EXPONENTIAL;
    }

    @Override
    public String name() {
        return "poisson";
    }

    @Override
    public String toString() {
        return name();
    }
}
