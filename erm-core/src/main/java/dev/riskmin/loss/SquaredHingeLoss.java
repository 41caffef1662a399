package dev.riskmin.loss;

/**
 * Squared hinge loss for binary labels: with s = +1 for y = 1 and s = −1 for y ≤ 0,
 * ℓ(z, y) = max(0, 1 − s z)².
 *
 * <ul>
 *   <li>derivative: −2 s max(0, 1 − s z), continuous;</li>
 *   <li>smoothness: 2 (ℓ'' = 2 for s z &lt; 1, 0 above);</li>
 *   <li>convex: yes; targets: {0, 1} or {−1, +1}.</li>
 * </ul>
 *
 * <p>Source: common practice (the squared-slack support vector machine, Cortes &amp; Vapnik, Machine
 * Learning 20(3), 1995, where the slack enters squared for σ = 2 (from memory)); METHODS §11.
 *
 * @implNote The value grows quadratically: it is +∞ only where (1 − s z)² exceeds the largest double.
 */
public final class SquaredHingeLoss implements Loss {
    static final SquaredHingeLoss INSTANCE = new SquaredHingeLoss();

    private SquaredHingeLoss() {
    }

    @Override
    public double value(double z, double y) {
        double gap = 1.0 - (y > 0 ? z : -z);
        return gap > 0 ? gap * gap : 0.0;
    }

    @Override
    public double derivative(double z, double y) {
        double s = y > 0 ? 1.0 : -1.0;
        double gap = 1.0 - s * z;
        return gap > 0 ? -2.0 * s * gap : 0.0;
    }

    @Override
    public double smoothness() {
        return 2.0;
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
        return "squared-hinge";
    }

    @Override
    public String toString() {
        return name();
    }
}
