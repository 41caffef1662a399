package dev.riskmin;

/** Why a fit stopped. Budgets and faults are set by the fit loop; the rest are listeners' answers. */
public enum StopReason {
    /** The step budget was spent. */
    STEP_BUDGET,
    /** The epoch budget was spent. */
    EPOCH_BUDGET,
    /** The gradient-evaluation budget was spent. */
    EVALUATION_BUDGET,
    /** The wall-time budget was spent. */
    TIME_BUDGET,
    /** The caller's {@link CancellationToken} was cancelled. */
    CANCELLED,
    /** The fitting thread was interrupted (its interrupt flag is left set). */
    INTERRUPTED,
    /**
     * The loss or the parameters became non-finite or exploded (the last finite parameters were kept),
     * or the fit ended with an objective far above its start (see the detail).
     */
    DIVERGED,
    /** A stopping test judged the run converged. */
    CONVERGED,
    /** A stopping test saw no progress over its window. */
    NO_PROGRESS,
    /** A stopping test saw the held-out loss worsen (best parameters restored). */
    HELD_OUT_WORSENING,
    /** A listener halted the fit for another reason (see the detail). */
    HALTED
}
