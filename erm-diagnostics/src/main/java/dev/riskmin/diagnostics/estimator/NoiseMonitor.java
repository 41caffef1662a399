package dev.riskmin.diagnostics.estimator;

import dev.riskmin.diagnostics.Monitor;
import dev.riskmin.diagnostics.NoiseEvent;
import dev.riskmin.diagnostics.StepContext;
import dev.riskmin.diagnostics.verdict.RunSummary;
import dev.riskmin.hook.Probe;
import dev.riskmin.hook.RunInfo;
import dev.riskmin.hook.StepView;
import dev.riskmin.util.Arguments;

/**
 * Estimates the gradient-noise variance tr Σ, the variance of the batch mean, ‖G‖² and the simple
 * noise scale B<sub>simple</sub> = tr Σ/‖G‖² of a running fit, and publishes them as
 * {@link NoiseEvent}s (formulas in {@link NoiseStatistics}; METHODS §1–2; Cochran, <i>Sampling
 * Techniques</i>, 3rd ed., Wiley 1977, ch. 2 and 5, chapters from memory; McCandlish, Kaplan,
 * Amodei et al., arXiv:1812.06162, 2018).
 *
 * <h2>At a probe</h2>
 * From the per-sample gradients g<sub>1</sub> … g<sub>B</sub> of the current batch at h<sub>t</sub>
 * ({@link StepContext#sampleGradients()}, B evaluations):
 * <ul>
 * <li>T = (1/(B − 1)) Σ<sub>j</sub> ‖u<sub>j</sub> − ū‖², with u<sub>j</sub> = s<sub>j</sub> g<sub>j</sub> for
 * draws with replacement ({@link RunInfo#withReplacement()}: uniform or importance sampling, where
 * the scale s<sub>j</sub> = {@link StepView#batchScale}(j) makes the u<sub>j</sub> the i.i.d. terms
 * of g<sub>B</sub>, so T estimates the trace of their covariance), and u<sub>j</sub> = g<sub>j</sub>
 * (unscaled) otherwise. E[T] = tr Σ with replacement, tr S² without.</li>
 * <li>The variance of the batch mean V = E‖g<sub>B</sub> − G‖²: T/B with replacement;
 * (1 − B/n) T/B without (finite-population correction). Stratified sampling is also drawn without
 * replacement and gets the same form — a conservative one (approximately: proportional allocation
 * removes the between-strata part of the variance, Cochran ch. 5) — unless the monitor is given the strata
 * ({@link #withStrata}); then V = Σ<sub>h</sub> W<sub>h</sub>² (1 − n<sub>h</sub>/N<sub>h</sub>)
 * T<sub>h</sub>/n<sub>h</sub> from the within-stratum estimates T<sub>h</sub>, for batches in which
 * every stratum has at least two draws (or all its members).</li>
 * <li>tr Σ = T with replacement, ((n − 1)/n) T without.</li>
 * <li>‖G‖²: with the exact full gradient as reference ({@link StepContext#referenceIsExact()}),
 * ‖G‖² itself. With an independent batch of B<sub>big</sub> draws as reference (n large),
 * ‖G<sub>big</sub>‖² − tr Σ/B<sub>big</sub>, unbiased because E‖G<sub>big</sub>‖² = ‖G‖² + tr Σ/B<sub>big</sub>
 * (METHODS §2). Without the reference at this probe, ‖ū‖² − V from the batch alone, unbiased
 * because E‖ū‖² = ‖G‖² + V (with the strata, ū is the stratified mean Σ<sub>h</sub> W<sub>h</sub> ḡ<sub>h</sub>).
 * Under importance sampling the tr Σ subtracted from ‖G<sub>big</sub>‖² is that of the scaled
 * draws, while the host's reference batch is uniform: the correction is then off by the
 * difference of the two traces over B<sub>big</sub>, small when B<sub>big</sub> is large.</li>
 * </ul>
 *
 * <h2>A batch of one</h2>
 * With B = 1 the one-batch T is undefined; the monitor then probes only when it can also use the
 * reference, and pairs the one per-sample gradient u (scaled as above) with it rather than drawing
 * another batch. With the exact G it observes the deviation itself: d = ‖u − G‖² has E[d] = V, so
 * V = d, tr Σ = d (with replacement) or tr S² = d/(1 − 1/n) (without). With an independent batch it
 * uses the two-batch estimates of McCandlish et al. with B<sub>small</sub> = B and B<sub>big</sub>,
 * which treat the fit's draw as one with replacement (exact for i.i.d. draws, and off by the
 * finite-population factor (n − 1)/n, negligible for the large n that has such a reference,
 * without replacement). The figures are NaN only when nothing can be formed (B = n = 1).
 *
 * <h2>A batch larger than n without independent draws</h2>
 * Sequential sampling may draw B &gt; n, wrapping around the data, so that the batch holds some
 * samples twice: it is then neither an i.i.d. sample nor one without replacement, and the monitor
 * does not probe it (its figures stay as they were).
 *
 * <h2>Smoothing</h2>
 * The figures are noisy from probe to probe, and B<sub>simple</sub> is a ratio: the ratio of two
 * unbiased estimates is biased, more so the noisier they are. So the numerator tr Σ and the
 * denominator ‖G‖² are smoothed separately by exponential moving averages m ← m + α (x − m) (the
 * first probe sets m) and only then divided (METHODS §2, after McCandlish et al.). The default
 * weight α = {@value #DEFAULT_SMOOTHING} averages over about 2/α − 1 = 19 probes: enough to damp the
 * noise of single batches, short enough to follow the drift of tr Σ and ‖G‖² as the fit moves
 * (a choice of this library, no source). The raw ‖G‖² estimates are smoothed unfloored (flooring
 * each would bias the average upwards); the smoothed value is floored at 10<sup>−12</sup> times the
 * probe's uncorrected squared norm (or the smallest normal double) before it is published or divided
 * by. The variance of the batch mean is smoothed the same way (so a change of B mid-fit blends in
 * over a few probes). α = 1 turns smoothing off.
 *
 * <h2>Cost and cadence</h2>
 * The per-sample gradients cost B evaluations per probe, the reference n (exact) or B<sub>big</sub>.
 * Both have their own {@link Cadence}; the defaults are budgets of {@value #DEFAULT_SHARE_PERCENT} %
 * of the fit's gradient evaluations each, so that the monitor adds at most about 2 %: batch-only
 * probes about every 100 steps, the reference as often as its cost allows (before the first use the
 * monitor assumes the host's defaults: exact up to n = 200,000, else a batch of 4,096). A probe
 * happens when either cadence is due; with B = 1 only when the reference's is. Every other step
 * costs two comparisons and allocates nothing.
 *
 * <p>One instance serves one fit at a time; the {@code with…} methods return new monitors.
 */
