package dev.riskmin.diagnostics.stopping;

import dev.riskmin.StopReason;
import dev.riskmin.diagnostics.Decision;
import dev.riskmin.diagnostics.Monitor;
import dev.riskmin.diagnostics.StepContext;
import dev.riskmin.diagnostics.verdict.RunSummary;
import dev.riskmin.hook.RunInfo;
import dev.riskmin.hook.StepView;
import dev.riskmin.util.Arguments;

/**
 * Stops the fit when the loss on held-out data has not improved for a number of epochs, and returns
 * the parameters at which it was best — early stopping on a validation set (Prechelt, "Early
 * stopping — but when?", in <i>Neural Networks: Tricks of the Trade</i>, LNCS 1524, Springer 1998;
 * volume from memory; waiting a fixed number of epochs for a new best is common practice, no
 * source). At the end of every epoch it measures the held-out loss
 * H<sub>e</sub> (the mean weighted data loss, without the penalty; m loss evaluations). An epoch
 * improves when H<sub>e</sub> &lt; H<sub>best</sub> − τ |H<sub>best</sub>|; then H<sub>best</sub> and the
 * parameters are kept (copied into a buffer allocated once per fit). After P consecutive epochs
 * without improvement it hands the kept parameters to
 * {@link dev.riskmin.hook.FitControl#restoreParameters} and halts with
 * {@link StopReason#HELD_OUT_WORSENING} (decision {@link Decision#STOP_AND_RESTORE}). The starting
 * parameters are not candidates. The restored parameters replace averaging.
 *
 * <p>Each epoch publishes an event: statistic H<sub>e</sub>, threshold H<sub>best</sub> − τ|H<sub>best</sub>|
 * (the value to beat; +∞ before the first measurement).
 *
 * <p>The fit must be given held-out data ({@code FitOptions.heldOut}); without it the test refuses
 * when the fit starts with an {@link IllegalStateException} (the host detaches it and reports why).
 */
public final class HeldOutWorseningCriterion implements Monitor {
    /** The default number of epochs without a new best before the fit stops (this library's choice). */
    public static final int DEFAULT_EPOCHS_WITHOUT_IMPROVEMENT = 5;
    /** The default relative improvement that counts (this library's choice). */
    public static final double DEFAULT_TOLERANCE = 1e-4;

    private final int allowedEpochs;
    private final double tolerance;

    private double[] best = new double[0];
    private double bestLoss;
    private int bestEpoch;
    private int sinceBest;

    private HeldOutWorseningCriterion(int allowedEpochs, double tolerance) {
        this.allowedEpochs = allowedEpochs;
        this.tolerance = tolerance;
    }

    /**
     * Stops after {@value #DEFAULT_EPOCHS_WITHOUT_IMPROVEMENT} epochs without a new best; relative tolerance
     * {@value #DEFAULT_TOLERANCE}.
     */
    public static HeldOutWorseningCriterion defaults() {
        return new HeldOutWorseningCriterion(DEFAULT_EPOCHS_WITHOUT_IMPROVEMENT, DEFAULT_TOLERANCE);
    }

    /**
     * @param epochsWithoutImprovement P ≥ 1, the consecutive epochs without a new best before the fit stops
     * @param relativeTolerance        τ ≥ 0, the relative improvement that counts as a new best
     * @throws IllegalArgumentException naming the option if epochsWithoutImprovement &lt; 1 or
     *                                  relativeTolerance is not finite and ≥ 0
     */
    public static HeldOutWorseningCriterion of(int epochsWithoutImprovement, double relativeTolerance) {
        Arguments.positive("epochsWithoutImprovement", epochsWithoutImprovement);
        Arguments.nonNegative("relativeTolerance", relativeTolerance);
        return new HeldOutWorseningCriterion(epochsWithoutImprovement, relativeTolerance);
    }

    @Override
    public String name() {
        return "held-out-worsening";
    }

    @Override
    public void started(RunInfo run, StepContext context) {
        if (!run.heldOut()) {
            throw new IllegalStateException("held-out worsening test: the fit has no held-out data; pass it"
                    + " with FitOptions.heldOut (FitOptions.builder().heldOut(data))");
        }
        best = new double[run.dimension()];
        bestLoss = Double.NaN;
        bestEpoch = -1;
        sinceBest = 0;
    }

    @Override
    public void epochEnded(StepContext context) {
        StepView view = context.view();
        double loss = context.heldOutLoss();
        double threshold = Double.isNaN(bestLoss) ? Double.POSITIVE_INFINITY
                : bestLoss - tolerance * Math.abs(bestLoss);
        RunSummary summary = context.summary();
        if (loss < threshold) {
            bestLoss = loss;
            bestEpoch = view.epoch();
            sinceBest = 0;
            view.copyParameters(best);
            summary.bestHeldOutLoss = loss;
            Stops.publish(context, name(), loss, threshold, Decision.CONTINUE,
                    Stops.fmt("held-out loss %.6g improves on %.6g: best so far (epoch %d)", loss, threshold, bestEpoch));
            return;
        }
        sinceBest++;
        if (sinceBest >= allowedEpochs && bestEpoch >= 0) {
            String detail = Stops.fmt("held-out loss %.6g has not beaten %.6g for %d epochs; restored the parameters"
                    + " of epoch %d (held-out loss %.6g)", loss, threshold, sinceBest, bestEpoch, bestLoss);
            Stops.publish(context, name(), loss, threshold, Decision.STOP_AND_RESTORE, detail);
            context.control().restoreParameters(best);
            Stops.halt(context, name(), StopReason.HELD_OUT_WORSENING, detail);
        } else {
            Stops.publish(context, name(), loss, threshold, Decision.CONTINUE,
                    Stops.fmt("held-out loss %.6g does not beat %.6g: %d of %d epochs without a new best", loss,
                            threshold, sinceBest, allowedEpochs));
        }
    }

    @Override
    public String toString() {
        return "HeldOutWorseningCriterion[stop after " + allowedEpochs + " epochs without a new best, tolerance " + tolerance + "]";
    }
}
