package dev.riskmin.diagnostics;

/**
 * Something the diagnostics measured or decided at one step of a fit. Events are immutable records,
 * published to subscribers on the fitting thread at each monitor's cadence.
 */
public sealed interface DiagnosticEvent permits NoiseEvent, AngleEvent, LossEvent, StoppingEvent, VerdictEvent {

    /** @return the step t at which the event was measured */
    long step();

    /** @return the epoch of that step */
    int epoch();

    EventKind kind();
}
