package dev.riskmin.diagnostics.report;

import dev.riskmin.Fit;
import dev.riskmin.hook.RunInfo;
import dev.riskmin.util.Arguments;

import java.util.ArrayList;
import java.util.List;
import java.util.Map;

/**
 * The facts of a run shown at the head of an {@link HtmlReport}: named values in a fixed order, such
 * as the loss, the penalty, the update rule, the sampling, n, p and the seed. Immutable; every
 * {@code with…} method returns new facts. No fact that varies from run to run of the same seed (wall
 * time, dates) is added by this class, so that a report stays reproducible; add one with
 * {@link #with(String, String)} if wanted.
 */
public final class RunFacts {
    private static final RunFacts NONE = new RunFacts(List.of());

    private final List<Map.Entry<String, String>> entries;

    private RunFacts(List<Map.Entry<String, String>> entries) {
        this.entries = List.copyOf(entries);
    }

    /** No facts. */
    public static RunFacts none() {
        return NONE;
    }

    /**
     * The configuration a fit announced when it started: n, p, the loss, penalty, update rule, step
     * schedule and sampling (with or without replacement), the starting batch size, the planned steps,
     * the seed, and whether the rule is variance-reduced and held-out data were given.
     */
    public static RunFacts of(RunInfo run) {
        Arguments.notNull("run", run);
        List<Map.Entry<String, String>> e = new ArrayList<>();
        e.add(Map.entry("samples n", Long.toString(run.sampleCount())));
        e.add(Map.entry("parameters p", Long.toString(run.dimension())));
        e.add(Map.entry("loss", String.valueOf(run.loss())));
        e.add(Map.entry("penalty", String.valueOf(run.penalty())));
        e.add(Map.entry("update rule", run.updateRule() + (run.varianceReduced() ? " (variance-reduced)" : "")));
        e.add(Map.entry("step schedule", String.valueOf(run.schedule())));
        String sampling = String.valueOf(run.sampling());
        if (!sampling.contains("replacement")) {
            sampling += run.withReplacement() ? " (with replacement)" : " (without replacement)";
        }
        e.add(Map.entry("sampling", sampling));
        e.add(Map.entry("batch size B at the start", Long.toString(run.batchSize())));
        if (run.plannedSteps() >= 0) {
            e.add(Map.entry("planned steps", Long.toString(run.plannedSteps())));
        }
        e.add(Map.entry("seed", Long.toString(run.seed())));
        e.add(Map.entry("held-out data", run.heldOut() ? "yes" : "no"));
        return new RunFacts(e);
    }

    /**
     * These facts and the outcome of the fit: why it stopped, steps, epochs, the gradient evaluations
     * of the fit and of the diagnostics' probes, the objective at the start (estimate) and at the end,
     * the step-size factor the listeners asked for (when not 1), and the final batch size. The wall
     * time is left out (it differs between runs of the same seed).
     */
    public RunFacts withFit(Fit fit) {
        Arguments.notNull("fit", fit);
        List<Map.Entry<String, String>> e = new ArrayList<>(entries);
        String detail = fit.stopDetail();
        e.add(Map.entry("stop reason", fit.stopReason() + (detail == null || detail.isEmpty() ? "" : ": " + detail)));
        e.add(Map.entry("steps", Long.toString(fit.steps())));
        e.add(Map.entry("epochs", Markup.readable(fit.epochs())));
        e.add(Map.entry("gradient evaluations (fit)", Long.toString(fit.gradientEvaluations())));
        e.add(Map.entry("gradient evaluations (diagnostics)", Long.toString(fit.probeEvaluations())));
        e.add(Map.entry("objective at the start (estimate)", Markup.readable(fit.initialObjective())));
        e.add(Map.entry("objective at the end", Markup.readable(fit.finalObjective())
                + (fit.averaged() ? " (averaged parameters)" : "")));
        if (fit.stepSizeFactor() != 1) {
            e.add(Map.entry("step-size factor asked by listeners", Markup.readable(fit.stepSizeFactor())));
        }
        e.add(Map.entry("batch size B at the end", Long.toString(fit.finalBatchSize())));
        return new RunFacts(e);
    }

    /**
     * @return these facts with one more, or with the value of an existing fact of that name replaced
     * (in place)
     */
    public RunFacts with(String name, String value) {
        Arguments.notNull("name", name);
        Arguments.notNull("value", value);
        List<Map.Entry<String, String>> e = new ArrayList<>(entries);
        for (int i = 0; i < e.size(); i++) {
            if (e.get(i).getKey().equals(name)) {
                e.set(i, Map.entry(name, value));
                return new RunFacts(e);
            }
        }
        e.add(Map.entry(name, value));
        return new RunFacts(e);
    }

    /** @return the facts in their order (read only) */
    public List<Map.Entry<String, String>> entries() {
        return entries;
    }

    @Override
    public String toString() {
        return "RunFacts" + entries;
    }
}
