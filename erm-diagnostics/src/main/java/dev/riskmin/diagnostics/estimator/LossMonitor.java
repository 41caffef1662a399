package dev.riskmin.diagnostics.estimator;

import dev.riskmin.Fit;
import dev.riskmin.diagnostics.LossEvent;
import dev.riskmin.diagnostics.Monitor;
import dev.riskmin.diagnostics.StepContext;
import dev.riskmin.diagnostics.verdict.RunSummary;
import dev.riskmin.hook.Probe;
import dev.riskmin.hook.RunInfo;
import dev.riskmin.hook.StepView;
import dev.riskmin.util.Arguments;

import java.util.Arrays;

/**
 * Loss traces of a running fit, published as {@link LossEvent}s: the smoothed batch loss at every
 * step, the exact objective and the gradient norm at a cadence, and the held-out loss at a cadence.
 *
 * <h2>Every step (O(1), allocation-free)</h2>
 * With ℓ<sub>t</sub> the batch loss ({@link StepView#batchLoss()}) and weight α (default
 * {@value #DEFAULT_SMOOTHING}, about 2/α − 1 = 39 steps), the exponentially weighted mean and
 * variance (Finch, "Incremental calculation of weighted mean and variance", 2009, from memory):
 * <pre>
 *   δ = ℓ_t − m;  m ← m + α δ;  v ← (1 − α)(v + α δ²)
 * </pre>
 * with m = ℓ<sub>0</sub>, v = 0 at the first step. The smoothed batch loss is m (after including
 * ℓ<sub>t</sub>).
 * <ul>
 * <li>Ascent steps: after a warm-up of ⌈1/α⌉ steps, step t counts as an ascent when
 * ℓ<sub>t</sub> &gt; m<sub>t−1</sub> + z √v<sub>t−1</sub>, its batch loss above the previous smoothed
 * loss by more than z (default {@value #DEFAULT_ALLOWANCE}) of the batch losses' recent standard
 * deviations. The allowance is the noise a batch loss shows even when nothing changes: for roughly
 * normal batch losses at a stationary point about 2.3 % of steps exceed it (more for the skewed
 * losses of small batches); a step too large for the curvature makes the loss jump up far more often.
 * {@link RunSummary#ascentShare} = ascents/steps counted. The allowance is this library's choice
 * (common practice, no source).</li>
 * <li>{@link RunSummary#lossOscillation} = √v/|m|, the coefficient of variation of recent batch
 * losses.</li>
 * </ul>
 *
 * <h2>At a cadence</h2>
 * <ul>
 * <li>The exact objective L(h<sub>t</sub>) and, when the reference gradient is exact, ‖∇L(h<sub>t</sub>)‖:
 * both from {@link StepContext#referenceGradient()} (n evaluations, shared with other monitors at
 * that step); once the reference is seen to be an independent batch (n above the host's limit),
 * from {@link Probe#objective()} (n loss evaluations) with no gradient norm. The summary's
 * {@link RunSummary#recentRelativeDecrease} = (L<sub>prev</sub> − L<sub>latest</sub>)/|L<sub>prev</sub>|,
 * with L<sub>prev</sub> the latest measurement at least an epoch (⌈n/B⌉ steps) older than the newest,
 * among the last {@value #HISTORY} measurements (their oldest when none is that old).</li>
 * <li>The held-out loss ({@link StepContext#heldOutLoss()}, m loss evaluations), when the fit has
 * held-out data.</li>
 * </ul>
 * Default cadences: budgets of {@value #DEFAULT_SHARE_PERCENT} % of the fit's gradient evaluations
 * each ({@link Cadence}). A full objective costs n, about an epoch of plain SGD, so at 1 % it comes
 * about once per 100 epochs: short fits see the exact objective only through the fit's own final
 * objective (below) unless a cadence such as {@code Cadence.every(k)} is set.
 *
 * <p>Unless two exact objectives were measured close together, the trend comes from paired losses
 * on a fixed subsample at the last two epoch ends, with its standard error (see {@code pairedTrend}),
 * so a short fit still gets a trend the verdict can weigh. The exact objective is always measured at the first step (the
 * baseline), when its cadence is active.
 *
 * <p>When the fit ends with its last iterate (no averaging, no restored parameters), the fit's
 * final objective ({@link Fit#finalObjective()}, computed by the fit anyway) is recorded as a last
 * measurement for the summary. Events are published at each measurement and every
 * {@code reportEvery} steps (default about 20 per epoch, ⌈n/B⌉/20 steps).
 *
 * <p>One instance serves one fit at a time; the {@code with…} methods return new monitors.
 */
