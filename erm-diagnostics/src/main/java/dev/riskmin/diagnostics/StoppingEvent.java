package dev.riskmin.diagnostics;

/**
 * One evaluation of a stopping test: its statistic, the threshold it was compared with, and what
 * it decided.
 *
 * @param test      the test's name
 * @param statistic the test statistic
 * @param threshold the value the statistic was compared with
 * @param decision  what the test decided (and asked the fit to do)
 * @param detail    the comparison in words, with figures
 */
public record StoppingEvent(long step, int epoch, String test, double statistic, double threshold, Decision decision,
                            String detail) implements DiagnosticEvent {
    @Override
    public EventKind kind() {
        return EventKind.STOPPING;
    }
}
