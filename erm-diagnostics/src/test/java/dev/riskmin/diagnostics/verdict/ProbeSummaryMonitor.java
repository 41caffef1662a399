package dev.riskmin.diagnostics.verdict;

import dev.riskmin.diagnostics.AngleEvent;
import dev.riskmin.diagnostics.LossEvent;
import dev.riskmin.diagnostics.Monitor;
import dev.riskmin.diagnostics.NoiseEvent;
import dev.riskmin.diagnostics.StepContext;
import dev.riskmin.hook.RunInfo;
import dev.riskmin.hook.StepView;

import java.util.Arrays;

/**
 * A test-scope stand-in for the estimator monitors (written elsewhere): it fills the
 * {@link RunSummary} figures the verdict rules read, from the view and the probe, and publishes one
 * noise, angle and loss event per probe.
 * <ul>
 * <li>every step: the cosine between successive batch gradients, smoothed by an exponential moving
 * average over about 32 steps;</li>
 * <li>every {@code every} steps: the reference gradient G (exact for small n) and L(h<sub>t</sub>);
 * the trace estimate T = B‖g<sub>B</sub> − G‖² (with replacement; divided by 1 − B/n without), from
 * E‖g<sub>B</sub> − G‖² = tr Σ/B (METHODS §1); B<sub>s</sub> = EMA(T)/EMA(‖G‖²) with numerator and
 * denominator smoothed apart (METHODS §2); cos φ between g<sub>B</sub> and G (METHODS §3);</li>
 * <li>the objective's trend: an ordinary least-squares line through the objectives of the last half
 * of the probes; its drop over the window, relative to its start, and that drop's standard error
 * (common practice, no source).</li>
 * </ul>
 */
public final class ProbeSummaryMonitor implements Monitor {
    private static final double SUCCESSIVE_WEIGHT = 1.0 / 32;
    private static final double NOISE_WEIGHT = 0.1;

    private final int every;
    private double[] current = new double[0];
    private double[] previous = new double[0];
    private boolean havePrevious;
    private double successive = Double.NaN;
    private double emaTrace = Double.NaN;
    private double emaNormSquared = Double.NaN;
    private double cosineSum;
    private long cosineCount;
    private long descentCount;
    private double[] objectives = new double[64];
    private int probes;
    private boolean withReplacement;

    public ProbeSummaryMonitor(int every) {
        this.every = every;
    }

    @Override
    public void started(RunInfo run, StepContext context) {
        current = new double[run.dimension()];
        previous = new double[run.dimension()];
        havePrevious = false;
        successive = Double.NaN;
        emaTrace = Double.NaN;
        emaNormSquared = Double.NaN;
        cosineSum = 0;
        cosineCount = 0;
        descentCount = 0;
        probes = 0;
        withReplacement = run.withReplacement();
    }

    @Override
    public void step(StepContext context) {
        StepView view = context.view();
        view.copyBatchGradient(current);
        if (havePrevious) {
            double c = cosine(current, previous);
            if (Double.isFinite(c)) {
                successive = Double.isNaN(successive) ? c : successive + SUCCESSIVE_WEIGHT * (c - successive);
            }
        }
        double[] swap = previous;
        previous = current;
        current = swap;
        havePrevious = true;
        context.summary().successiveCosine = successive;
        if (view.step() % every == 0) {
            probe(context, view, previous);
        }
    }

