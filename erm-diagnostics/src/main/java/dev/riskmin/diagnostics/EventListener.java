package dev.riskmin.diagnostics;

/**
 * Receives diagnostic events on the fitting thread. A listener that throws is detached for the rest
 * of the fit and reported once; the fit goes on.
 */
@FunctionalInterface
public interface EventListener {
    void onEvent(DiagnosticEvent event);
}
