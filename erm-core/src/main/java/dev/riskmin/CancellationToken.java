package dev.riskmin;

/**
 * Lets another thread stop a fit: the fit checks {@link #cancelled()} before every step and stops
 * with {@link StopReason#CANCELLED}, keeping its parameters. Thread-safe; one token may serve
 * several fits.
 */
public final class CancellationToken {
    private volatile boolean cancelled;

    /** Asks every fit watching this token to stop at its next step. */
    public void cancel() {
        cancelled = true;
    }

    /** @return whether {@link #cancel()} was called */
    public boolean cancelled() {
        return cancelled;
    }
}