public final class NoiseMonitor implements Monitor {
    /** The default EMA weight α of the smoothed figures. */
    public static final double DEFAULT_SMOOTHING = 0.1;
    /** The default budget, in percent of the fit's gradient evaluations, for each of the two parts. */
    public static final int DEFAULT_SHARE_PERCENT = 1;
    /** The host's default reference batch, used for B<sub>big</sub> until a reference is seen to cost otherwise. */
    public static final int HOST_REFERENCE_BATCH = 4096;
    private static final int HOST_FULL_GRADIENT_LIMIT = 200_000;
    private static final double FLOOR_RELATIVE = 1e-12;

    private final Cadence cadence;
    private final Cadence referenceCadence;
    private final double smoothing;
    private final int[] strata;       // dense ids 0..S−1, or null
    private final int strataCount;
    private final int referenceBatch;

    // ---- per-fit state
    private Cadence.Pacer batchPacer;
    private Cadence.Pacer referencePacer;
    private double[] mean = new double[0];
    private double[] scales = new double[0];
    private int bigBatch;
    private long probes;
    private double trace = Double.NaN;
    private double normSquared = Double.NaN;
    private double variance = Double.NaN;
    private double publishedNorm = Double.NaN;
    private double scale = Double.NaN;
    // stratified form
    private int[] stratumSize = new int[0];
    private double[] stratumWeight = new double[0];
    private int[] drawn = new int[0];
    private int[] next = new int[0];
    private double[] stratumTrace = new double[0];
    private int[] order = new int[0];
    private double[] stratifiedMean = new double[0];
    private double stratifiedVariance;

    private NoiseMonitor(Cadence cadence, Cadence referenceCadence, double smoothing, int[] strata, int strataCount,
                         int referenceBatch) {
        this.cadence = cadence;
        this.referenceCadence = referenceCadence;
        this.smoothing = smoothing;
        this.strata = strata;
        this.strataCount = strataCount;
        this.referenceBatch = referenceBatch;
    }