public final class LossMonitor implements Monitor {
    /** The default EMA weight α of the batch loss. */
    public static final double DEFAULT_SMOOTHING = 0.05;
    /** The default noise allowance z, in standard deviations of the batch loss. */
    public static final double DEFAULT_ALLOWANCE = 2.0;
    /** The default budget of each measured figure, in percent of the fit's gradient evaluations. */
    public static final int DEFAULT_SHARE_PERCENT = 1;
    /** The number of objective measurements kept for the relative decrease. */
    public static final int HISTORY = 256;
    /** The smallest paired subsample. */
    public static final int MIN_SUBSAMPLE = 64;
    /** The paired subsample holds n / this many rows (at least {@link #MIN_SUBSAMPLE}). */
    public static final int SUBSAMPLE_DIVISOR = 50;
    /** Exact measurements at most this many windows apart give the recent trend. */
    public static final int RECENT_WINDOWS = 4;
    private static final int REPORTS_PER_EPOCH = 20;
    private static final int UNKNOWN = 0;
    private static final int EXACT = 1;
    private static final int INEXACT = 2;

    private final double smoothing;
    private final double allowance;
    private final Cadence objectiveCadence;
    private final Cadence heldOutCadence;
    private final long reportEvery;   // 0: about 20 per epoch

    // ---- per-fit state
    private Cadence.Pacer objectivePacer;
    private Cadence.Pacer heldOutPacer;
    private boolean heldOutAvailable;
    private int reference;
    private long report;
    private long window;
    private long warmUp;
    private long seen;
    private long counted;
    private long ascents;
    private double mean = Double.NaN;
    private double variance = Double.NaN;
    private int[] subsample = new int[0];
    private double[] previousLosses = new double[0];
    private double[] currentLosses = new double[0];
    private boolean havePrevious;
    private boolean subsampleAvailable;
    private long lastExactTrendStep = Long.MIN_VALUE;
    private long pairSpacing = 1;
    private long nextPair;
    private long nextReport;
    private double allowanceSquared;
    /** The summary's ascent share and oscillation are refreshed every 64 steps and at the end. */
    private static final long SUMMARY_EVERY_MASK = 63;
    private final long[] historyStep = new long[HISTORY];
    private final double[] historyValue = new double[HISTORY];
    private int historySize;
    private int historyNext;
    private double objective = Double.NaN;
    private double heldOut = Double.NaN;
    private double gradientNorm = Double.NaN;
    private long objectiveCount;
    private long heldOutCount;

    private LossMonitor(double smoothing, double allowance, Cadence objectiveCadence, Cadence heldOutCadence,
                        long reportEvery) {
        this.smoothing = smoothing;
        this.allowance = allowance;
        this.objectiveCadence = objectiveCadence;
        this.heldOutCadence = heldOutCadence;
        this.reportEvery = reportEvery;
    }

    /**
     * α = 0.05, z = 2, the objective and the held-out loss within 1 % of the fit's evaluations each,
     * about 20 events per epoch.
     */
    public static LossMonitor defaults() {
        Cadence budget = Cadence.share(DEFAULT_SHARE_PERCENT / 100.0);
        return new LossMonitor(DEFAULT_SMOOTHING, DEFAULT_ALLOWANCE, budget, budget, 0);
    }

    /** @return this monitor measuring the exact objective (and gradient norm) at the given cadence */
    public LossMonitor withObjectiveCadence(Cadence value) {
        Arguments.notNull("objectiveCadence", value);
        return new LossMonitor(smoothing, allowance, value, heldOutCadence, reportEvery);
    }

