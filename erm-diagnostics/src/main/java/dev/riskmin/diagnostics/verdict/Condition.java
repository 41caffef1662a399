package dev.riskmin.diagnostics.verdict;

/** The state a verdict finds a run in. */
public enum Condition {
    /** The run reached a stationary point to within its noise: the objective no longer falls and the gradient is small. */
    CONVERGED,
    /** The objective was still falling when the fit stopped: more budget would help. */
    STILL_DESCENDING,
    /** Gradient noise dominates the signal: the batch is too small for the step size. */
    NOISE_DOMINATED,
    /** The step is too large: the loss oscillates and many steps go uphill. */
    STEP_TOO_LARGE,
    /** The loss or the parameters blew up. */
    DIVERGED,
    /** Too little was measured to judge (no objective trend, no gradient norm): measure before trusting the fit. */
    UNDETERMINED
}
