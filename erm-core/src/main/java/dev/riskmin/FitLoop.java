package dev.riskmin;

import dev.riskmin.hook.FitControl;
import dev.riskmin.hook.FitListener;
import dev.riskmin.hook.ListenerGroup;
import dev.riskmin.hook.Probe;
import dev.riskmin.hook.RunInfo;
import dev.riskmin.hook.StepView;
import dev.riskmin.method.Averaging;
import dev.riskmin.method.Updater;
import dev.riskmin.objective.Objective;
import dev.riskmin.sampling.BatchSource;
import dev.riskmin.sampling.Sampling;
import dev.riskmin.step.StepSchedule;
import dev.riskmin.util.Allocations;
import dev.riskmin.util.Arguments;

import java.util.Arrays;
import java.util.List;
import java.util.random.RandomGenerator;

/**
 * The fit loop of one fit: draw a batch, evaluate g<sub>B</sub>, let listeners look, move h, repeat
 * until a budget, a fault or a listener stops it. It is also the listeners' {@link StepView},
 * {@link Probe} and {@link FitControl}, so the hook allocates nothing per step.
 *
 * <p>Divergence guard: a non-finite batch loss, or a smoothed batch loss that exceeds the starting
 * objective by {@code explosionFactor} (|L<sub>0</sub>| + 1), stops the fit with
 * {@link StopReason#DIVERGED}; the parameters are those of the last check at which they were all
 * finite (checked every {@value #CHECK_EVERY} steps — further apart for sparse steps, so the O(p) check
 * costs about as much as the steps between two checks — and at every epoch end).
 *
 * <p>A step far too large for a Lipschitz loss (absolute, pinball, hinge, logistic, …) does not blow
 * up: the loss grows only in proportion to the step and plateaus far above its start, below any
 * explosion bound loose enough for single heavy-tailed batches. So the objective L<sub>end</sub> of
 * the returned parameters, computed anyway, is checked once more: if
 * L<sub>end</sub> &gt; L<sub>0</sub> + {@value #FINAL_RISE} (|L<sub>0</sub>| + 1) or is not finite (the
 * decision values overflow although the parameters are finite), with L<sub>0</sub> exact
 * (recomputed over all n when the starting estimate used a subsample), the fit is reported as
 * {@link StopReason#DIVERGED} with those (finite) parameters. The bound is this library's choice
 * (common practice, no source): a working fit ends below its start, or at worst near it when started
 * close to the optimum.
 */
final class FitLoop implements StepView, Probe, FitControl {
    static final int CHECK_EVERY = 16;
    private static final int BASELINE_SAMPLES = 4096;
    private static final double LOSS_SMOOTHING = 0.1;
    static final double FINAL_RISE = 10.0;

    /** The settings of one run, resolved by the {@link Minimizer}. */
    record Settings(Updater updater, BatchSource source, Sampling sampling, StepSchedule schedule,
                    Averaging averaging, int batchSize, long maxSteps, long maxDraws, long maxEvaluations,
                    long timeLimitNanos, double explosionFactor, RandomGenerator probeRng, RunInfo info) {
    }

    /** What the loop hands back: parameters on the fitted scale and the counters. */
    record Outcome(int sampleCount, double[] parameters, double[] lastIterate, boolean averaged, StopReason reason, String detail,
                   long steps, long draws, long gradientEvaluations, long probeEvaluations, long nanos,
                   double initialObjective, double finalObjective, double stepSizeFactor, int batchSize,
                   List<String> listenerFailures) {
    }

    private final Objective objective;
    private final Objective heldOut;
    private final Settings settings;
    private final int n;
    private final int p;
    private final ListenerGroup listeners;
    private final CancellationToken token;
    private final Averaging.Accumulator averager;

    private final double[] start; // h0 as given (not changed by the caller while the fit runs)
    private final double[] h;
    private final double[] gradient;
    private final double[] lastFinite;
    private int[] batch;
    private double[] scales;
    private int[] probeBatch = new int[0];
    private int batchSize;      // from the next step on
    private int currentLength;  // B of the step in progress

