package dev.riskmin.diagnostics.estimator;

import dev.riskmin.diagnostics.AngleEvent;
import dev.riskmin.diagnostics.Monitor;
import dev.riskmin.diagnostics.StepContext;
import dev.riskmin.diagnostics.verdict.RunSummary;
import dev.riskmin.hook.Probe;
import dev.riskmin.hook.RunInfo;
import dev.riskmin.hook.StepView;
import dev.riskmin.util.Arguments;

/**
 * Descent-angle statistics of a running fit (METHODS §3), published as {@link AngleEvent}s.
 *
 * <p>At each probe: cos φ = ⟨g<sub>B</sub>, G⟩/(‖g<sub>B</sub>‖ ‖G‖) between the fit's batch gradient
 * g<sub>B</sub> ({@link StepView#copyBatchGradient}) and the reference gradient G
 * ({@link StepContext#referenceGradient()}: the full gradient, or an independent large batch when n
 * is large, whose own noise then pulls the cosine towards 0). Since E⟨g<sub>B</sub>, G⟩ = ‖G‖² and
 * E‖g<sub>B</sub>‖² = ‖G‖² + tr Σ/B, a rough guide is cos φ ≈ (1 + B<sub>simple</sub>/B)<sup>−1/2</sup>
 * (derived in METHODS §3, not exact). The monitor keeps the running mean of cos φ, the share of
 * probes with cos φ &gt; 0 (the step −ε g<sub>B</sub> is then a descent direction of L for small
 * enough ε), and the running distribution of cos φ as a histogram of {@value #BINS} equal bins over
 * [−1, 1] (quantiles by linear interpolation inside a bin, so within 2/{@value #BINS} of the
 * empirical quantile). A probe where ‖g<sub>B</sub>‖ or ‖G‖ is 0 has no angle and is not counted.
 *
 * <h2>Certified mode</h2>
 * With a reference optimum h* and L* = L(h*) from an exact solver ({@link #certified}), each probe
 * also gives the angle in degrees between the step direction −g<sub>B</sub> and the direction to the
 * optimum h* − h<sub>t</sub>, and the true suboptimality L(h<sub>t</sub>) − L*, with L(h<sub>t</sub>)
 * from {@link StepContext#referenceObjective()} when the reference is exact (no extra cost), else
 * from {@link Probe#objective()} (n loss evaluations). For a convex L and the exact gradient the
 * angle is at most 90° (⟨−G, h* − h⟩ ≥ L(h) − L* ≥ 0); a stochastic g<sub>B</sub> satisfies this only
 * in expectation, so wider angles are no fault. h* must be in the fitted problem's parameter layout
 * and scale, the one of {@link StepView#copyParameters}: for a fit with {@code standardize(true)}
 * that is the standardized scale, so either certify a fit without standardization or map the
 * optimum with {@link dev.riskmin.data.Standardizer#fromOriginalScale} of the same standardizer
 * (and give L* of the standardized problem, which differs when the penalty acts on it).
 *
 * <h2>Cost</h2>
 * A probe costs what the reference costs (n evaluations, or the host's reference batch) plus O(p);
 * in certified mode with an inexact reference, also n loss evaluations. The default cadence is a
 * budget of {@value #DEFAULT_SHARE_PERCENT} % of the fit's gradient evaluations ({@link Cadence}),
 * which makes an exact probe rare (a full gradient costs an epoch): use {@link #every(long)} for
 * short fits. Steps between probes cost one comparison and allocate nothing.
 *
 * <p>One instance serves one fit at a time; the {@code with…} methods return new monitors.
 */
public final class AngleMonitor implements Monitor {
    /** The number of histogram bins over [−1, 1]. */
    public static final int BINS = 100;
    /** The default budget, in percent of the fit's gradient evaluations. */
    public static final int DEFAULT_SHARE_PERCENT = 1;
    private static final int HOST_FULL_GRADIENT_LIMIT = 200_000;
    private static final int HOST_REFERENCE_BATCH = 4096;

    private final Cadence cadence;
    private final double[] optimum;     // null unless certified
    private final double optimalObjective;

    // ---- per-fit state
    private Cadence.Pacer pacer;
    private double[] batch = new double[0];
    private double[] position = new double[0];
    private final long[] histogram = new long[BINS];
    private long probes;
    private long descents;
    private double cosineSum;
    private double lastCosine = Double.NaN;
    private double lastAngle = Double.NaN;
    private double lastSuboptimality = Double.NaN;

    private AngleMonitor(Cadence cadence, double[] optimum, double optimalObjective) {
        this.cadence = cadence;
        this.optimum = optimum;
        this.optimalObjective = optimalObjective;
    }

    /** A budget of 1 % of the fit's gradient evaluations. */
    public static AngleMonitor defaults() {
        return new AngleMonitor(Cadence.share(DEFAULT_SHARE_PERCENT / 100.0), null, Double.NaN);
    }

    /** A probe every k steps (steps 0, k, 2k, …), whatever it costs. */
    public static AngleMonitor every(long steps) {
        return new AngleMonitor(Cadence.every(steps), null, Double.NaN);
    }

    /**
     * Certified mode (see the class documentation), with the default cadence.
     *
     * @param optimum          read only (copied): h* in the fitted problem's layout and scale
     * @param optimalObjective L* = L(h*)
     * @throws IllegalArgumentException naming the first non-finite entry, or a non-finite L*
     */
    public static AngleMonitor certified(double[] optimum, double optimalObjective) {
        Arguments.notNull("optimum", optimum);
        for (int j = 0; j < optimum.length; j++) {
            if (!Double.isFinite(optimum[j])) {
                throw new IllegalArgumentException("optimum[" + j + "] (" + optimum[j] + ") must be finite");
            }
        }
        Arguments.finite("optimalObjective", optimalObjective);
        return new AngleMonitor(defaults().cadence, optimum.clone(), optimalObjective);
    }