    /** Budgets of 1 % for the per-sample gradients and 1 % for the reference; α = 0.1. */
    public static NoiseMonitor defaults() {
        Cadence budget = Cadence.share(DEFAULT_SHARE_PERCENT / 100.0);
        return new NoiseMonitor(budget, budget, DEFAULT_SMOOTHING, null, 0, HOST_REFERENCE_BATCH);
    }

    /** A probe with the reference every k steps (steps 0, k, 2k, …), whatever it costs; α = 0.1. */
    public static NoiseMonitor every(long steps) {
        Cadence c = Cadence.every(steps);
        return new NoiseMonitor(c, c, DEFAULT_SMOOTHING, null, 0, HOST_REFERENCE_BATCH);
    }

    /** @return this monitor with both the per-sample gradients and the reference at the given cadence */
    public NoiseMonitor withCadence(Cadence value) {
        Arguments.notNull("cadence", value);
        return new NoiseMonitor(value, value, smoothing, strata, strataCount, referenceBatch);
    }

    /**
     * @return this monitor using the reference gradient only at the given cadence ({@link Cadence#never()}:
     * batch-only estimates, which need B ≥ 2)
     */
    public NoiseMonitor withReferenceCadence(Cadence value) {
        Arguments.notNull("referenceCadence", value);
        return new NoiseMonitor(cadence, value, smoothing, strata, strataCount, referenceBatch);
    }

    /**
     * @param alpha the EMA weight in (0, 1]; 1 publishes each probe's own estimates
     * @throws IllegalArgumentException if alpha is outside (0, 1]
     */
    public NoiseMonitor withSmoothing(double alpha) {
        if (!(alpha > 0 && alpha <= 1)) {
            throw new IllegalArgumentException("smoothing (" + alpha + ") must be in (0, 1]");
        }
        return new NoiseMonitor(cadence, referenceCadence, alpha, strata, strataCount, referenceBatch);
    }

    /**
     * Uses the stratified form of the batch-mean variance for fits with stratified sampling.
     *
     * @param labels read only (copied): the stratum of each sample, in the fit's sample order (any
     *               non-negative labels; only equality matters)
     * @throws IllegalArgumentException naming the first negative label
     */
    public NoiseMonitor withStrata(int[] labels) {
        Arguments.notNull("strata", labels);
        int max = -1;
        for (int i = 0; i < labels.length; i++) {
            if (labels[i] < 0) {
                throw new IllegalArgumentException("strata[" + i + "] (" + labels[i] + ") must be >= 0");
            }
            max = Math.max(max, labels[i]);
        }
        int[] map = new int[max + 1];
        java.util.Arrays.fill(map, -1);
        int count = 0;
        int[] dense = new int[labels.length];
        for (int i = 0; i < labels.length; i++) {
            if (map[labels[i]] < 0) {
                map[labels[i]] = count++;
            }
            dense[i] = map[labels[i]];
        }
        return new NoiseMonitor(cadence, referenceCadence, smoothing, dense, count, referenceBatch);
    }

    /**
     * @param size B<sub>big</sub> to assume for an inexact reference until one is seen computed (it
     *             should match the host's {@code referenceBatch}; default 4,096, the host's default)
     * @implNote The step context does not say how large its reference batch is; the monitor reads
     * B<sub>big</sub> off the probe's evaluation count whenever its own call computes the reference
     * (the probe counts an independent batch as its size), and falls back on this value otherwise.
     */
    public NoiseMonitor withReferenceBatch(int size) {
        Arguments.positive("referenceBatch", size);
        return new NoiseMonitor(cadence, referenceCadence, smoothing, strata, strataCount, size);
    }

    @Override
    public String name() {
        return "noise";
    }

    /**
     * @throws IllegalArgumentException if strata were given and their count differs from n
     */
    @Override
    public void started(RunInfo run, StepContext context) {
        int n = run.sampleCount();
        int p = run.dimension();
        if (strata != null && strata.length != n) {
            throw new IllegalArgumentException("the noise monitor's strata have " + strata.length
                    + " entries, the fit has n = " + n + " samples");
        }
        batchPacer = cadence.start(run.batchSize());
        referencePacer = referenceCadence.start(n <= HOST_FULL_GRADIENT_LIMIT ? n : referenceBatch);
        mean = new double[p];
        scales = new double[run.batchSize()];
        bigBatch = referenceBatch;
        probes = 0;
        trace = Double.NaN;
        normSquared = Double.NaN;
        variance = Double.NaN;
        publishedNorm = Double.NaN;
        scale = Double.NaN;
        if (strata != null) {
            stratumSize = new int[strataCount];
            for (int s : strata) {
                stratumSize[s]++;
            }
            stratumWeight = new double[strataCount];
            for (int h = 0; h < strataCount; h++) {
                stratumWeight[h] = (double) stratumSize[h] / n;
            }
            drawn = new int[strataCount];
            next = new int[strataCount + 1];
            stratumTrace = new double[strataCount];
            order = new int[run.batchSize()];
            stratifiedMean = new double[p];
        }
    }

