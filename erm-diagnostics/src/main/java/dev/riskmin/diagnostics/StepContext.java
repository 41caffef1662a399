package dev.riskmin.diagnostics;

import dev.riskmin.diagnostics.verdict.RunSummary;
import dev.riskmin.hook.FitControl;
import dev.riskmin.hook.RunInfo;
import dev.riskmin.hook.StepView;

/**
 * What a {@link Monitor} sees at one step: the fit's view and control, the run's facts, a summary it
 * may update for the verdict, and measurements computed on demand and cached for the step, so that
 * monitors sharing a cadence pay once. Valid only during the call that received it.
 */
public interface StepContext {

    /** @return the fit's view at this step */
    StepView view();

    /** @return the fit's control (halt, scale the step, change the batch, restore parameters) */
    FitControl control();

    /** @return the run's facts */
    RunInfo run();

    /** @return the run summary the verdict is formed from (monitors update their own figures) */
    RunSummary summary();

    /** Publishes an event to the subscribers whose filters accept it. */
    void publish(DiagnosticEvent event);

    /**
     * @return the reference gradient G at h<sub>t</sub> (read only, length p): the full gradient when
     * n is at most the host's full-gradient limit, else the mean gradient of an independent batch of
     * the host's reference size; computed at most once per step
     */
    double[] referenceGradient();

    /** @return whether {@link #referenceGradient()} is the exact full gradient */
    boolean referenceIsExact();

    /** @return L(h<sub>t</sub>) when {@link #referenceGradient()} is exact (computed with it), else NaN */
    double referenceObjective();

    /**
     * @return the per-sample gradients ∇f<sub>i</sub>(h<sub>t</sub>) of the current batch, row-major B × p
     * (read only), unscaled; computed at most once per step
     */
    double[] sampleGradients();

    /** @return the number of rows in {@link #sampleGradients()} (B) */
    int sampleGradientCount();

    /** @return the held-out loss at h<sub>t</sub> (cached for the step), or NaN without held-out data */
    double heldOutLoss();
}
