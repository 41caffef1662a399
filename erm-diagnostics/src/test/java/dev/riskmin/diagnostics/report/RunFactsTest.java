package dev.riskmin.diagnostics.report;

import dev.riskmin.hook.RunInfo;
import org.junit.jupiter.api.Test;

import java.util.List;
import java.util.Map;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** The facts of a run, in their fixed order; a named fact is replaced in place. */
class RunFactsTest {

    @Test
    void runInfoGivesItsFactsInOrderAndWithReplacesInPlace() {
        RunInfo run = new RunInfo(2000, 9, 16, false, "logistic", "l2(0.01)", "sgd", "constant(0.1)", "uniform",
                3750, 7, false, true, Double.NaN);
        RunFacts facts = RunFacts.of(run);
        List<String> names = facts.entries().stream().map(Map.Entry::getKey).toList();
        assertEquals(List.of("samples n", "parameters p", "loss", "penalty", "update rule", "step schedule", "sampling",
                "batch size B at the start", "planned steps", "seed", "held-out data"), names);
        assertEquals("uniform (without replacement)", facts.entries().get(6).getValue());
        RunFacts renamed = facts.with("loss", "logistic (labels ±1)").with("machine", "test");
        assertEquals("logistic (labels ±1)", renamed.entries().get(2).getValue());
        assertEquals(Map.entry("machine", "test"), renamed.entries().get(renamed.entries().size() - 1));
        assertEquals("logistic", facts.entries().get(2).getValue(), "the original is unchanged");
        assertTrue(RunFacts.none().entries().isEmpty());
        assertThrows(NullPointerException.class, () -> facts.with("x", null));
    }
}