    @Override
    public void step(StepContext context) {
        StepView v = context.view();
        long t = v.step();
        long spent = v.gradientEvaluations();
        boolean referenceDue = referencePacer.due(t, spent);
        boolean batchDue = batchPacer.due(t, spent);
        // Sequential sampling wraps around: a batch of B > n holds some samples twice, so it is no
        // sample without replacement and the finite-population forms (1 − B/n) do not apply.
        boolean sample = context.run().withReplacement() || v.batchLength() <= v.sampleCount();
        if (sample && (referenceDue || (batchDue && v.batchLength() >= 2))) {
            probe(context, v, referenceDue);
        }
    }

    private void probe(StepContext context, StepView v, boolean useReference) {
        Probe probe = v.probe();
        int n = v.sampleCount();
        int p = v.dimension();
        boolean iid = context.run().withReplacement();
        long before = probe.evaluations();
        double[] rows = context.sampleGradients();
        int b = context.sampleGradientCount();
        batchPacer.charge(probe.evaluations() - before);
        double[] s = null;
        if (iid) {
            if (scales.length < b) {
                scales = new double[b]; // only after a listener asked for a larger batch
            }
            for (int k = 0; k < b; k++) {
                scales[k] = v.batchScale(k);
            }
            s = scales;
        }
        NoiseStatistics.meanGradient(rows, s, b, p, mean);
        double meanSquared = NoiseStatistics.normSquared(mean, p);
        double t = NoiseStatistics.sampleTrace(rows, s, b, p);
        double traceSigma = Double.NaN;
        double meanVariance = Double.NaN;
        double norm = Double.NaN;
        double uncorrected = meanSquared;
        if (b >= 2) {
            boolean stratified = !iid && strata != null && stratify(v, rows, b, p);
            traceSigma = iid ? t : NoiseStatistics.traceSigmaFromS2(t, n);
            if (iid) {
                meanVariance = NoiseStatistics.withReplacementVariance(t, b);
            } else if (stratified) {
                meanVariance = stratifiedVariance;
                uncorrected = NoiseStatistics.normSquared(stratifiedMean, p);
            } else {
                meanVariance = NoiseStatistics.withoutReplacementVariance(t, b, n);
            }
            norm = NoiseStatistics.correctedNormSquared(uncorrected, meanVariance);
        }
        if (useReference) {
            long r0 = probe.evaluations();
            double[] g = context.referenceGradient();
            boolean exact = context.referenceIsExact();
            long cost = probe.evaluations() - r0;
            referencePacer.charge(cost);
            if (!exact && cost > 0 && cost <= Integer.MAX_VALUE) {
                bigBatch = (int) cost; // the probe counts an independent batch as its size
            }
            double referenceSquared = NoiseStatistics.normSquared(g, p);
            uncorrected = referenceSquared;
            if (b >= 2) {
                norm = exact ? referenceSquared
                        : NoiseStatistics.correctedNormSquared(referenceSquared, traceSigma / bigBatch);
            } else if (exact) {
                double d = NoiseStatistics.distanceSquared(mean, g, p);
                meanVariance = d;
                norm = referenceSquared;
                if (iid) {
                    traceSigma = b * d;
                    t = traceSigma;
                } else if (b < n) {
                    t = b * d / (1.0 - (double) b / n);
                    traceSigma = NoiseStatistics.traceSigmaFromS2(t, n);
                }
            } else {
                traceSigma = NoiseStatistics.twoBatchTrace(meanSquared, b, referenceSquared, bigBatch);
                norm = NoiseStatistics.twoBatchNormSquared(meanSquared, b, referenceSquared, bigBatch);
                if (iid || n < 2) {
                    t = traceSigma;
                    meanVariance = NoiseStatistics.withReplacementVariance(traceSigma, b);
                } else {
                    t = NoiseStatistics.traceS2FromSigma(traceSigma, n);
                    meanVariance = NoiseStatistics.withoutReplacementVarianceFromSigma(traceSigma, b, n);
                }
            }
        }
        trace = smooth(trace, traceSigma);
        normSquared = smooth(normSquared, norm);
        variance = smooth(variance, meanVariance);
        double floor = Math.max(FLOOR_RELATIVE * uncorrected, Double.MIN_NORMAL);
        publishedNorm = Double.isNaN(normSquared) ? Double.NaN : Math.max(normSquared, floor);
        scale = NoiseStatistics.noiseScale(trace, publishedNorm);
        probes++;
        int suggested = Double.isNaN(scale) ? 0
                : NoiseStatistics.suggestedBatchSize(scale, iid ? Integer.MAX_VALUE : n);
        RunSummary summary = context.summary();
        summary.traceCovariance = trace;
        summary.gradientNormSquared = publishedNorm;
        summary.noiseScale = scale;
        summary.batchMeanVariance = variance;
        context.publish(new NoiseEvent(v.step(), v.epoch(), b, t, variance, publishedNorm, scale, suggested));
    }