    /** @return this monitor measuring the held-out loss at the given cadence */
    public LossMonitor withHeldOutCadence(Cadence value) {
        Arguments.notNull("heldOutCadence", value);
        return new LossMonitor(smoothing, allowance, objectiveCadence, value, reportEvery);
    }

    /**
     * @param alpha the EMA weight of the batch loss, in (0, 1]
     * @throws IllegalArgumentException if alpha is outside (0, 1]
     */
    public LossMonitor withSmoothing(double alpha) {
        if (!(alpha > 0 && alpha <= 1)) {
            throw new IllegalArgumentException("smoothing (" + alpha + ") must be in (0, 1]");
        }
        return new LossMonitor(alpha, allowance, objectiveCadence, heldOutCadence, reportEvery);
    }

    /**
     * @param z the noise allowance of an ascent step, in standard deviations (finite, ≥ 0)
     * @throws IllegalArgumentException if z is negative or not finite
     */
    public LossMonitor withAscentAllowance(double z) {
        Arguments.nonNegative("ascentAllowance", z);
        return new LossMonitor(smoothing, z, objectiveCadence, heldOutCadence, reportEvery);
    }

    /**
     * @param steps publish an event every k steps besides the measurements (k ≥ 1)
     * @throws IllegalArgumentException if k &lt; 1
     */
    public LossMonitor withReportEvery(long steps) {
        Arguments.positive("reportEvery", steps);
        return new LossMonitor(smoothing, allowance, objectiveCadence, heldOutCadence, steps);
    }

    @Override
    public String name() {
        return "loss";
    }

    @Override
    public void started(RunInfo run, StepContext context) {
        int n = run.sampleCount();
        long stepsPerEpoch = (n + (long) run.batchSize() - 1) / run.batchSize();
        objectivePacer = objectiveCadence.start(n);
        heldOutPacer = heldOutCadence.start(n);
        heldOutAvailable = true; // known at the first step (the probe says)
        reference = UNKNOWN;
        report = reportEvery > 0 ? reportEvery : Math.max(1, stepsPerEpoch / REPORTS_PER_EPOCH);
        window = stepsPerEpoch;
        warmUp = (long) Math.ceil(1.0 / smoothing);
        seen = 0;
        counted = 0;
        ascents = 0;
        mean = Double.NaN;
        variance = Double.NaN;
        historySize = 0;
        historyNext = 0;
        int m = Math.min(n, Math.max(MIN_SUBSAMPLE, n / SUBSAMPLE_DIVISOR));
        subsample = new int[m];
        for (int k = 0; k < m; k++) {
            subsample[k] = (int) ((long) k * n / m); // evenly spaced: deterministic, no generator needed
        }
        previousLosses = new double[m];
        currentLosses = new double[m];
        // Measure the subsample every k windows so that it costs at most about 1 % of the epochs.
        pairSpacing = Math.max(1, (m * 100L + n - 1) / n);
        havePrevious = false;
        subsampleAvailable = true;
        nextPair = 0;
        nextReport = 0;
        allowanceSquared = allowance * allowance;
        lastExactTrendStep = Long.MIN_VALUE;
        objective = Double.NaN;
        heldOut = Double.NaN;
        gradientNorm = Double.NaN;
        objectiveCount = 0;
        heldOutCount = 0;
    }

