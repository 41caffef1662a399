package dev.riskmin.hook;

import dev.riskmin.Fit;

/**
 * Receives the events of one fit, on the fitting thread. Every method defaults to doing nothing.
 *
 * <p>A listener that throws — any {@link Exception}, checked ones included, or an {@link AssertionError} —
 * is detached for the rest of the fit and the failure is recorded on the {@link Fit} (and logged once
 * at WARN); the fit itself goes on. Other errors ({@link OutOfMemoryError}, {@link StackOverflowError})
 * end the fit and reach the caller. A listener that must not slow the
 * fit should do its work at a cadence ({@link StepView#step()} modulo k) and must not allocate in
 * {@link #step}.
 */
public interface FitListener {

    /** Called once before the first step. */
    default void started(RunInfo run) {
    }

    /**
     * Called at every step after the batch gradient g<sub>B</sub> at the current parameters h<sub>t</sub>
     * is known and before the parameters move. A halt requested here stops the fit with h<sub>t</sub>.
     */
    default void step(StepView view, FitControl control) {
    }

    /** Called when a pass of n draws completes, after that epoch's last update. */
    default void epochEnded(StepView view, FitControl control) {
    }

    /** Called once with the finished fit. */
    default void finished(Fit fit) {
    }
}
