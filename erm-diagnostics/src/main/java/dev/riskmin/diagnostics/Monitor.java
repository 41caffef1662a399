package dev.riskmin.diagnostics;

import dev.riskmin.Fit;
import dev.riskmin.hook.RunInfo;

/**
 * A component hosted by {@link Diagnostics}: an estimator or a stopping test. It sees the fit
 * through a {@link StepContext} that shares costly measurements between monitors (a full gradient
 * is computed at most once per step, however many monitors ask), and publishes its findings as
 * {@link DiagnosticEvent}s. Every method defaults to doing nothing; one instance serves one fit.
 */
public interface Monitor {

    /** Called once before the first step. */
    default void started(RunInfo run, StepContext context) {
    }

    /** Called at every step, before the parameters move. Must be cheap unless its cadence says otherwise. */
    default void step(StepContext context) {
    }

    /** Called at the end of every epoch, after its last update. */
    default void epochEnded(StepContext context) {
    }

    /** Called once with the finished fit. */
    default void finished(Fit fit, StepContext context) {
    }

    /** @return a short name for reports and failure messages */
    String name();
}