    private long t;
    private long draws;
    private double stepFactor = 1.0;
    private double stepSize;
    private double batchLoss;
    private long startNanos;
    private long probeEvaluations;
    private StopReason haltReason;
    private String haltDetail = "";
    private boolean inListeners;
    private double[] restored;
    private final boolean lazy;        // the updater keeps h in its own form
    private boolean parametersStale;   // h needs materializing before it is read
    private boolean gradientStale;     // g_B needs filling before it is read
    private final long checkEvery;

    FitLoop(Objective objective, Objective heldOut, double[] h0, Settings settings, List<FitListener> listeners,
            CancellationToken token) {
        this.objective = objective;
        this.heldOut = heldOut;
        this.settings = settings;
        this.n = objective.size();
        this.p = objective.dimension();
        this.listeners = ListenerGroup.of(listeners);
        this.token = token;
        this.start = h0;
        this.h = h0.clone();
        this.gradient = new double[p];
        this.lastFinite = h0.clone();
        this.batchSize = settings.batchSize();
        Allocations.require("batchSize (" + batchSize + ")", batchSize, Allocations.BYTES_PER_DRAW);
        this.batch = new int[batchSize];
        this.scales = new double[batchSize];
        this.averager = settings.averaging().start(p, settings.info().plannedSteps());
        this.lazy = settings.updater().lazy();
        long touched = Math.max(1, settings.updater().touchedPerStep(settings.batchSize()));
        // Dense steps cost O(p) anyway; sparse ones touch few entries, so the O(p) check is spaced out
        // to cost about as much as the steps between two checks.
        this.checkEvery = Math.max(CHECK_EVERY, touched >= p ? CHECK_EVERY : p / touched);
    }

    /** Brings h up to date for a reader (lazy updaters only). */
    private void freshParameters() {
        if (parametersStale) {
            settings.updater().materialize(h);
            parametersStale = false;
        }
    }

    /** Brings g_B up to date for a reader (lazy updaters only). */
    private void freshGradient() {
        if (gradientStale) {
            settings.updater().fillGradient(gradient);
            gradientStale = false;
        }
    }