    @Override
    public void step(StepContext context) {
        StepView v = context.view();
        long t = v.step();
        double loss = v.batchLoss();
        RunSummary summary = context.summary();
        if (seen == 0) {
            mean = loss;
            variance = 0;
            heldOutAvailable = v.probe().hasHeldOut();
        } else {
            if (seen >= warmUp) {
                counted++;
                double gap = loss - mean; // ascent: gap > z √v, tested without a square root
                if (gap > 0 && gap * gap > allowanceSquared * variance) {
                    ascents++;
                }
            }
            double delta = loss - mean;
            double increment = smoothing * delta;
            mean += increment;
            variance = (1.0 - smoothing) * (variance + delta * increment);
        }
        seen++;
        if ((seen & SUMMARY_EVERY_MASK) == 0) {
            updateSummary(summary);
        }
        if (t >= nextPair) {
            nextPair = t + window * pairSpacing; // countdowns, not a division per step
            if (subsampleAvailable && objectiveCadence.active()) {
                pairedTrend(v, summary);
            }
        }
        long spent = v.gradientEvaluations();
        double measuredObjective = Double.NaN;
        double measuredNorm = Double.NaN;
        double measuredHeldOut = Double.NaN;
        boolean measured = false;
        // The first step is always measured when the cadence is active: it is the baseline that the
        // verdict's gradient-norm ratio and the trend compare against.
        if (objectiveCadence.active() && (t == 0 || objectivePacer.due(t, spent))) {
            measureObjective(context, v, summary);
            measuredObjective = objective;
            measuredNorm = reference == EXACT ? gradientNorm : Double.NaN;
            measured = true;
        }
        if (heldOutAvailable && heldOutPacer.due(t, spent)) {
            long before = v.probe().evaluations();
            heldOut = context.heldOutLoss();
            heldOutPacer.charge(v.probe().evaluations() - before);
            heldOutCount++;
            measuredHeldOut = heldOut;
            measured = true;
        }
        boolean reportDue = t >= nextReport;
        if (reportDue) {
            nextReport = t + report;
        }
        if (measured || reportDue) {
            context.publish(new LossEvent(t, v.epoch(), loss, mean, measuredObjective, measuredHeldOut, measuredNorm,
                    v.stepSize(), v.batchLength()));
        }
    }

    private void measureObjective(StepContext context, StepView v, RunSummary summary) {
        Probe probe = v.probe();
        long before = probe.evaluations();
        double value;
        if (reference != INEXACT) {
            double[] g = context.referenceGradient();
            if (context.referenceIsExact()) {
                reference = EXACT;
                value = context.referenceObjective();
                gradientNorm = Math.sqrt(NoiseStatistics.normSquared(g, v.dimension()));
                summary.gradientNorm = gradientNorm;
                if (Double.isNaN(summary.initialGradientNorm)) {
                    summary.initialGradientNorm = gradientNorm;
                }
            } else {
                reference = INEXACT;
                value = probe.objective();
            }
        } else {
            value = probe.objective();
        }
        objectivePacer.charge(probe.evaluations() - before);
        objectiveCount++;
        objective = value;
        if (v.step() == 0) {
            summary.initialObjective = value;
        }
        record(v.step(), value, summary);
    }

    private void record(long step, double value, RunSummary summary) {
        historyStep[historyNext] = step;
        historyValue[historyNext] = value;
        historyNext = (historyNext + 1) % HISTORY;
        historySize = Math.min(historySize + 1, HISTORY);
        summary.latestObjective = value;
        summary.bestObjective = Double.isNaN(summary.bestObjective) ? value : Math.min(summary.bestObjective, value);
        if (historySize >= 2) {
            double previous = Double.NaN;
            long previousStep = step;
            for (int k = 2; k <= historySize; k++) {
                int at = Math.floorMod(historyNext - k, HISTORY);
                previous = historyValue[at];
                previousStep = historyStep[at];
                if (historyStep[at] <= step - window) {
                    break;
                }
            }
            summary.previousObjective = previous;
            // Two exact measurements far apart (more than a few windows) say little about the recent
            // trend: then the paired subsample trend stands.
            if (step - previousStep <= RECENT_WINDOWS * window) {
                summary.recentRelativeDecrease = (previous - value) / Math.abs(previous);
                summary.recentDecreaseError = 0.0;
                lastExactTrendStep = step;
            }
        }
    }