    /** @return this monitor probing at the given cadence */
    public AngleMonitor withCadence(Cadence value) {
        Arguments.notNull("cadence", value);
        return new AngleMonitor(value, optimum, optimalObjective);
    }

    @Override
    public String name() {
        return optimum != null ? "angle (certified)" : "angle";
    }

    /** @throws IllegalArgumentException in certified mode, if the optimum's length is not p */
    @Override
    public void started(RunInfo run, StepContext context) {
        int p = run.dimension();
        if (optimum != null && optimum.length != p) {
            throw new IllegalArgumentException("the certified optimum has " + optimum.length
                    + " entries, the fitted problem has p = " + p + " parameters");
        }
        int n = run.sampleCount();
        pacer = cadence.start(n <= HOST_FULL_GRADIENT_LIMIT ? n : HOST_REFERENCE_BATCH);
        batch = new double[p];
        position = new double[p];
        java.util.Arrays.fill(histogram, 0);
        probes = 0;
        descents = 0;
        cosineSum = 0;
        lastCosine = Double.NaN;
        lastAngle = Double.NaN;
        lastSuboptimality = Double.NaN;
    }

    @Override
    public void step(StepContext context) {
        StepView v = context.view();
        if (pacer.due(v.step(), v.gradientEvaluations())) {
            probe(context, v);
        }
    }

    private void probe(StepContext context, StepView v) {
        Probe probe = v.probe();
        int p = v.dimension();
        long before = probe.evaluations();
        double[] g = context.referenceGradient();
        v.copyBatchGradient(batch);
        double batchNorm = Math.sqrt(NoiseStatistics.normSquared(batch, p));
        double referenceNorm = Math.sqrt(NoiseStatistics.normSquared(g, p));
        double cosine = clamp(NoiseStatistics.dot(batch, g, p) / (batchNorm * referenceNorm));
        lastCosine = cosine;
        if (!Double.isNaN(cosine)) {
            probes++;
            cosineSum += cosine;
            if (cosine > 0) {
                descents++;
            }
            histogram[bin(cosine)]++;
        }
        double angle = Double.NaN;
        double suboptimality = Double.NaN;
        if (optimum != null) {
            v.copyParameters(position);
            double dot = 0;
            double distance = 0;
            for (int j = 0; j < p; j++) {
                double d = optimum[j] - position[j];
                dot -= batch[j] * d;
                distance += d * d;
            }
            angle = Math.toDegrees(Math.acos(clamp(dot / (batchNorm * Math.sqrt(distance)))));
            double objective = context.referenceIsExact() ? context.referenceObjective() : probe.objective();
            suboptimality = objective - optimalObjective;
        }
        lastAngle = angle;
        lastSuboptimality = suboptimality;
        pacer.charge(probe.evaluations() - before);
        double meanCosine = meanCosine();
        double share = descentShare();
        RunSummary summary = context.summary();
        summary.meanCosine = meanCosine;
        summary.descentShare = share;
        summary.angleProbes = probes;
        context.publish(new AngleEvent(v.step(), v.epoch(), cosine, meanCosine, share, angle, suboptimality));
    }

    /** Clamps rounding excursions just beyond ±1 (NaN stays NaN). */
    private static double clamp(double c) {
        return c > 1 ? 1 : c < -1 ? -1 : c;
    }

    private static int bin(double cosine) {
        int k = (int) ((cosine + 1.0) * (BINS / 2.0));
        return Math.min(BINS - 1, Math.max(0, k));
    }

    /** @return the probes with an angle so far */
    public long probes() {
        return probes;
    }

    /** @return the running mean of cos φ (NaN before the first probe) */
    public double meanCosine() {
        return probes == 0 ? Double.NaN : cosineSum / probes;
    }

    /** @return the share of probes with cos φ &gt; 0 (NaN before the first probe) */
    public double descentShare() {
        return probes == 0 ? Double.NaN : (double) descents / probes;
    }

    /** @return cos φ at the latest probe */
    public double latestCosine() {
        return lastCosine;
    }

    /** @return the latest angle to the optimum in degrees (certified mode; else NaN) */
    public double latestAngleToOptimum() {
        return lastAngle;
    }

    /** @return the latest L(h<sub>t</sub>) − L* (certified mode; else NaN) */
    public double latestSuboptimality() {
        return lastSuboptimality;
    }

    /**
     * @param q the probability level in [0, 1]
     * @return the q-quantile of the cosines so far from the histogram, by linear interpolation inside
     * the bin that holds it (NaN before the first probe)
     * @throws IllegalArgumentException if q is outside [0, 1]
     */
    public double cosineQuantile(double q) {
        Arguments.inClosedRange("q", q, 0, 1);
        if (probes == 0) {
            return Double.NaN;
        }
        double target = q * probes;
        double width = 2.0 / BINS;
        long below = 0;
        for (int k = 0; k < BINS; k++) {
            long c = histogram[k];
            if (c > 0 && below + c >= target) {
                return -1.0 + width * (k + (target - below) / c);
            }
            below += c;
        }
        return 1.0;
    }

    /**
     * @return a copy of the histogram's counts: bin k covers [−1 + 2k/BINS, −1 + 2(k+1)/BINS) (the
     * last one includes 1)
     */
    public long[] histogram() {
        return histogram.clone();
    }

    @Override
    public String toString() {
        return "AngleMonitor[" + cadence + (optimum != null ? ", certified" : "") + "]";
    }
}