    Outcome run() {
        startNanos = System.nanoTime();
        double baseline = estimateObjective();
        listeners.started(settings.info());
        StopReason reason = null;
        String detail = "";
        if (!Double.isFinite(baseline)) {
            reason = StopReason.DIVERGED;
            detail = "the objective at the starting parameters is " + baseline;
        }
        double smoothed = baseline;
        double limit = baseline + settings.explosionFactor() * (Math.abs(baseline) + 1.0);
        final Updater updater = settings.updater();
        final BatchSource source = settings.source();
        final boolean uniform = source.uniformScales();
        while (reason == null) {
            reason = budgetReason();
            if (reason != null) {
                detail = budgetDetail(reason);
                break;
            }
            int b = batchSize;
            currentLength = b;
            if (batch.length < b) {
                batch = new int[b];   // only when a listener asked for a larger batch
                scales = new double[b];
            }
            source.next(batch, scales, b);
            double loss = updater.gradient(h, batch, uniform ? null : scales, b, gradient);
            gradientStale = lazy;
            batchLoss = loss;
            double scheduled = settings.schedule().stepSize(t);
            stepSize = scheduled * stepFactor;
            if (!Double.isFinite(loss)) {
                reason = StopReason.DIVERGED;
                detail = "the batch loss became " + loss + " at step " + t;
                restoreLastFinite();
                break;
            }
            smoothed += LOSS_SMOOTHING * (loss - smoothed);
            if (smoothed > limit) {
                reason = StopReason.DIVERGED;
                detail = "the smoothed batch loss " + smoothed + " at step " + t + " exceeds "
                        + settings.explosionFactor() + " x the starting objective " + baseline;
                restoreLastFinite();
                break;
            }
            if (!(stepSize >= 0) || Double.isInfinite(stepSize)) {
                if (!(scheduled >= 0) || Double.isInfinite(scheduled)) {
                    throw new IllegalStateException("step schedule " + settings.schedule().name() + " gave step size "
                            + scheduled + " at step " + t + "; it must be finite and >= 0");
                }
                // The listeners' factors carried a valid step beyond the double range: an explosion.
                reason = StopReason.DIVERGED;
                detail = "the step size overflowed at step " + t + ": the schedule's " + scheduled
                        + " times the listeners' factor " + stepFactor + " is " + stepSize;
                restoreLastFinite();
                break;
            }
            notifyStep();
            if (haltReason != null) {
                reason = haltReason;
                detail = haltDetail;
                break;
            }
            updater.update(h, gradient, stepSize);
            parametersStale = lazy;
            gradientStale = false;
            long before = draws / n;
            t++;
            draws += b;
            if (averager.active()) {
                freshParameters();
                averager.add(h, t - 1);
            }
            boolean epochEnd = draws / n > before;
            if (epochEnd || t % checkEvery == 0) {
                freshParameters();
                if (allFinite(h)) {
                    System.arraycopy(h, 0, lastFinite, 0, p);
                } else {
                    reason = StopReason.DIVERGED;
                    detail = "the parameters became non-finite by step " + t;
                    restoreLastFinite();
                    break;
                }
            }
            if (epochEnd) {
                notifyEpochEnd();
                if (haltReason != null) {
                    reason = haltReason;
                    detail = haltDetail;
                    break;
                }
            }
        }
        if (reason != StopReason.DIVERGED) {
            freshParameters();
        }
        if (!allFinite(h)) {
            restoreLastFinite();
            if (reason != StopReason.DIVERGED) {
                detail = detail + "; the parameters were non-finite at the end, the last finite ones were kept";
                reason = StopReason.DIVERGED;
            }
        }
        double[] result = h.clone();
        boolean averaged = false;
        if (restored != null && reason != StopReason.DIVERGED) {
            result = restored;
        } else if (reason != StopReason.DIVERGED && averager.count() > 0) {
            double[] mean = new double[p];
            averager.copyTo(mean);
            if (allFinite(mean)) {
                result = mean;
                averaged = true;
            }
        }
        double finalObjective = objective.value(result);
        if (reason != StopReason.DIVERGED && roseFar(finalObjective, baseline)) {
            double exact = n > BASELINE_SAMPLES ? objective.value(start) : baseline;
            if (roseFar(finalObjective, exact)) {
                String was = reason + (detail.isEmpty() ? "" : ": " + detail);
                detail = Double.isFinite(finalObjective)
                        ? "the objective rose from " + exact + " at the start to " + finalObjective + " at the end, more"
                        + " than " + FINAL_RISE + " x (|start| + 1) above it: the step size is too large for this loss ("
                        + was + ")"
                        : "the objective at the returned parameters is " + finalObjective + " (the decision values"
                        + " overflow; it was " + exact + " at the start): the steps grew the parameters too far (" + was
                        + ")";
                reason = StopReason.DIVERGED;
            }
        }
        long nanos = System.nanoTime() - startNanos;
        return new Outcome(n, result, h.clone(), averaged, reason, detail, t, draws, updater.gradientEvaluations(),
                probeEvaluations, nanos, baseline, finalObjective, stepFactor, batchSize, listeners.failures());
    }

    /** @return whether the objective ended far above its start, or not finite (w·x overflowed at the end) */
    private static boolean roseFar(double end, double start) {
        return !(end <= start + FINAL_RISE * (Math.abs(start) + 1.0));
    }

    private double estimateObjective() {
        int m = Math.min(n, BASELINE_SAMPLES);
        double sum = 0;
        for (int k = 0; k < m; k++) {
            int i = (int) ((long) k * n / m);
            sum += objective.sampleLoss(h, i);
        }
        return sum / m + objective.penaltyValue(h);
    }