    /**
     * The trend between two window ends (an epoch, ⌈n/B⌉ steps, apart) from paired losses on a fixed
     * subsample S of m = min(n, max({@value #MIN_SUBSAMPLE}, n/{@value #SUBSAMPLE_DIVISOR})) evenly
     * spaced rows: with d<sub>i</sub> = ℓ<sub>i</sub>(h<sub>prev</sub>) − ℓ<sub>i</sub>(h) for i in S,
     * the relative decrease d̄/|ℓ̄<sub>prev</sub>| with standard error sd(d)/(√m |ℓ̄<sub>prev</sub>|). Pairing
     * removes the rows' own spread, so a flat objective shows a decrease near zero with a small error
     * (the paired-difference design; common practice, no source). It covers the data term only. The
     * pair is k = ⌈100 m/n⌉ windows apart, so it costs m loss evaluations per k epochs (about 1 %), and
     * the decrease and its error are reported per window (divided by k). It runs only while the
     * objective cadence is active. An exact objective trend measured within the last k windows takes
     * precedence.
     */
    private void pairedTrend(StepView v, RunSummary summary) {
        Probe probe = v.probe();
        int m = subsample.length;
        try {
            for (int k = 0; k < m; k++) {
                currentLosses[k] = probe.rowLoss(subsample[k]);
            }
        } catch (IllegalStateException unavailable) {
            subsampleAvailable = false; // a probe without single-sample losses: no paired trend
            return;
        }
        boolean exactIsRecent = lastExactTrendStep != Long.MIN_VALUE
                && v.step() - lastExactTrendStep <= window * pairSpacing;
        if (havePrevious && !exactIsRecent) {
            double meanPrevious = 0;
            double meanDiff = 0;
            for (int k = 0; k < m; k++) {
                meanPrevious += previousLosses[k];
                meanDiff += previousLosses[k] - currentLosses[k];
            }
            meanPrevious /= m;
            meanDiff /= m;
            double ss = 0;
            for (int k = 0; k < m; k++) {
                double e = previousLosses[k] - currentLosses[k] - meanDiff;
                ss += e * e;
            }
            double scale = Math.abs(meanPrevious);
            if (scale > 0 && m > 1) {
                // Per window: the pair is pairSpacing windows apart.
                summary.recentRelativeDecrease = meanDiff / scale / pairSpacing;
                summary.recentDecreaseError = Math.sqrt(ss / (m - 1) / m) / scale / pairSpacing;
            }
        }
        double[] swap = previousLosses;
        previousLosses = currentLosses;
        currentLosses = swap;
        havePrevious = true;
    }

    private void updateSummary(RunSummary summary) {
        if (counted > 0) {
            summary.ascentShare = (double) ascents / counted;
        }
        summary.lossOscillation = Math.sqrt(variance) / Math.abs(mean);
    }

    /** Records the fit's own final objective when it is that of the last iterate. */
    @Override
    public void finished(Fit fit, StepContext context) {
        if (seen > 0) {
            updateSummary(context.summary());
        }
        double value = fit.finalObjective();
        if (Double.isFinite(value) && !fit.averaged() && Arrays.equals(fit.parameters(), fit.lastIterate())) {
            record(fit.steps(), value, context.summary());
            objective = value;
        }

    }

    /** @return the smoothed batch loss m (NaN before the first step) */
    public double smoothedBatchLoss() {
        return mean;
    }

    /** @return the latest exact objective measured (NaN before the first) */
    public double latestObjective() {
        return objective;
    }

    /** @return the latest held-out loss measured (NaN before the first or without held-out data) */
    public double latestHeldOutLoss() {
        return heldOut;
    }

    /** @return the number of exact objectives measured during the fit */
    public long objectiveMeasurements() {
        return objectiveCount;
    }

    /** @return the number of held-out losses measured during the fit */
    public long heldOutMeasurements() {
        return heldOutCount;
    }

    /** @return the share of counted steps that were ascents (NaN before the warm-up ends) */
    public double ascentShare() {
        return counted == 0 ? Double.NaN : (double) ascents / counted;
    }

    @Override
    public String toString() {
        return "LossMonitor[objective " + objectiveCadence + ", held-out " + heldOutCadence + ", smoothing "
                + smoothing + ", allowance " + allowance + "]";
    }
}
