package dev.riskmin.loss;

/**
 * Squared loss ℓ(z, y) = (z − y)²/2, derivative z − y, smoothness 1, convex; least squares.
 * Source: common practice (Gauss–Legendre least squares); METHODS §11.
 */
public final class SquaredLoss implements Loss {
    static final SquaredLoss INSTANCE = new SquaredLoss();

    private SquaredLoss() {
    }

    @Override
    public double value(double z, double y) {
        double r = z - y;
        return 0.5 * r * r;
    }

    @Override
    public double derivative(double z, double y) {
        return z - y;
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
        return "squared";
    }

    @Override
    public String toString() {
        return name();
    }
}
