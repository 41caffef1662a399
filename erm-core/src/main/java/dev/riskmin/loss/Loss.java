package dev.riskmin.loss;

/**
 * A pointwise loss ℓ(z, y) of a scalar prediction z = w·x + b and a target y.
 *
 * <p>Implementations are immutable, thread-safe and allocation-free. Users may implement their
 * own; the library's losses are built by the static factories below, with the formulas in each
 * class's documentation (table in METHODS §11 of the design notes).
 *
 * <p>Non-finite values: for finite z and y in the domain, {@link #value} and {@link #derivative}
 * are never NaN. They are ±∞ only where the true value lies beyond ±{@link Double#MAX_VALUE}.
 */
public interface Loss {

    /** @return ℓ(z, y) */
    double value(double z, double y);

    /** @return ∂ℓ/∂z at (z, y); at a kink, one element of the subdifferential (documented per loss) */
    double derivative(double z, double y);

    /**
     * @return β = sup<sub>z</sub> |∂²ℓ/∂z²|, the Lipschitz constant of the derivative; +∞ where the
     * derivative jumps (absolute, hinge, pinball, ε-insensitive) or grows without bound (Poisson)
     */
    double smoothness();

    /** @return whether ℓ(·, y) is convex in z for every y in the domain */
    boolean convex();

    /** @return the targets this loss accepts */
    TargetDomain domain();

    /** @return how a model fitted with this loss predicts */
    Response response();

    /** @return a short name for reports, e.g. "huber(delta=1.0)" */
    String name();

    /**
     * @throws IllegalArgumentException naming the row and the value if y is outside {@link #domain()}
     */
    default void requireTarget(double y, int row) {
        if (!domain().accepts(y)) {
            throw new IllegalArgumentException("y[" + row + "] (" + y + ") is not valid for the " + name()
                    + " loss: expected " + domain().description());
        }
    }
}
