package dev.riskmin.diagnostics.reliability;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.StopReason;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.diagnostics.EventKind;
import dev.riskmin.diagnostics.VerdictEvent;
import dev.riskmin.diagnostics.sink.TraceRecorder;
import dev.riskmin.diagnostics.verdict.Condition;
import dev.riskmin.diagnostics.verdict.HealthVerdict;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.reliability.EveryLoss;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.Arguments;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.ArrayList;
import java.util.List;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * With an absurd step size on every loss and every update rule, the diagnostics' verdict — the one
 * read from the host and the one published as an event — says DIVERGED, and its advice names a
 * smaller step size: 1/L<sub>max</sub> when the loss has a smoothness constant and that is below a tenth
 * of the last step, else a tenth of the last step (the figure {@code suggestedStepSize}). The fits'
 * own stop reasons are checked in {@code DivergenceOnEveryLossAndRuleTest}.
 */
class DivergenceVerdictTest {

    static List<Arguments> grid() {
        List<Arguments> out = new ArrayList<>();
        for (double step : new double[] {1e3, 1e300}) {
            for (EveryLoss.Case c : EveryLoss.cases(3)) {
                for (UpdateRule rule : EveryLoss.rules()) {
                    out.add(Arguments.of(c, rule, step));
                }
            }
        }
        return out;
    }

    @ParameterizedTest(name = "{0}, {1}, step {2}")
    @MethodSource("grid")
    void verdictSaysDivergedAndSuggestsASmallerStep(EveryLoss.Case c, UpdateRule rule, double step) {
        TraceRecorder recorder = TraceRecorder.unbounded();
        Diagnostics diagnostics = Monitors.standardWith(recorder);
        Fit fit = c.builder().updateRule(rule).stepSize(step).epochs(20).seed(1).build()
                .fit(c.data(), FitOptions.listeners(diagnostics));
        assertEquals(StopReason.DIVERGED, fit.stopReason(), fit.toString());

        HealthVerdict verdict = diagnostics.verdict();
        assertEquals(Condition.DIVERGED, verdict.condition(), verdict.toString());
        assertTrue(verdict.summary().contains("diverged"), verdict.summary());
        double seen = verdict.figures().get("stepSize");
        double suggested = verdict.figures().get("suggestedStepSize");
        assertEquals(step, seen, 0.0, "the step size the verdict saw");
        double lMax = diagnostics.run().largestSmoothness();
        double safe = lMax > 0 && Double.isFinite(lMax) ? 1 / lMax : Double.NaN;
        // A tenth of the step, or 1/L_max when the loss has a smoothness constant and that is smaller.
        assertEquals(Double.isFinite(safe) && safe < seen / 10 ? safe : seen / 10, suggested, 0.0);
        assertTrue(suggested < seen, "a smaller step");
        assertTrue(verdict.advice().startsWith("cut the step size") && verdict.advice().contains("about"),
                verdict.advice());
        List<?> events = recorder.events(EventKind.VERDICT);
        assertEquals(1, events.size());
        assertEquals(verdict, ((VerdictEvent) events.get(0)).verdict());
        assertTrue(diagnostics.failures().isEmpty(), diagnostics.failures().toString());
    }
}