    private void probe(StepContext context, StepView view, double[] batchGradient) {
        double[] g = context.referenceGradient();
        double objective = context.referenceObjective();
        int b = view.batchLength();
        int n = view.sampleCount();
        double normSquared = 0;
        double distance = 0;
        for (int j = 0; j < g.length; j++) {
            normSquared += g[j] * g[j];
            double d = batchGradient[j] - g[j];
            distance += d * d;
        }
        double trace = withReplacement ? b * distance : b < n ? b * distance / (1 - (double) b / n) : Double.NaN;
        if (Double.isFinite(trace)) {
            emaTrace = Double.isNaN(emaTrace) ? trace : emaTrace + NOISE_WEIGHT * (trace - emaTrace);
            emaNormSquared = Double.isNaN(emaNormSquared) ? normSquared
                    : emaNormSquared + NOISE_WEIGHT * (normSquared - emaNormSquared);
        }
        double noiseScale = emaTrace / emaNormSquared;
        double cos = cosine(batchGradient, g);
        if (Double.isFinite(cos)) {
            cosineSum += cos;
            cosineCount++;
            descentCount += cos > 0 ? 1 : 0;
        }
        if (probes == objectives.length) {
            objectives = Arrays.copyOf(objectives, 2 * probes);
        }
        objectives[probes++] = objective;

        RunSummary s = context.summary();
        s.previousObjective = s.latestObjective;
        s.latestObjective = objective;
        s.bestObjective = Double.isNaN(s.bestObjective) ? objective : Math.min(s.bestObjective, objective);
        s.gradientNorm = Math.sqrt(normSquared);
        if (Double.isNaN(s.initialGradientNorm)) {
            s.initialGradientNorm = s.gradientNorm;
        }
        s.traceCovariance = emaTrace;
        s.gradientNormSquared = emaNormSquared;
        s.noiseScale = noiseScale;
        s.batchMeanVariance = withReplacement ? emaTrace / b : (1 - (double) b / n) * emaTrace / b;
        s.meanCosine = cosineSum / cosineCount;
        s.descentShare = (double) descentCount / cosineCount;
        s.angleProbes = cosineCount;
        trend(s);

        int suggested = Double.isFinite(noiseScale) ? (int) Math.max(1, Math.ceil(noiseScale)) : 1;
        context.publish(new NoiseEvent(view.step(), view.epoch(), b, trace, distance, normSquared, noiseScale,
                suggested));
        context.publish(new AngleEvent(view.step(), view.epoch(), cos, s.meanCosine, s.descentShare, Double.NaN,
                Double.NaN));
        context.publish(new LossEvent(view.step(), view.epoch(), view.batchLoss(), Double.NaN, objective,
                Double.NaN, s.gradientNorm, view.stepSize(), b));
    }

    private void trend(RunSummary s) {
        int m = probes / 2;
        if (m < 4) {
            return;
        }
        int from = probes - m;
        double meanX = (m - 1) / 2.0;
        double meanY = 0;
        for (int k = 0; k < m; k++) {
            meanY += objectives[from + k];
        }
        meanY /= m;
        double sxx = 0;
        double sxy = 0;
        for (int k = 0; k < m; k++) {
            sxx += (k - meanX) * (k - meanX);
            sxy += (k - meanX) * (objectives[from + k] - meanY);
        }
        double slope = sxy / sxx;
        double ssr = 0;
        for (int k = 0; k < m; k++) {
            double r = objectives[from + k] - meanY - slope * (k - meanX);
            ssr += r * r;
        }
        double slopeError = Math.sqrt(ssr / (m - 2) / sxx);
        double start = Math.abs(meanY - slope * meanX);
        s.recentRelativeDecrease = -slope * (m - 1) / start;
        s.recentDecreaseError = slopeError * (m - 1) / start;
    }

    /** @return the mean objective over the last half of the probes */
    public double meanRecentObjective() {
        int m = Math.max(1, probes / 2);
        double sum = 0;
        for (int k = probes - m; k < probes; k++) {
            sum += objectives[k];
        }
        return sum / m;
    }

    /** @return the number of probes taken */
    public int probes() {
        return probes;
    }

    private static double cosine(double[] a, double[] b) {
        double ab = 0;
        double aa = 0;
        double bb = 0;
        for (int j = 0; j < a.length; j++) {
            ab += a[j] * b[j];
            aa += a[j] * a[j];
            bb += b[j] * b[j];
        }
        return aa > 0 && bb > 0 ? ab / Math.sqrt(aa * bb) : Double.NaN;
    }

    @Override
    public String name() {
        return "probe-summary (test)";
    }
}
