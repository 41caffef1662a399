package dev.riskmin.diagnostics.stopping;

import dev.riskmin.StopReason;
import dev.riskmin.diagnostics.Decision;
import dev.riskmin.diagnostics.Monitor;
import dev.riskmin.diagnostics.StepContext;
import dev.riskmin.diagnostics.verdict.RunSummary;
import dev.riskmin.hook.RunInfo;
import dev.riskmin.util.Arguments;

/**
 * Stops the fit with {@link StopReason#NO_PROGRESS} when the full objective has stopped improving
 * over a window of W epochs. With L<sub>e</sub> the objective at the end of epoch e, after epoch
 * e ≥ W + 1 the statistic is the relative improvement
 * r = (L<sub>before</sub> − L<sub>window</sub>) / |L<sub>before</sub>|, where L<sub>window</sub> is the best
 * (smallest) of L<sub>e−W+1</sub>, …, L<sub>e</sub> and L<sub>before</sub> the best of all earlier ones; it
 * stops when r &lt; τ. This is the relative change test of value-based convergence checks (common
 * practice, no source), taken over the best of a window so that the noise of a single epoch neither
 * stops nor prolongs the fit. If L<sub>before</sub> = 0 the denominator is taken as 1.
 *
 * <p>The objective is exact: the host's reference objective when its reference gradient is exact
 * (computed with it, so it is shared with a gradient-norm test at the same epoch end), else
 * {@link dev.riskmin.hook.Probe#objective()} (the question costs the host's reference batch when n
 * is above its full-gradient limit). Either costs about n evaluations per evaluation, as
 * much as the epoch of n draws itself; {@link #everyEpochs(int)} with k &gt; 1 divides that by k.
 * An event is published at every evaluation (statistic r, NaN while the window fills; threshold τ).
 */
public final class StalledObjectiveCriterion implements Monitor {
    /** The default window, in evaluations (this library's choice). */
    public static final int DEFAULT_WINDOW = 5;
    /** The default relative tolerance (this library's choice, common practice, no source). */
    public static final double DEFAULT_TOLERANCE = 1e-4;

    private final int window;
    private final double tolerance;
    private final int epochCadence;

    private double[] recent = new double[0];
    private int count;
    private double bestBefore;
    private int epochsSeen;

    private StalledObjectiveCriterion(int window, double tolerance, int epochCadence) {
        this.window = window;
        this.tolerance = tolerance;
        this.epochCadence = epochCadence;
    }

    /** A window of {@value #DEFAULT_WINDOW} epochs, relative tolerance {@value #DEFAULT_TOLERANCE}, every epoch. */
    public static StalledObjectiveCriterion defaults() {
        return new StalledObjectiveCriterion(DEFAULT_WINDOW, DEFAULT_TOLERANCE, 1);
    }

    /**
     * @param windowEpochs      W ≥ 1, the number of latest evaluations whose best is compared with all earlier ones
     * @param relativeTolerance τ &gt; 0, the relative improvement that counts as progress
     * @throws IllegalArgumentException naming the option if windowEpochs &lt; 1 or relativeTolerance is not
     *                                  finite and &gt; 0
     */
    public static StalledObjectiveCriterion of(int windowEpochs, double relativeTolerance) {
        Arguments.positive("windowEpochs", windowEpochs);
        Arguments.positive("relativeTolerance", relativeTolerance);
        return new StalledObjectiveCriterion(windowEpochs, relativeTolerance, 1);
    }

    /**
     * @return this test evaluating at the end of every k-th epoch only (the window then counts evaluations,
     * W k epochs)
     * @throws IllegalArgumentException if k &lt; 1
     */
    public StalledObjectiveCriterion everyEpochs(int k) {
        Arguments.positive("epochCadence", k);
        return new StalledObjectiveCriterion(window, tolerance, k);
    }

    @Override
    public String name() {
        return "stalled-objective";
    }

    @Override
    public void started(RunInfo run, StepContext context) {
        recent = new double[window];
        count = 0;
        bestBefore = Double.POSITIVE_INFINITY;
        epochsSeen = 0;
    }

    @Override
    public void epochEnded(StepContext context) {
        if (++epochsSeen % epochCadence != 0) {
            return;
        }
        double objective = context.referenceIsExact() ? context.referenceObjective()
                : context.view().probe().objective();
        int slot = count % window;
        if (count >= window) {
            bestBefore = Math.min(bestBefore, recent[slot]); // the value leaving the window
        }
        recent[slot] = objective;
        count++;
        double bestWindow = Double.POSITIVE_INFINITY;
        for (int k = 0; k < Math.min(count, window); k++) {
            bestWindow = Math.min(bestWindow, recent[k]);
        }
        RunSummary summary = context.summary();
        summary.latestObjective = objective;
        summary.bestObjective = Double.isNaN(summary.bestObjective) ? objective
                : Math.min(summary.bestObjective, objective);
        if (count <= window) {
            Stops.publish(context, name(), Double.NaN, tolerance, Decision.CONTINUE,
                    Stops.fmt("objective %.6g; window filling (%d of %d evaluations)", objective, count, window + 1));
            return;
        }
        double scale = bestBefore == 0 ? 1.0 : Math.abs(bestBefore);
        double improvement = (bestBefore - bestWindow) / scale;
        boolean stalled = improvement < tolerance; // NaN (a non-finite objective) is left to the divergence guard
        String detail = Stops.fmt("objective %.6g; best of the last %d evaluations %.6g improves on the earlier best"
                + " %.6g by %.3g (relative) %s tolerance %.3g", objective, window, bestWindow, bestBefore, improvement,
                stalled ? "<" : ">=", tolerance);
        if (stalled) {
            Stops.publish(context, name(), improvement, tolerance, Decision.STOP, detail);
            Stops.halt(context, name(), StopReason.NO_PROGRESS, detail);
        } else {
            Stops.publish(context, name(), improvement, tolerance, Decision.CONTINUE, detail);
        }
    }

    @Override
    public String toString() {
        return "StalledObjectiveCriterion[window " + window + ", tolerance " + tolerance + ", every " + epochCadence
                + " epochs]";
    }
}