    private StopReason budgetReason() {
        if (token != null && token.cancelled()) {
            return StopReason.CANCELLED;
        }
        if (Thread.currentThread().isInterrupted()) {
            return StopReason.INTERRUPTED;
        }
        if (settings.maxSteps() >= 0 && t >= settings.maxSteps()) {
            return StopReason.STEP_BUDGET;
        }
        if (settings.maxDraws() >= 0 && draws >= settings.maxDraws()) {
            return StopReason.EPOCH_BUDGET;
        }
        if (settings.maxEvaluations() >= 0 && settings.updater().gradientEvaluations() >= settings.maxEvaluations()) {
            return StopReason.EVALUATION_BUDGET;
        }
        if (settings.timeLimitNanos() >= 0 && System.nanoTime() - startNanos >= settings.timeLimitNanos()) {
            return StopReason.TIME_BUDGET;
        }
        return null;
    }

    private String budgetDetail(StopReason reason) {
        switch (reason) {
            case CANCELLED:
                return "cancelled by the caller at step " + t;
            case INTERRUPTED:
                return "the fitting thread was interrupted at step " + t;
            case STEP_BUDGET:
                return "spent the budget of " + settings.maxSteps() + " steps";
            case EPOCH_BUDGET:
                return "spent the budget of " + ((double) settings.maxDraws() / n) + " epochs";
            case EVALUATION_BUDGET:
                return "spent the budget of " + settings.maxEvaluations() + " gradient evaluations";
            default:
                return "spent the time budget of " + settings.timeLimitNanos() / 1_000_000 + " ms";
        }
    }

    private void restoreLastFinite() {
        System.arraycopy(lastFinite, 0, h, 0, p);
    }

    private static boolean allFinite(double[] v) {
        for (double x : v) {
            if (!Double.isFinite(x)) {
                return false;
            }
        }
        return true;
    }

    private void notifyStep() {
        inListeners = true;
        listeners.step(this, this);
        inListeners = false;
    }

    private void notifyEpochEnd() {
        inListeners = true;
        listeners.epochEnded(this, this);
        inListeners = false;
    }

    // ---- StepView -------------------------------------------------------------------------------

    @Override
    public long step() {
        return t;
    }

    @Override
    public int epoch() {
        return (int) (draws / n);
    }

    @Override
    public long draws() {
        return draws;
    }

    @Override
    public int sampleCount() {
        return n;
    }

    @Override
    public int dimension() {
        return p;
    }

    @Override
    public double stepSize() {
        return stepSize;
    }

    @Override
    public double batchLoss() {
        return batchLoss;
    }

    @Override
    public int batchLength() {
        return currentLength;
    }

    @Override
    public int batchIndex(int k) {
        if (k < 0 || k >= currentLength) {
            throw new IndexOutOfBoundsException("batch index k (" + k + ") must be in [0, " + currentLength + ")");
        }
        return batch[k];
    }

    @Override
    public double batchScale(int k) {
        if (k < 0 || k >= currentLength) {
            throw new IndexOutOfBoundsException("batch index k (" + k + ") must be in [0, " + currentLength + ")");
        }
        return settings.source().uniformScales() ? 1.0 : scales[k];
    }

    @Override
    public double parameter(int j) {
        freshParameters();
        return h[j];
    }

    @Override
    public void copyParameters(double[] into) {
        freshParameters();
        System.arraycopy(h, 0, into, 0, p);
    }

    @Override
    public double batchGradient(int j) {
        freshGradient();
        return gradient[j];
    }

    @Override
    public void copyBatchGradient(double[] into) {
        freshGradient();
        System.arraycopy(gradient, 0, into, 0, p);
    }

    @Override
    public long gradientEvaluations() {
        return settings.updater().gradientEvaluations();
    }

