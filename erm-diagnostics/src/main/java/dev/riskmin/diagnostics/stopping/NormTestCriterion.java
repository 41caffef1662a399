package dev.riskmin.diagnostics.stopping;

import dev.riskmin.diagnostics.Decision;
import dev.riskmin.diagnostics.Monitor;
import dev.riskmin.diagnostics.StepContext;
import dev.riskmin.hook.RunInfo;
import dev.riskmin.hook.StepView;
import dev.riskmin.util.Arguments;

import java.util.Arrays;

/**
 * The norm test of Byrd, Chin, Nocedal &amp; Wu ("Sample size selection in optimization methods for
 * machine learning", Math. Program. B 134:127–155, 2012; METHODS §4): grows the batch S until the
 * batch gradient is accurate relative to its own size. The condition E‖g<sub>S</sub> − G‖² ≤ θ²‖G‖² is
 * checked in its sample form
 * <pre>
 *   ‖Var<sub>i∈S</sub> g<sub>i</sub>‖<sub>1</sub> / |S|  ≤  θ² ‖g<sub>S</sub>‖²,
 *   ‖Var<sub>i∈S</sub> g<sub>i</sub>‖<sub>1</sub> = (1/(|S| − 1)) Σ<sub>i∈S</sub> ‖g<sub>i</sub> − g<sub>S</sub>‖²
 * </pre>
 * (the sample form is from memory; the use of batch sample variances is confirmed by the abstract),
 * with g<sub>i</sub> the per-sample gradients of the current batch (scaled by their draw weights, so
 * that g<sub>S</sub> is their mean) from {@link StepContext#sampleGradients()}. When it fails the test
 * asks for |S| ← ⌈‖Var‖<sub>1</sub>/(θ²‖g<sub>S</sub>‖²)⌉ (from memory) — in effect |S| ≥ B<sub>simple</sub>/θ²
 * with B<sub>simple</sub> = tr Σ/‖G‖² — capped by the maximum batch size (default n; sampling without
 * replacement is always capped at n), and publishes {@link Decision#GROW_BATCH}; the batch never
 * shrinks.
 *
 * <p>Because ‖g<sub>S</sub>‖² estimates ‖G‖² + tr Σ/|S| rather than ‖G‖², the sample form is satisfied in
 * expectation once |S| ≥ B<sub>simple</sub>(1 − θ²)/θ² (derived), not B<sub>simple</sub>/θ²: at the default
 * θ = 0.9 that is about a fifth of B<sub>simple</sub>/θ², while for θ² ≤ ½ the two are within a factor 2.
 * The sample form also ignores the finite-population factor (1 − |S|/n) of sampling
 * without replacement (METHODS §1), so there it asks for somewhat more than needed as |S| nears n; and
 * it treats a stratified batch as a simple one.
 *
 * <p>Default θ = 0.9: the value seen paired with ν = 5.84 (for the augmented inner-product test) in a
 * public script comparing the two tests, not in the paper (METHODS §4). A batch of one has no sample
 * variance: the test then asks for a batch of two.
 *
 * <p>Cost: the per-sample gradients cost |S| gradient evaluations per check, so checking every k
 * steps adds 1/k to the fit's gradient evaluations; the default k = {@value #DEFAULT_CADENCE} adds
 * 2 %. Steps between checks cost nothing.
 */
public final class NormTestCriterion implements Monitor {
    /** The default θ (see the class documentation for its provenance). */
    public static final double DEFAULT_THETA = 0.9;
    /** The default cadence in steps (2 % extra gradient evaluations; this library's choice). */
    public static final int DEFAULT_CADENCE = 50;

    private final double theta;
    private final long cadence;
    private final int maxBatch;     // 0: n

    private double[] mean = new double[0];
    private int cap;

    private NormTestCriterion(double theta, long cadence, int maxBatch) {
        this.theta = theta;
        this.cadence = cadence;
        this.maxBatch = maxBatch;
    }

    /** θ = {@value #DEFAULT_THETA}, every {@value #DEFAULT_CADENCE} steps, batches up to n. */
    public static NormTestCriterion defaults() {
        return new NormTestCriterion(DEFAULT_THETA, DEFAULT_CADENCE, 0);
    }

