package dev.riskmin.diagnostics;

/** The kinds of diagnostic event, for filtering subscriptions. */
public enum EventKind {
    /** {@link NoiseEvent}: gradient-noise variance and noise scale. */
    NOISE,
    /** {@link AngleEvent}: descent-angle statistics. */
    ANGLE,
    /** {@link LossEvent}: batch loss, objective, held-out loss. */
    LOSS,
    /** {@link StoppingEvent}: a stopping test's statistic, threshold and decision. */
    STOPPING,
    /** {@link VerdictEvent}: the health verdict. */
    VERDICT
}
