package dev.riskmin.diagnostics;

/** What a stopping test decided at one evaluation. */
public enum Decision {
    /** Keep going. */
    CONTINUE,
    /** Stop the fit. */
    STOP,
    /** Stop the fit and return the best parameters seen (held-out worsening). */
    STOP_AND_RESTORE,
    /** Cut the step size (and go on). */
    CUT_STEP,
    /** Grow the batch (and go on). */
    GROW_BATCH
}