    /**
     * @return this test with tolerance θ
     * @throws IllegalArgumentException if theta is not in (0, 1)
     */
    public NormTestCriterion withTheta(double theta) {
        Arguments.inOpenRange("theta", theta, 0.0, 1.0);
        return new NormTestCriterion(theta, cadence, maxBatch);
    }

    /**
     * @return this test checking at every k-th step
     * @throws IllegalArgumentException if k &lt; 1
     */
    public NormTestCriterion everySteps(long k) {
        Arguments.positive("stepCadence", k);
        return new NormTestCriterion(theta, k, maxBatch);
    }

    /**
     * @param size the largest batch the test asks for (for sampling with replacement it may exceed n;
     *             without replacement n caps it anyway)
     * @throws IllegalArgumentException if size &lt; 2
     */
    public NormTestCriterion withMaxBatch(int size) {
        if (size < 2) {
            throw new IllegalArgumentException("maxBatch (" + size + ") must be >= 2");
        }
        return new NormTestCriterion(theta, cadence, size);
    }

    @Override
    public String name() {
        return "norm-test";
    }

    @Override
    public void started(RunInfo run, StepContext context) {
        mean = new double[run.dimension()];
        int n = run.sampleCount();
        cap = maxBatch == 0 ? n : run.withReplacement() ? maxBatch : Math.min(maxBatch, n);
    }

    @Override
    public void step(StepContext context) {
        StepView view = context.view();
        if (view.step() % cadence != 0) {
            return;
        }
        int b = view.batchLength();
        if (b < 2) {
            if (cap >= 2) {
                context.control().requestBatchSize(2);
                context.summary().batchIncreases++;
                Stops.publish(context, name(), Double.NaN, Double.NaN, Decision.GROW_BATCH,
                        "a batch of one has no sample variance: asking for a batch of 2");
            }
            return;
        }
        double[] rows = context.sampleGradients();
        int p = view.dimension();
        double[] g = mean;
        Arrays.fill(g, 0.0);
        for (int k = 0; k < b; k++) {
            double s = view.batchScale(k);
            int off = k * p;
            for (int j = 0; j < p; j++) {
                g[j] += s * rows[off + j];
            }
        }
        double inv = 1.0 / b;
        double norm2 = 0;
        for (int j = 0; j < p; j++) {
            g[j] *= inv;
            norm2 += g[j] * g[j];
        }
        double squares = 0;
        for (int k = 0; k < b; k++) {
            double s = view.batchScale(k);
            int off = k * p;
            for (int j = 0; j < p; j++) {
                double d = s * rows[off + j] - g[j];
                squares += d * d;
            }
        }
        double variance = squares / (b - 1);     // ‖Var‖₁
        double statistic = variance / b;
        double threshold = theta * theta * norm2;
        if (statistic <= threshold) {
            Stops.publish(context, name(), statistic, threshold, Decision.CONTINUE,
                    Stops.fmt("batch variance %.4g / B = %.4g <= theta^2 |g_S|^2 = %.4g at batch %d", variance,
                            statistic, threshold, b));
            return;
        }
        double wanted = norm2 > 0 ? Math.ceil(variance / threshold) : Double.POSITIVE_INFINITY;
        int next = (int) Math.min(cap, wanted);
        if (next > b) {
            context.control().requestBatchSize(next);
            context.summary().batchIncreases++;
            Stops.publish(context, name(), statistic, threshold, Decision.GROW_BATCH,
                    Stops.fmt("batch variance %.4g / B = %.4g > theta^2 |g_S|^2 = %.4g: batch %d -> %d%s", variance,
                            statistic, threshold, b, next, next < wanted ? Stops.fmt(" (capped; wanted %.4g)", wanted)
                                    : ""));
        } else {
            Stops.publish(context, name(), statistic, threshold, Decision.CONTINUE,
                    Stops.fmt("batch variance %.4g / B = %.4g > theta^2 |g_S|^2 = %.4g but the batch %d is at the cap %d",
                            variance, statistic, threshold, b, cap));
        }
    }

    @Override
    public String toString() {
        return "NormTestCriterion[theta " + theta + ", every " + cadence + " steps, max batch "
                + (maxBatch == 0 ? "n" : Integer.toString(maxBatch)) + "]";
    }
}
