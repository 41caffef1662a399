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
 * Stops the fit with {@link StopReason#CONVERGED} when the full gradient is small:
 * ‖∇L(h<sub>t</sub>)‖ ≤ τ (absolute), or ‖∇L(h<sub>t</sub>)‖ ≤ τ ‖∇L(h<sub>0</sub>)‖ (relative to the
 * gradient at the first step) — the first-order optimality measure of smooth optimization (e.g.
 * Nocedal &amp; Wright, <i>Numerical Optimization</i>, 2nd ed., Springer 2006, §2.1 and the stopping
 * tests of its algorithms; section from memory). For a non-smooth penalty (L1) the smooth gradient
 * need not vanish at the optimum and the test does not apply.
 *
 * <p>It evaluates at the first step (which also fixes the reference norm ‖∇L(h<sub>0</sub>)‖) and then
 * at its cadence: at the end of every k-th epoch (default k = 1) or every k-th step, publishing a
 * {@link dev.riskmin.diagnostics.StoppingEvent} each time (statistic ‖∇L‖, threshold τ or
 * τ‖∇L(h<sub>0</sub>)‖) and recording the norms in the {@link RunSummary}.
 *
 * <p>Cost: the norm comes from the host's reference gradient, the exact full gradient when n is at
 * most the host's full-gradient limit: n gradient evaluations per evaluation (shared with every other
 * monitor that asks at the same point). Once per epoch this doubles the fit's gradient evaluations;
 * {@link #everyEpochs(int)} with k &gt; 1 divides that by k.
 *
 * <p>When the reference gradient is not exact (n above the host's limit) the test refuses by
 * default: its first evaluation throws {@link IllegalStateException} naming the option to change (the
 * host detaches it and reports why). With {@link #estimatedBeyondLimit(int)} it estimates instead
 * ‖G‖² ≈ ⟨G<sub>R</sub>, G<sub>m</sub>⟩, the inner product of the host's reference gradient (the mean
 * gradient of an independent batch of R samples) and the mean gradient of a second independent batch
 * of m samples (m more gradient evaluations). Two independent unbiased estimates of G give an unbiased
 * estimate of ‖G‖² (derived); equivalently, it is the large-batch ‖(G<sub>R</sub> + G<sub>m</sub>)/2‖²
 * corrected by its noise term, estimated from the difference of the halves. Its standard deviation is
 * at most about ‖G‖ √(tr Σ (1/R + 1/m)) + √(tr Σ²/(R m)), so a tolerance below about (tr Σ²/(R m))<sup>1/4</sup>
 * can be met by noise alone and the test may then stop early. A negative estimate counts as ‖G‖ = 0.
 */
public final class GradientNormCriterion implements Monitor {
    /** The default relative tolerance (this library's choice, common practice, no source). */
    public static final double DEFAULT_RELATIVE_TOLERANCE = 1e-3;

    private final double tolerance;
    private final boolean relative;
    private final int epochCadence;     // > 0: every k epochs; 0: step cadence
    private final long stepCadence;     // > 0: every k steps
    private final int estimateBatch;    // 0: refuse when not exact

    private double[] second = new double[0];
    private double initialNorm;
    private int epochsSeen;
    private boolean measuredStart;

    private GradientNormCriterion(double tolerance, boolean relative, int epochCadence, long stepCadence,
                                  int estimateBatch) {
        this.tolerance = tolerance;
        this.relative = relative;
        this.epochCadence = epochCadence;
        this.stepCadence = stepCadence;
        this.estimateBatch = estimateBatch;
    }

    /**
     * Relative tolerance {@value #DEFAULT_RELATIVE_TOLERANCE}, once per epoch, refusing an inexact
     * reference gradient.
     */
    public static GradientNormCriterion defaults() {
        return relative(DEFAULT_RELATIVE_TOLERANCE);
    }

    /**
     * Stops when ‖∇L‖ ≤ tolerance.
     *
     * @throws IllegalArgumentException if tolerance is not finite and &gt; 0
     */
    public static GradientNormCriterion absolute(double tolerance) {
        Arguments.positive("tolerance", tolerance);
        return new GradientNormCriterion(tolerance, false, 1, 0, 0);
    }

    /**
     * Stops when ‖∇L(h<sub>t</sub>)‖ ≤ tolerance × ‖∇L(h<sub>0</sub>)‖.
     *
     * @throws IllegalArgumentException if relativeTolerance is not in (0, 1)
     */
    public static GradientNormCriterion relative(double relativeTolerance) {
        Arguments.inOpenRange("relativeTolerance", relativeTolerance, 0.0, 1.0);
        return new GradientNormCriterion(relativeTolerance, true, 1, 0, 0);
    }

    /**
     * @return this test evaluating at the end of every k-th epoch
     * @throws IllegalArgumentException if k &lt; 1
     */
    public GradientNormCriterion everyEpochs(int k) {
        Arguments.positive("epochCadence", k);
        return new GradientNormCriterion(tolerance, relative, k, 0, estimateBatch);
    }

    /**
     * @return this test evaluating at every k-th step (before the step's update) instead of at epoch ends
     * @throws IllegalArgumentException if k &lt; 1
     */
    public GradientNormCriterion everySteps(long k) {
        Arguments.positive("stepCadence", k);
        return new GradientNormCriterion(tolerance, relative, 0, k, estimateBatch);
    }

    /**
     * @param size m, the size of the second independent batch of the estimate used when the reference
     *             gradient is not exact (see the class documentation)
     * @return this test estimating ‖G‖ instead of refusing when the reference gradient is not exact
     * @throws IllegalArgumentException if size &lt; 1
     */
    public GradientNormCriterion estimatedBeyondLimit(int size) {
        Arguments.positive("estimateBatch", size);
        return new GradientNormCriterion(tolerance, relative, epochCadence, stepCadence, size);
    }

    @Override
    public String name() {
        return "gradient-norm";
    }

    @Override
    public void started(RunInfo run, StepContext context) {
        second = new double[run.dimension()];
        initialNorm = Double.NaN;
        epochsSeen = 0;
        measuredStart = false;
    }

    @Override
    public void step(StepContext context) {
        long t = context.view().step();
        if (!measuredStart || (stepCadence > 0 && t % stepCadence == 0)) {
            measuredStart = true;
            evaluate(context);
        }
    }

    @Override
    public void epochEnded(StepContext context) {
        if (epochCadence > 0 && ++epochsSeen % epochCadence == 0) {
            evaluate(context);
        }
    }

    private void evaluate(StepContext context) {
        StepView view = context.view();
        double norm = norm(context, view);
        if (Double.isNaN(initialNorm)) {
            initialNorm = norm;
        }
        RunSummary summary = context.summary();
        summary.gradientNorm = norm;
        if (Double.isNaN(summary.initialGradientNorm)) {
            summary.initialGradientNorm = initialNorm;
        }
        double threshold = relative ? tolerance * initialNorm : tolerance;
        boolean converged = norm <= threshold;
        String detail = Stops.fmt("gradient norm %.4g %s %s %.4g%s", norm, converged ? "<=" : ">",
                relative ? "relative threshold" : "threshold", threshold,
                relative ? Stops.fmt(" (%.3g x initial %.4g)", tolerance, initialNorm) : "");
        if (converged) {
            Stops.publish(context, name(), norm, threshold, Decision.STOP, detail);
            Stops.halt(context, name(), StopReason.CONVERGED, detail);
        } else {
            Stops.publish(context, name(), norm, threshold, Decision.CONTINUE, detail);
        }
    }

    private double norm(StepContext context, StepView view) {
        double[] g = context.referenceGradient();
        int p = view.dimension();
        if (context.referenceIsExact()) {
            return Math.sqrt(Stops.dot(g, g, p));
        }
        if (estimateBatch == 0) {
            throw new IllegalStateException("gradient-norm test: the reference gradient is not exact (n = "
                    + view.sampleCount() + " exceeds the host's fullGradientLimit); raise "
                    + "Diagnostics.Builder.fullGradientLimit or allow an estimate with estimatedBeyondLimit(size)");
        }
        view.probe().independentBatchGradient(estimateBatch, second);
        return Math.sqrt(Math.max(0.0, Stops.dot(g, second, p)));
    }

    @Override
    public String toString() {
        return "GradientNormCriterion[" + (relative ? "relative " : "absolute ") + tolerance + ", "
                + (stepCadence > 0 ? "every " + stepCadence + " steps" : "every " + epochCadence + " epochs")
                + (estimateBatch > 0 ? ", estimated beyond the limit with m = " + estimateBatch : "") + "]";
    }
}
