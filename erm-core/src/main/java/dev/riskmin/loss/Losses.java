package dev.riskmin.loss;

import dev.riskmin.util.Arguments;

/**
 * Factories for the library's pointwise and multiclass losses. Each returns an immutable,
 * thread-safe loss; the formula, derivative, smoothness constant and source are on the returned
 * class (summary table in METHODS §11 of the design notes).
 */
public final class Losses {
    private Losses() {
    }

    /** (z − y)²/2: {@link SquaredLoss}. */
    public static Loss squared() {
        return SquaredLoss.INSTANCE;
    }

    /** |z − y|: {@link AbsoluteLoss}. */
    public static Loss absolute() {
        return AbsoluteLoss.INSTANCE;
    }

    /**
     * r²/2 for |r| ≤ δ, δ|r| − δ²/2 beyond, r = z − y: {@link HuberLoss}.
     *
     * @param delta the threshold δ, in the units of the target; finite and &gt; 0
     * @throws IllegalArgumentException naming delta if it is not finite and &gt; 0
     */
    public static Loss huber(double delta) {
        return new HuberLoss(Arguments.positive("delta", delta));
    }

    /**
     * max(τ r, (τ − 1) r) with r = y − z, the τ-quantile loss: {@link PinballLoss}.
     *
     * @param tau the quantile level τ, in the open interval (0, 1)
     * @throws IllegalArgumentException naming tau if it is outside (0, 1) or NaN
     */
    public static Loss pinball(double tau) {
        return new PinballLoss(Arguments.inOpenRange("tau", tau, 0.0, 1.0));
    }

    /**
     * max(0, |z − y| − ε): {@link EpsilonInsensitiveLoss}.
     *
     * @param epsilon the tube half-width ε, in the units of the target; finite and ≥ 0
     * @throws IllegalArgumentException naming epsilon if it is not finite and ≥ 0
     */
    public static Loss epsilonInsensitive(double epsilon) {
        return new EpsilonInsensitiveLoss(Arguments.nonNegative("epsilon", epsilon));
    }

    /** e<sup>z</sup> − y z for counts y ≥ 0 (log link): {@link PoissonLoss}. */
    public static Loss poisson() {
        return PoissonLoss.INSTANCE;
    }

    /** log(1 + e<sup>z</sup>) − y z for y in {0,1} or [0,1], or log(1 + e<sup>−yz</sup>) for y = ±1: {@link LogisticLoss}. */
    public static Loss logistic() {
        return LogisticLoss.INSTANCE;
    }

    /** max(0, 1 − s z) with s = ±1 the label sign: {@link HingeLoss}. */
    public static Loss hinge() {
        return HingeLoss.INSTANCE;
    }

    /** max(0, 1 − s z)² with s = ±1 the label sign: {@link SquaredHingeLoss}. */
    public static Loss squaredHinge() {
        return SquaredHingeLoss.INSTANCE;
    }

    /**
     * The hinge loss with its kink smoothed over a margin interval of width γ: {@link SmoothedHingeLoss}.
     *
     * @param gamma the smoothing width γ, in margin units; finite and &gt; 0 (smoothness 1/γ)
     * @throws IllegalArgumentException naming gamma if it is not finite and &gt; 0
     */
    public static Loss smoothedHinge(double gamma) {
        return new SmoothedHingeLoss(Arguments.positive("gamma", gamma));
    }

    /** log Σ<sub>k</sub> e<sup>z<sub>k</sub></sup> − z<sub>y</sub>: {@link SoftmaxCrossEntropyLoss}. */
    public static MulticlassLoss softmax() {
        return SoftmaxCrossEntropyLoss.INSTANCE;
    }

    /** max(0, 1 + max<sub>k≠y</sub> z<sub>k</sub> − z<sub>y</sub>) (Crammer &amp; Singer 2001): {@link MulticlassHingeLoss}. */
    public static MulticlassLoss multiclassHinge() {
        return MulticlassHingeLoss.INSTANCE;
    }
}