    private double smooth(double current, double value) {
        if (Double.isNaN(value)) {
            return current;
        }
        return Double.isNaN(current) ? value : current + smoothing * (value - current);
    }

    /**
     * Forms the stratified estimator g<sub>st</sub> = Σ<sub>h</sub> W<sub>h</sub> ḡ<sub>h</sub> and its
     * variance estimate from the batch's rows grouped by stratum.
     *
     * @return false when some stratum has too few draws for its variance (then the caller uses the
     * unstratified form)
     */
    private boolean stratify(StepView v, double[] rows, int b, int p) {
        final int count = strataCount;
        java.util.Arrays.fill(drawn, 0);
        for (int k = 0; k < b; k++) {
            drawn[strata[v.batchIndex(k)]]++;
        }
        for (int h = 0; h < count; h++) {
            int nh = drawn[h];
            if (nh == 0 || (nh < 2 && nh < stratumSize[h])) {
                return false;
            }
        }
        if (order.length < b) {
            order = new int[b]; // only after a listener asked for a larger batch
        }
        next[0] = 0;
        for (int h = 0; h < count; h++) {
            next[h + 1] = next[h] + drawn[h];
        }
        for (int k = 0; k < b; k++) {
            int h = strata[v.batchIndex(k)];
            order[next[h]++] = k;
        }
        // next[h] is now the end of stratum h's run in order; its start is the previous end.
        java.util.Arrays.fill(stratifiedMean, 0, p, 0.0);
        int from = 0;
        for (int h = 0; h < count; h++) {
            int to = next[h];
            int nh = to - from;
            double inverse = 1.0 / nh;
            double w = stratumWeight[h];
            double sum = 0;
            for (int c = 0; c < p; c++) {
                double m = 0;
                for (int r = from; r < to; r++) {
                    m += rows[order[r] * p + c];
                }
                m *= inverse;
                stratifiedMean[c] += w * m;
                if (nh >= 2) {
                    for (int r = from; r < to; r++) {
                        double d = rows[order[r] * p + c] - m;
                        sum += d * d;
                    }
                }
            }
            stratumTrace[h] = nh >= 2 ? sum / (nh - 1) : 0.0;
            from = to;
        }
        stratifiedVariance = NoiseStatistics.stratifiedVariance(stratumWeight, drawn, stratumSize, stratumTrace, count);
        return true;
    }

    /** @return the number of probes so far in this fit */
    public long probes() {
        return probes;
    }

    /** @return the smoothed tr Σ (NaN before the first probe) */
    public double traceCovariance() {
        return trace;
    }

    /** @return the smoothed, floored ‖G‖² (NaN before the first probe) */
    public double gradientNormSquared() {
        return publishedNorm;
    }

    /** @return B<sub>simple</sub> from the smoothed figures (NaN before the first probe) */
    public double noiseScale() {
        return scale;
    }

    /** @return the smoothed variance of the batch mean (NaN before the first probe) */
    public double batchMeanVariance() {
        return variance;
    }

    @Override
    public String toString() {
        return "NoiseMonitor[batch " + cadence + ", reference " + referenceCadence + ", smoothing " + smoothing
                + (strata != null ? ", " + strataCount + " strata" : "") + "]";
    }
}
