package dev.riskmin.loss;

/**
 * Factories for the library's pointwise losses. Each returns an immutable, thread-safe loss; the
 * formula and its source are on the returned class.
 */
public final class Losses {
    private Losses() {
    }

    /** (z − y)²/2: {@link SquaredLoss}. */
    public static Loss squared() {
        return SquaredLoss.INSTANCE;
    }

    /** log(1 + e<sup>z</sup>) − y z for y in {0,1} or [0,1], or log(1 + e<sup>−yz</sup>) for y = ±1: {@link LogisticLoss}. */
    public static Loss logistic() {
        return LogisticLoss.INSTANCE;
    }
}
