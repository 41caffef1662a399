package dev.riskmin.diagnostics.estimator;

import dev.riskmin.diagnostics.Monitor;
import dev.riskmin.diagnostics.StepContext;
import dev.riskmin.hook.RunInfo;
import dev.riskmin.hook.StepView;

/**
 * Watches for overshooting: the cosine between two successive batch gradients,
 * cos(g<sub>B,t</sub>, g<sub>B,t+1</sub>), measured on pairs of steps at a cadence and averaged by an
 * exponential moving average into {@code RunSummary.successiveCosine}, which the verdict reads.
 *
 * <p>Why it works: on a quadratic with curvature a, a step ε turns the gradient's deterministic part
 * by the factor (1 − εa), negative when εa &gt; 1; with noise the expected inner product of
 * successive gradients is −ε a s²/(2 − ε a) at stationarity (METHODS §4 check, derived), so a strongly
 * negative mean cosine signals steps that jump across the valley.
 *
 * <p>Cost: two O(p) gradient copies per pair and no gradient evaluations. The default spacing of
 * pairs, max(64, p / B) steps, keeps it small on sparse data, where reading g<sub>B</sub> costs O(p)
 * while a step costs only the batch's non-zeros.
 */
public final class OscillationMonitor implements Monitor {
    /** The EMA weight of a new pair (about 20 pairs' memory). */
    public static final double SMOOTHING = 0.1;

    private final long every;
    private double[] previous = new double[0];
    private double[] current = new double[0];
    private long spacing;
    private long pendingStep = -1;
    private long nextPair;
    private double mean = Double.NaN;
    private long pairs;

    private OscillationMonitor(long every) {
        this.every = every;
    }

    /** One pair every max(64, p / B) steps. */
    public static OscillationMonitor defaults() {
        return new OscillationMonitor(0);
    }

    /** One pair every {@code steps} steps (≥ 2). */
    public static OscillationMonitor every(long steps) {
        if (steps < 2) {
            throw new IllegalArgumentException("oscillation pair spacing (" + steps + ") must be >= 2");
        }
        return new OscillationMonitor(steps);
    }

    @Override
    public void started(RunInfo run, StepContext context) {
        int p = run.dimension();
        previous = new double[p];
        current = new double[p];
        spacing = every > 0 ? every : Math.max(64, p / Math.max(1, run.batchSize()));
        pendingStep = -1;
        nextPair = 0;
        mean = Double.NaN;
        pairs = 0;
    }

    @Override
    public void step(StepContext context) {
        StepView view = context.view();
        long t = view.step();
        if (pendingStep >= 0 && t == pendingStep + 1) {
            view.copyBatchGradient(current);
            double dot = 0;
            double a = 0;
            double b = 0;
            for (int j = 0; j < current.length; j++) {
                dot += previous[j] * current[j];
                a += previous[j] * previous[j];
                b += current[j] * current[j];
            }
            pendingStep = -1;
            if (a > 0 && b > 0) {
                double cosine = dot / Math.sqrt(a * b);
                mean = pairs == 0 ? cosine : mean + SMOOTHING * (cosine - mean);
                pairs++;
                context.summary().successiveCosine = mean;
            }
            return;
        }
        if (t >= nextPair) {
            nextPair = t + spacing; // a countdown, not a division per step
            view.copyBatchGradient(previous);
            pendingStep = t;
        }
    }

    /** @return the number of pairs measured so far */
    public long pairs() {
        return pairs;
    }

    @Override
    public String name() {
        return "oscillation";
    }
}
