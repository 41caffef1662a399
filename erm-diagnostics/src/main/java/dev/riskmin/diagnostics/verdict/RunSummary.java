package dev.riskmin.diagnostics.verdict;

import dev.riskmin.StopReason;

/**
 * The figures of a run from which a {@link HealthVerdict} is formed: filled by the diagnostics
 * host as events arrive (or by hand, to judge a run recorded elsewhere). Not thread-safe.
 * Every figure is NaN (or 0 for counts) until measured.
 */
public final class RunSummary {
    /** Why the fit stopped; null while it runs. */
    public StopReason stopReason;
    /** The stop reason's detail. */
    public String stopDetail = "";
    /** Steps taken so far. */
    public long steps;
    /** Epochs (draws / n) so far. */
    public double epochs;
    /** n. */
    public int sampleCount;
    /** The batch size at the end. */
    public int batchSize;
    /** The step size at the last step. */
    public double stepSize = Double.NaN;
    /** Whether batches were drawn with replacement (i.i.d.). */
    public boolean independentDraws;
    /** L<sub>max</sub> = max<sub>i</sub> L<sub>i</sub> + λ<sub>2</sub> from the run's facts (NaN when unknown, +∞ when none exists). */
    public double largestSmoothness = Double.NaN;
    /** Whether the update rule is variance-reduced (SVRG, SAGA), so gradient noise sets no accuracy floor. */
    public boolean varianceReduced;

    /** The objective at the start (estimate), and the latest full objective measured. */
    public double initialObjective = Double.NaN;
    public double latestObjective = Double.NaN;
    /** The best full objective measured, and the one measured before the latest (for the trend). */
    public double bestObjective = Double.NaN;
    public double previousObjective = Double.NaN;
    /** Relative decrease of the objective over the last measurement window: (previous − latest)/|previous|. */
    public double recentRelativeDecrease = Double.NaN;
    /**
     * The standard error of {@link #recentRelativeDecrease} (same units), when the monitor that measures
     * the trend can estimate it (e.g. from the residuals of a line fitted to the window's objectives);
     * NaN otherwise. With it, a decrease counts as real only when it exceeds twice its error.
     */
    public double recentDecreaseError = Double.NaN;
    /** The latest full-gradient norm and the one at the start. */
    public double gradientNorm = Double.NaN;
    public double initialGradientNorm = Double.NaN;

    /** The latest smoothed noise figures: tr Σ, ‖G‖², B_simple, and the variance of the batch mean. */
    public double traceCovariance = Double.NaN;
    public double gradientNormSquared = Double.NaN;
    public double noiseScale = Double.NaN;
    public double batchMeanVariance = Double.NaN;

    /** Descent-angle figures: the running mean cosine and the share of descent directions. */
    public double meanCosine = Double.NaN;
    public double descentShare = Double.NaN;
    /** The number of angle probes behind those figures. */
    public long angleProbes;

    /**
     * The mean cosine between successive batch gradients, cos(g<sub>B,t−1</sub>, g<sub>B,t</sub>), over the
     * recent steps, if tracked. Strongly negative values mean the steps overshoot: see {@link VerdictRules}.
     */
    public double successiveCosine = Double.NaN;

    /** The share of steps whose batch loss rose above the previous smoothed loss by more than its noise, if tracked. */
    public double ascentShare = Double.NaN;
    /** The coefficient of variation of recent batch losses (standard deviation over mean), if tracked. */
    public double lossOscillation = Double.NaN;

    /** The number of step-size cuts and batch-size increases the stopping tests asked for. */
    public int stepCuts;
    public int batchIncreases;
    /** The name of the stopping test that stopped the run, if one did. */
    public String stoppedBy;
    /** The best held-out loss a held-out test measured (at an epoch end), if one ran. */
    public double bestHeldOutLoss = Double.NaN;
}