    @Override
    public long elapsedNanos() {
        return System.nanoTime() - startNanos;
    }

    @Override
    public Probe probe() {
        return this;
    }

    // ---- Probe ----------------------------------------------------------------------------------

    @Override
    public double sampleGradient(int k, double[] into) {
        int i = batchIndex(k);
        freshParameters();
        Arrays.fill(into, 0, p, 0.0);
        double loss = objective.addSampleGradient(h, i, 1.0, into);
        objective.addPenaltyGradient(h, 1.0, into);
        probeEvaluations++;
        return loss;
    }

    @Override
    public double fullGradient(double[] into) {
        probeEvaluations += n;
        freshParameters();
        return objective.gradient(h, into);
    }

    @Override
    public double objective() {
        probeEvaluations += n;
        freshParameters();
        return objective.value(h);
    }

    @Override
    public double independentBatchGradient(int size, double[] into) {
        if (size < 1) {
            throw new IllegalArgumentException("independent batch size (" + size + ") must be >= 1");
        }
        if (probeBatch.length < size) {
            Allocations.require("independent batch size (" + size + ")", size, Integer.BYTES);
            probeBatch = new int[size];
        }
        RandomGenerator rng = settings.probeRng();
        for (int k = 0; k < size; k++) {
            probeBatch[k] = rng.nextInt(n);
        }
        probeEvaluations += size;
        freshParameters();
        return objective.batchGradient(h, probeBatch, null, 0, size, into);
    }

    @Override
    public double rowLoss(int i) {
        if (i < 0 || i >= n) {
            throw new IndexOutOfBoundsException("row (" + i + ") must be in [0, " + n + ")");
        }
        freshParameters();
        probeEvaluations++;
        return objective.sampleLoss(h, i);
    }

    @Override
    public boolean hasHeldOut() {
        return heldOut != null;
    }

    @Override
    public double heldOutLoss() {
        if (heldOut == null) {
            throw new IllegalStateException("this fit has no held-out data; pass it with FitOptions.builder().heldOut(...)");
        }
        freshParameters();
        probeEvaluations += heldOut.size();
        return heldOut.dataLoss(h);
    }

    @Override
    public long evaluations() {
        return probeEvaluations;
    }

    // ---- FitControl -----------------------------------------------------------------------------

    @Override
    public boolean halt(StopReason reason, String detail) {
        if (reason == null) {
            throw new NullPointerException("halt reason must not be null");
        }
        if (haltReason == null) {
            haltReason = reason;
            haltDetail = detail == null ? "" : detail;
            return true;
        }
        return false;
    }

    @Override
    public void scaleStepSize(double factor) {
        if (!(factor > 0) || Double.isInfinite(factor)) {
            throw new IllegalArgumentException("step-size factor (" + factor + ") must be finite and > 0");
        }
        if (inListeners && Double.isInfinite(stepSize * factor)) {
            throw new IllegalArgumentException("step-size factor (" + factor + ") would carry this step's size "
                    + stepSize + " beyond the double range");
        }
        stepFactor *= factor;
        if (inListeners) {
            stepSize *= factor;
        }
    }

    @Override
    public void requestBatchSize(int size) {
        if (size < 1) {
            throw new IllegalArgumentException("requested batch size (" + size + ") must be >= 1");
        }
        int allowed = size;
        try {
            settings.sampling().checkBatchSize(size, n);
        } catch (IllegalArgumentException e) {
            allowed = n;
        }
        Allocations.require("requested batch size (" + allowed + ")", allowed, Allocations.BYTES_PER_DRAW);
        batchSize = allowed;
    }

    @Override
    public void restoreParameters(double[] parameters) {
        Arguments.finiteVector("restored parameters", parameters, p);
        if (restored == null) {
            restored = new double[p];
        }
        System.arraycopy(parameters, 0, restored, 0, p);
    }

    @Override
    public double stepSizeFactor() {
        return stepFactor;
    }
}
