package dev.riskmin.diagnostics;

import dev.riskmin.diagnostics.verdict.HealthVerdict;

/** The health verdict, published when a fit ends (and whenever one is asked for). */
public record VerdictEvent(long step, int epoch, HealthVerdict verdict) implements DiagnosticEvent {
    @Override
    public EventKind kind() {
        return EventKind.VERDICT;
    }
}
