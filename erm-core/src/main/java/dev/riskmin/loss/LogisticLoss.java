package dev.riskmin.loss;

/**
 * Logistic loss (binomial deviance / 2) for y in {0, 1}, {−1, +1}, or a proportion y in [0, 1]:
 * with y<sub>01</sub> = max(y, 0), ℓ(z, y) = log(1 + e<sup>z</sup>) − y<sub>01</sub> z and
 * ∂ℓ/∂z = σ(z) − y<sub>01</sub>, σ(z) = 1/(1 + e<sup>−z</sup>). For y = ±1 this equals
 * log(1 + e<sup>−yz</sup>) with derivative −y σ(−yz). Smoothness 1/4 (the peak of σ' at z = 0), convex.
 *
 * <p>A proportion y = k/m with weight m is the binomial likelihood of k successes in m trials
 * (McCullagh &amp; Nelder, <i>Generalized Linear Models</i>, 2nd ed., 1989, ch. 4).
 *
 * @implNote log(1 + e<sup>u</sup>) is computed as max(u, 0) + log1p(e<sup>−|u|</sup>), finite for
 * every finite u (METHODS §11); σ is computed from e<sup>−|z|</sup> on the side that cannot overflow.
 */
public final class LogisticLoss implements Loss {
    static final LogisticLoss INSTANCE = new LogisticLoss();

    private LogisticLoss() {
    }

    /** @return log(1 + e<sup>u</sup>) without overflow */
    public static double softplus(double u) {
        return Math.max(u, 0.0) + Math.log1p(Math.exp(-Math.abs(u)));
    }

    /** @return σ(z) = 1/(1 + e<sup>−z</sup>) without overflow */
    public static double sigmoid(double z) {
        if (z >= 0) {
            return 1.0 / (1.0 + Math.exp(-z));
        }
        double e = Math.exp(z);
        return e / (1.0 + e);
    }

    @Override
    public double value(double z, double y) {
        if (y == 1.0) {
            return softplus(-z);
        }
        if (y <= 0.0) {
            return softplus(z);
        }
        // A proportion: log(1 + e^z) - y z = y softplus(-z) + (1 - y) softplus(z), a convex mix that
        // never subtracts two large numbers.
        return y * softplus(-z) + (1.0 - y) * softplus(z);
    }

    @Override
    public double derivative(double z, double y) {
        // −σ(−z) for y = 1 rather than σ(z) − 1, which keeps its relative accuracy where σ(z) is close to 1.
        if (y == 1.0) {
            return -sigmoid(-z);
        }
        if (y <= 0.0) {
            return sigmoid(z);
        }
        return sigmoid(z) - y;
    }

    @Override
    public double smoothness() {
        return 0.25;
    }

    @Override
    public boolean convex() {
        return true;
    }

    @Override
    public TargetDomain domain() {
        return TargetDomain.PROPORTION;
    }

    @Override
    public Response response() {
        return Response.LOGISTIC;
    }

    @Override
    public String name() {
        return "logistic";
    }

    @Override
    public String toString() {
        return name();
    }
}
