package dev.riskmin.spark;

import dev.riskmin.CancellationToken;
import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.StopReason;
import dev.riskmin.data.Dataset;
import dev.riskmin.hook.FitControl;
import dev.riskmin.hook.FitListener;
import dev.riskmin.hook.ListenerGroup;
import dev.riskmin.hook.Probe;
import dev.riskmin.hook.RunInfo;
import dev.riskmin.hook.StepView;
import dev.riskmin.method.Averaging;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.method.Updater;
import dev.riskmin.model.LinearModel;
import dev.riskmin.objective.LinearObjective;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.spark.PartitionWork.SampleRows;
import dev.riskmin.spark.PartitionWork.Shares;
import dev.riskmin.step.StepSchedule;
import dev.riskmin.util.Arguments;
import org.apache.spark.api.java.JavaRDD;

import java.time.Duration;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Comparator;
import java.util.List;
import java.util.random.RandomGenerator;

/**
 * The driver's loop of one distributed fit: one round per step of the core's hook. Each round runs the
 * strategy's Spark jobs at the round's parameters h<sub>r</sub>, shows the listeners the round as a step
 * (parameters h<sub>r</sub>, the round's batch and its gradient g<sub>B</sub> at h<sub>r</sub>), then moves to
 * h<sub>r+1</sub> unless a listener halted. It is the listeners' {@link StepView}, {@link Probe} and
 * {@link FitControl}, as the core's fit loop is.
 *
 * <h2>What the view and the probe give, exactly and not</h2>
 * <ul>
 * <li>Exact: the parameters; the full gradient and objective ({@link #fullGradient}, {@link #objective}: one
 * tree aggregation, n evaluations, free when the round already aggregated it, as SVRG's anchor); per-row
 * gradients of the round's batch ({@link #sampleGradient}: the first call in a round runs one job that
 * returns all B rows, B·p numbers; later calls read them); the independent batch (rows drawn uniformly with
 * replacement from all n rows, their partitions chosen on the driver); the held-out loss (on the driver).</li>
 * <li>The batch gradient g<sub>B</sub> = Σ π<sub>k</sub> ĝ<sub>k</sub> + ∇R<sub>smooth</sub>(h<sub>r</sub>) is a stratified
 * estimate (partitions are the strata) of the same gradient the in-memory fit estimates with a simple
 * random batch: unbiased, not the same draws. {@link #batchScale} gives each draw's global scale
 * s<sub>j</sub> B n<sub>k</sub>/(n b<sub>k</sub>), so that g<sub>B</sub> = (1/B) Σ s'<sub>j</sub> ∇f<sub>i<sub>j</sub></sub> as in memory.</li>
 * <li>Under the local strategies a step is a round of H local steps per partition: the view shows the
 * first local batch of every partition, all drawn at h<sub>r</sub>, and the step size of the round's first
 * local step; the move to h<sub>r+1</sub> is the average of the local runs, not −ε g<sub>B</sub>. A listener's
 * {@link #scaleStepSize} and {@link #requestBatchSize} therefore act from the next round on (under the
 * mini-batch strategy from the current step, as in memory).</li>
 * </ul>
 *
 * <p>Counts: the fit's first job (the objective, gradient and smoothness constants at h<sub>0</sub>) and
 * its last (the objective at the result) are bookkeeping and, like the in-memory fit's starting estimate
 * and final objective, not counted in the gradient evaluations; the first job's gradient also serves as
 * the anchor of round 0 under SVRG rounds. The fit's {@code initialObjective} is therefore exact here, not
 * an estimate. The view itself allocates nothing; a round allocates its job's closures and summaries.
 *
 * <p>Divergence guard: as the core's — a non-finite batch loss, a smoothed batch loss beyond the
 * explosion limit, non-finite parameters, or a local run that diverged stops the fit with
 * {@link StopReason#DIVERGED} and the last finite parameters.
 */
final class RoundLoop implements StepView, Probe, FitControl {
    private static final double LOSS_SMOOTHING = 0.1;
    /** The indices handed to the driver's update rule, which its objective ignores (the batch is distributed). */
    private static final int[] NO_ROWS = new int[0];

    private final DistributedMinimizer config;
    private final PartitionedData data;
    private final JavaRDD<PartitionBlock> blocks;
    private final Strategy strategy;
    private final Strategy.Kind kind;
    private Plan plan;
    private final Plan.Parts parts;
    private StepSchedule schedule;
    private final Penalty penalty;
    private final Shares shares;
    private final int[] rows;
    private final long n;
    private final int d;
    private final int p;
    private final int depth;
    private final ListenerGroup listeners;
    private final List<FitListener> listenerList;
    private final CancellationToken token;
    private final LinearObjective heldOut;
    private final Averaging.Accumulator averager;
    private final long maxDraws;

    private final double[] h;
    private final double[] g;
    private final double[] lastFinite;
    private final double[] previous;
    private long round;
    private long draws;
    private long evaluations;
    private long probeEvaluations;
    private long probeCalls;
    private long stamp;
    private double stepFactor = 1.0;
    private double stepSize;
    private double batchLoss;
    private int batchSize;
    private int[] allocation;
    private int allocationTotal;
    private long startNanos;
    private long roundStartNanos;

    // the round's batch, flattened in partition order
    private RoundSummary summary;
    private long[] batchGlobal = new long[0];
    private double[] batchScales = new double[0];
    private int[][] batchLocal;
    private int batchLength;
    private boolean batchRecorded;
    private long summaryNanos;

    // cached measurements at h (valid while their stamp equals the current one)
    private final double[] fullGradient;
    private double fullObjective = Double.NaN;
    private double fullSpread = Double.NaN;
    private long fullStamp = -1;
    private double[] sampleRows = new double[0];
    private double[] sampleLosses = new double[0];
    private long sampleStamp = -1;

    private StopReason haltReason;
    private String haltDetail = "";
    private boolean inListeners;
    private double[] restored;
    private Updater updater;

    RoundLoop(DistributedMinimizer config, PartitionedData data, FitOptions options) {
        this.config = config;
        this.data = data;
        this.blocks = data.blocks();
        this.strategy = config.strategy();
        this.kind = strategy.kind();
        this.plan = config.plan();
        this.parts = plan.parts();
        this.schedule = parts.schedule();
        this.penalty = parts.penalty();
        this.shares = shares(data);
        this.rows = data.partitionSizes();
        this.n = data.size();
        this.d = data.dimension();
        this.p = plan.intercept ? d + 1 : d;
        this.depth = config.treeDepth();
        this.listeners = ListenerGroup.of(options.listenerList());
        this.listenerList = options.listenerList();
        this.token = options.cancellation();
        double[] h0 = options.initialParameters();
        if (h0 == null) {
            h0 = new double[p];
        } else {
            DistributedMinimizer.requireLength(h0, p);
        }
        Dataset held = options.heldOut();
        if (held != null && held.dimension() != d) {
            throw new IllegalArgumentException("held-out data have " + held.dimension() + " features, the training data "
                    + d);
        }
        this.heldOut = held == null ? null : LinearObjective.of(held, parts.loss(), Penalty.none(), plan.intercept);
        this.h = h0.clone();
        this.g = new double[p];
        this.lastFinite = h0.clone();
        this.previous = new double[p];
        this.fullGradient = new double[p];
        this.batchSize = config.batchSize();
        this.batchLocal = new int[rows.length][];
        long planned = plannedRounds();
        this.averager = config.averaging().start(p, planned);
        this.maxDraws = Double.isNaN(config.epochs()) ? -1 : (long) Math.ceil(config.epochs() * n);
        checkPartitionsFitBatch();
    }

    /** π<sub>k</sub> = W<sub>k</sub>/W and c<sub>k</sub> = π<sub>k</sub> n/n<sub>k</sub> for every partition. */
    static Shares shares(PartitionedData data) {
        double[] share = data.shares();
        double[] scale = new double[share.length];
        for (int k = 0; k < share.length; k++) {
            int nk = data.rows(k);
            scale[k] = nk == 0 ? 0.0 : share[k] * ((double) data.size() / nk);
        }
        return new Shares(share, scale, data.size());
    }

    private void checkPartitionsFitBatch() {
        if (kind == Strategy.Kind.MINI_BATCH) {
            return;
        }
        for (int k = 0; k < rows.length; k++) {
            if (rows[k] == 0) {
                continue;
            }
            try {
                parts.sampling().checkBatchSize(batchSize, rows[k]);
            } catch (IllegalArgumentException e) {
                throw new IllegalArgumentException("partition " + k + " holds " + rows[k] + " rows, too few for local "
                        + "batches of " + batchSize + " under sampling " + parts.sampling().name() + " (" + e.getMessage()
                        + "); lower batchSize or use fewer, larger partitions", e);
            }
        }
    }

    private long plannedRounds() {
        long planned = config.rounds();
        if (!Double.isNaN(config.epochs())) {
            long perRound = drawsPerRound();
            long byEpochs = (long) Math.ceil(config.epochs() * n / perRound);
            planned = planned < 0 ? byEpochs : Math.min(planned, byEpochs);
        }
        return planned;
    }

    private long drawsPerRound() {
        if (kind == Strategy.Kind.MINI_BATCH) {
            return Math.max(1, Arrays.stream(Allocation.proportional(batchSize, rows, parts.sampling())).sum());
        }
        return (long) data.filledPartitions() * strategy.localSteps() * batchSize;
    }

    /** @return n, or 2<sup>31</sup> − 1 beyond the int range of the core's hook */
    @Override
    public int sampleCount() {
        return (int) Math.min(n, Integer.MAX_VALUE);
    }

    // ---- the run ---------------------------------------------------------------------------------

    Fit run() {
        startNanos = System.nanoTime();
        try {
            return runRounds();
        } finally {
            data.context().setJobDescription(null);
        }
    }

    private Fit runRounds() {
        describe("riskmin: starting objective and smoothness");
        RoundSummary start = Jobs.full(blocks, plan, h, shares, true, depth);
        cacheFull(start);
        double baseline = fullObjective;
        resolveSchedule(start.maxSmoothness);
        if (kind == Strategy.Kind.MINI_BATCH) {
            allocate();
            DriverObjective objective = new DriverObjective(this, penalty, d, p, parts.rule().name());
            int stepsPerEpoch = (int) Math.min(Integer.MAX_VALUE, (n + allocationTotal - 1) / allocationTotal);
            updater = parts.rule().start(objective, h, stepsPerEpoch);
        }
        RunInfo info = new RunInfo(sampleCount(), p, viewBatchSize(), parts.sampling().independentDraws(),
                parts.loss().name(), penalty.name(), ruleName(), schedule.name(), parts.sampling().name(),
                plannedRounds(), plan.seed, varianceReduced(), heldOut != null, Double.NaN);
        listeners.started(info);
        StopReason reason = null;
        String detail = "";
        if (!Double.isFinite(baseline)) {
            reason = StopReason.DIVERGED;
            detail = "the objective at the starting parameters is " + baseline;
        }
        double smoothed = baseline;
        double limit = baseline + plan.explosionFactor * (Math.abs(baseline) + 1.0);
        while (reason == null) {
            reason = budgetReason();
            if (reason != null) {
                detail = budgetDetail(reason);
                break;
            }
            roundStartNanos = System.nanoTime();
            describe("riskmin: " + strategy.name() + ", round " + round);
            long atStart = stamp;
            double[] proposal = null;
            double loss;
            switch (kind) {
                case MINI_BATCH:
                    batchRecorded = false;
                    stepSize = schedule.stepSize(round) * stepFactor;
                    loss = updater.gradient(h, NO_ROWS, null, 0, g);
                    break;
                case LOCAL_SGD:
                    stepSize = schedule.stepSize(round * strategy.localSteps()) * stepFactor;
                    summary = Jobs.localSgd(blocks, plan, h, round, strategy.localSteps(), batchSize, stepFactor,
                            localTotal(), shares, depth);
                    proposal = afterLocalRound();
                    loss = summary.loss;
                    break;
                default:
                    stepSize = schedule.stepSize(round * strategy.localSteps()) * stepFactor;
                    ensureFull(false);
                    summary = Jobs.svrg(blocks, plan, h, fullGradient, round, strategy.localSteps(), batchSize,
                            stepFactor, localTotal(), shares, depth);
                    proposal = afterLocalRound();
                    loss = summary.loss;
                    break;
            }
            summaryNanos = System.nanoTime() - roundStartNanos;
            batchLoss = loss;
            if (summary.divergence != null) {
                reason = StopReason.DIVERGED;
                detail = "a local run diverged in round " + round + ": " + summary.divergence;
                restoreLastFinite();
                break;
            }
            if (!Double.isFinite(loss)) {
                reason = StopReason.DIVERGED;
                detail = "the batch loss became " + loss + " in round " + round;
                restoreLastFinite();
                break;
            }
            smoothed += LOSS_SMOOTHING * (loss - smoothed);
            if (smoothed > limit) {
                reason = StopReason.DIVERGED;
                detail = "the smoothed batch loss " + smoothed + " in round " + round + " exceeds "
                        + plan.explosionFactor + " x the starting objective " + baseline;
                restoreLastFinite();
                break;
            }
            if (!(stepSize >= 0) || Double.isInfinite(stepSize)) {
                throw new IllegalStateException("step schedule " + schedule.name() + " gave step size " + stepSize
                        + " in round " + round + "; it must be finite and >= 0");
            }
            notifyStep();
            if (haltReason != null) {
                reason = haltReason;
                detail = haltDetail;
                report(atStart, false);
                break;
            }
            System.arraycopy(h, 0, previous, 0, p);
            if (kind == Strategy.Kind.MINI_BATCH) {
                updater.update(h, g, stepSize);
            } else {
                System.arraycopy(proposal, 0, h, 0, p);
            }
            long before = draws / n;
            round++;
            draws += summary.draws;
            stamp++;
            if (averager.active()) {
                averager.add(h, round - 1);
            }
            if (allFinite(h)) {
                System.arraycopy(h, 0, lastFinite, 0, p);
            } else {
                reason = StopReason.DIVERGED;
                detail = "the parameters became non-finite in round " + (round - 1);
                restoreLastFinite();
                break;
            }
            report(atStart, true);
            if (draws / n > before) {
                notifyEpochEnd();
                if (haltReason != null) {
                    reason = haltReason;
                    detail = haltDetail;
                    break;
                }
            }
        }
        return finish(reason, detail, baseline);
    }

    private double[] afterLocalRound() {
        evaluations += summary.evaluations;
        recordBatch(summary);
        if (summary.gradient == null) {
            Arrays.fill(g, Double.NaN); // no local run took a step: they all diverged at once (see the divergence)
        } else {
            System.arraycopy(summary.gradient, 0, g, 0, p);
            penalty.addSmoothGradient(h, 0, d, 1.0, g);
        }
        double[] average = summary.parameters;
        double total = summary.shareSum;
        if (total != 1.0) {
            for (int j = 0; j < p; j++) {
                average[j] /= total;
            }
        }
        return average;
    }

    private Fit finish(StopReason reason, String detail, double baseline) {
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
        describe("riskmin: final objective");
        double finalObjective = Arrays.equals(result, h) && fullStamp == stamp ? fullObjective
                : objectiveAt(result);
        LinearModel model = LinearModel.of(Arrays.copyOf(result, d), plan.intercept ? result[d] : 0.0,
                parts.loss().response(), parts.loss().name());
        Fit fit = Fit.builder(result, reason)
                .lastIterate(h)
                .model(model)
                .averaged(averaged)
                .stopDetail(detail)
                .counts(round, (double) draws / n, evaluations, probeEvaluations)
                .wallTime(Duration.ofNanos(System.nanoTime() - startNanos))
                .objectives(baseline, finalObjective)
                .stepSizeFactor(stepFactor)
                .finalBatchSize(batchSize)
                .listenerFailures(listeners.failures())
                .standardized(false)
                .build();
        ListenerGroup.finished(listenerList, fit);
        return fit;
    }

    private void resolveSchedule(double maxSmoothness) {
        if (schedule != null) {
            return;
        }
        double lipschitz = maxSmoothness + penalty.l2Strength();
        if (!(lipschitz > 0) || Double.isInfinite(lipschitz)) {
            throw new IllegalArgumentException("the " + parts.loss().name() + " loss has no finite smoothness constant "
                    + "on these rows (largest per-row constant " + maxSmoothness + "), so the distributed fit cannot "
                    + "choose a default step size; set schedule(...) or stepSize(...)");
        }
        UpdateRule rule = kind == Strategy.Kind.SVRG ? UpdateRule.svrg() : parts.rule();
        double rate = rule.defaultStepSize(lipschitz);
        schedule = StepSchedule.constant(rate);
        plan = plan.withSchedule(() -> StepSchedule.constant(rate));
    }

    private String ruleName() {
        switch (kind) {
            case MINI_BATCH:
                return parts.rule().name();
            case LOCAL_SGD:
                return strategy.name() + " of " + parts.rule().name();
            default:
                return strategy.name();
        }
    }

    private boolean varianceReduced() {
        return kind == Strategy.Kind.SVRG || (kind == Strategy.Kind.MINI_BATCH && parts.rule().varianceReduced());
    }

    private void allocate() {
        allocation = Allocation.proportional(batchSize, rows, parts.sampling());
        allocationTotal = Arrays.stream(allocation).sum();
    }

    private int localTotal() {
        return data.filledPartitions() * batchSize;
    }

    private int viewBatchSize() {
        return kind == Strategy.Kind.MINI_BATCH ? allocationTotal : localTotal();
    }

    private void describe(String text) {
        data.context().setJobDescription(text);
    }

    // ---- jobs at a point ---------------------------------------------------------------------------

    /** The mini-batch strategy's batch gradient at a point: one job over the round's partition batches. */
    double batchGradientAt(double[] point, double[] out) {
        RoundSummary s = Jobs.batch(blocks, plan, point, round, allocation, allocationTotal, shares, depth);
        evaluations += s.evaluations;
        System.arraycopy(s.gradient, 0, out, 0, p);
        penalty.addSmoothGradient(point, 0, d, 1.0, out);
        if (!batchRecorded) {
            summary = s;
            recordBatch(s);
            batchRecorded = true;
        }
        return s.loss;
    }

    /** L(point) by one job (n loss and gradient evaluations, counted as the fit's). */
    double objectiveAt(double[] point) {
        RoundSummary s = Jobs.full(blocks, plan, point, shares, false, depth);
        return s.loss + penalty.value(point, 0, d);
    }

    /** ∇L(point) by one job, counted as the fit's evaluations (an update rule's snapshot). */
    double fullGradientAt(double[] point, double[] out) {
        RoundSummary s = Jobs.full(blocks, plan, point, shares, false, depth);
        evaluations += s.evaluations;
        System.arraycopy(s.gradient, 0, out, 0, p);
        penalty.addSmoothGradient(point, 0, d, 1.0, out);
        return s.loss + penalty.value(point, 0, d);
    }

    /** Makes sure the full gradient at h is cached; charges it to the probe or to the fit. */
    private void ensureFull(boolean forProbe) {
        if (fullStamp == stamp) {
            return;
        }
        RoundSummary s = Jobs.full(blocks, plan, h, shares, false, depth);
        if (forProbe) {
            probeEvaluations += s.evaluations;
        } else {
            evaluations += s.evaluations;
        }
        cacheFull(s);
    }

    private void cacheFull(RoundSummary s) {
        System.arraycopy(s.gradient, 0, fullGradient, 0, p);
        penalty.addSmoothGradient(h, 0, d, 1.0, fullGradient);
        fullObjective = s.loss + penalty.value(h, 0, d);
        fullSpread = spread(s.gradientSquares, s.gradient, s.shareSum);
        fullStamp = stamp;
    }

    /** Flattens the round's batch in partition order for the view and the probe. */
    private void recordBatch(RoundSummary s) {
        List<RoundSummary.Batch> parts = new ArrayList<>(s.batches);
        parts.sort(Comparator.comparingInt(RoundSummary.Batch::partition));
        int total = 0;
        for (RoundSummary.Batch b : parts) {
            total += b.indices().length;
        }
        if (batchGlobal.length < total) {
            batchGlobal = new long[total];
            batchScales = new double[total];
        }
        Arrays.fill(batchLocal, null);
        int at = 0;
        for (RoundSummary.Batch b : parts) {
            long offset = data.offset(b.partition());
            int[] local = b.indices();
            for (int m = 0; m < local.length; m++) {
                batchGlobal[at + m] = offset + local[m];
            }
            System.arraycopy(b.scales(), 0, batchScales, at, local.length);
            batchLocal[b.partition()] = local;
            at += local.length;
        }
        batchLength = total;
    }

    // ---- reports and listeners ---------------------------------------------------------------------

    private void report(long atStart, boolean moved) {
        boolean roundListeners = false;
        for (int l = 0; l < listeners.size(); l++) {
            roundListeners |= listeners.attached(l) && listeners.get(l) instanceof RoundListener;
        }
        if (!roundListeners) {
            return;
        }
        RoundSummary s = summary;
        double gNorm = Math.sqrt(dot(g, g));
        double trace = Double.NaN;
        if (s.batchCount >= 2 && s.pooledSum != null) {
            double sum2 = dot(s.pooledSum, s.pooledSum);
            trace = Math.max(0.0, (s.pooledSquares - sum2 / s.batchCount) / (s.batchCount - 1));
        }
        double variance = s.varianceDefined && s.batchCount > 0 ? s.stratifiedVariance : Double.NaN;
        boolean fullKnown = fullStamp == atStart;
        // s.parameters holds the weighted average h̄ by now, so the spread is Σ π‖h_k‖² − (Σ π) ‖h̄‖².
        double localSpread = s.parameters == null ? Double.NaN
                : Math.max(0.0, s.parameterSquares - s.shareSum * dot(s.parameters, s.parameters));
        double moveNorm = 0;
        double moveCosine = Double.NaN;
        if (moved) {
            double mm = 0;
            double mg = 0;
            for (int j = 0; j < p; j++) {
                double m = h[j] - previous[j];
                mm += m * m;
                mg -= m * g[j];
            }
            moveNorm = Math.sqrt(mm);
            moveCosine = moveNorm > 0 && gNorm > 0 ? mg / (moveNorm * gNorm) : Double.NaN;
        }
        long partitions = Math.max(1, s.partitions);
        RoundReport report = new RoundReport(moved ? round - 1 : round, strategy.name(), s.partitions, batchLength,
                stepSize, batchLoss, gNorm, trace, variance, spread(s.gradientSquares, s.gradient, s.shareSum),
                fullKnown && kind == Strategy.Kind.SVRG ? fullSpread : Double.NaN,
                fullKnown ? fullObjective : Double.NaN, fullKnown ? Math.sqrt(dot(fullGradient, fullGradient)) : Double.NaN,
                localSpread, kind == Strategy.Kind.LOCAL_SGD ? s.localObjective / s.shareSum : Double.NaN,
                moveNorm, moveCosine, summaryNanos, s.slowestNanos, s.totalNanos / partitions);
        for (int l = 0; l < listeners.size(); l++) {
            if (listeners.attached(l) && listeners.get(l) instanceof RoundListener r) {
                try {
                    r.roundEnded(report);
                } catch (Exception | AssertionError e) {
                    listeners.detach(l, "roundEnded", round, e);
                }
            }
        }
    }

    /**
     * Σ π<sub>k</sub> ‖v<sub>k</sub> − v̄‖² from Σ π<sub>k</sub> ‖v<sub>k</sub>‖² and Σ π<sub>k</sub> v<sub>k</sub> (v̄ the
     * weighted mean), floored at 0 against rounding.
     */
    private static double spread(double squares, double[] sum, double shareSum) {
        if (sum == null || !(shareSum > 0)) {
            return Double.NaN;
        }
        return Math.max(0.0, squares - dot(sum, sum) / shareSum);
    }

    private static double dot(double[] a, double[] b) {
        double s = 0;
        for (int j = 0; j < a.length; j++) {
            s += a[j] * b[j];
        }
        return s;
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

    private StopReason budgetReason() {
        if (token != null && token.cancelled()) {
            return StopReason.CANCELLED;
        }
        if (Thread.currentThread().isInterrupted()) {
            return StopReason.INTERRUPTED;
        }
        if (config.rounds() >= 0 && round >= config.rounds()) {
            return StopReason.STEP_BUDGET;
        }
        if (maxDraws >= 0 && draws >= maxDraws) {
            return StopReason.EPOCH_BUDGET;
        }
        if (config.maxEvaluations() >= 0 && evaluations >= config.maxEvaluations()) {
            return StopReason.EVALUATION_BUDGET;
        }
        if (config.timeLimit() != null && System.nanoTime() - startNanos >= config.timeLimit().toNanos()) {
            return StopReason.TIME_BUDGET;
        }
        return null;
    }

    private String budgetDetail(StopReason reason) {
        switch (reason) {
            case CANCELLED:
                return "cancelled by the caller in round " + round;
            case INTERRUPTED:
                return "the driver thread was interrupted in round " + round;
            case STEP_BUDGET:
                return "spent the budget of " + config.rounds() + " rounds";
            case EPOCH_BUDGET:
                return "spent the budget of " + config.epochs() + " epochs";
            case EVALUATION_BUDGET:
                return "spent the budget of " + config.maxEvaluations() + " gradient evaluations";
            default:
                return "spent the time budget of " + config.timeLimit().toMillis() + " ms";
        }
    }

    private void restoreLastFinite() {
        System.arraycopy(lastFinite, 0, h, 0, p);
        stamp++;
    }

    private static boolean allFinite(double[] v) {
        for (double x : v) {
            if (!Double.isFinite(x)) {
                return false;
            }
        }
        return true;
    }

    // ---- StepView ---------------------------------------------------------------------------------

    @Override
    public long step() {
        return round;
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
        return batchLength;
    }

    /**
     * @return the global index o<sub>k</sub> + i of the k-th draw (partition order)
     * @throws IllegalStateException if that index exceeds the int range of the core's hook (beyond 2<sup>31</sup> rows)
     */
    @Override
    public int batchIndex(int k) {
        checkBatchIndex(k);
        long index = batchGlobal[k];
        if (index > Integer.MAX_VALUE) {
            throw new IllegalStateException("the draw's global row index " + index + " exceeds the hook's int range");
        }
        return (int) index;
    }

    @Override
    public double batchScale(int k) {
        checkBatchIndex(k);
        return batchScales[k];
    }

    private void checkBatchIndex(int k) {
        if (k < 0 || k >= batchLength) {
            throw new IndexOutOfBoundsException("batch index k (" + k + ") must be in [0, " + batchLength + ")");
        }
    }

    @Override
    public double parameter(int j) {
        return h[j];
    }

    @Override
    public void copyParameters(double[] into) {
        System.arraycopy(h, 0, into, 0, p);
    }

    @Override
    public double batchGradient(int j) {
        return g[j];
    }

    @Override
    public void copyBatchGradient(double[] into) {
        System.arraycopy(g, 0, into, 0, p);
    }

    @Override
    public long gradientEvaluations() {
        return evaluations;
    }

    @Override
    public long elapsedNanos() {
        return System.nanoTime() - startNanos;
    }

    @Override
    public Probe probe() {
        return this;
    }

    // ---- Probe ------------------------------------------------------------------------------------

    /**
     * Row k's gradient at h, with the penalty's smooth part. The first call at the current parameters runs
     * one job that brings back all B rows of the batch (B·p numbers, counted as B probe evaluations).
     */
    @Override
    public double sampleGradient(int k, double[] into) {
        checkBatchIndex(k);
        if (sampleStamp != stamp) {
            describe("riskmin: per-row gradients of round " + round);
            List<SampleRows> parts = Jobs.sampleRows(blocks, plan, h, batchLocal, shares);
            if (sampleRows.length < batchLength * p) {
                sampleRows = new double[batchLength * p];
                sampleLosses = new double[batchLength];
            }
            int[] start = new int[rows.length];
            int at = 0;
            for (int q = 0; q < rows.length; q++) {
                start[q] = at;
                at += batchLocal[q] == null ? 0 : batchLocal[q].length;
            }
            for (SampleRows part : parts) {
                int first = start[part.partition()];
                System.arraycopy(part.rows(), 0, sampleRows, first * p, part.rows().length);
                System.arraycopy(part.losses(), 0, sampleLosses, first, part.losses().length);
            }
            probeEvaluations += batchLength;
            sampleStamp = stamp;
        }
        System.arraycopy(sampleRows, k * p, into, 0, p);
        penalty.addSmoothGradient(h, 0, d, 1.0, into);
        return sampleLosses[k];
    }

    @Override
    public double fullGradient(double[] into) {
        describe("riskmin: full gradient in round " + round);
        ensureFull(true);
        System.arraycopy(fullGradient, 0, into, 0, p);
        return fullObjective;
    }

    @Override
    public double objective() {
        describe("riskmin: objective in round " + round);
        ensureFull(true);
        return fullObjective;
    }

    /**
     * Draws {@code size} rows uniformly with replacement from all n rows — the partition of each draw on the
     * driver, the row within it on the partition's executor, both from the probe's own seeds — and writes
     * their mean gradient (one job).
     */
    @Override
    public double independentBatchGradient(int size, double[] into) {
        if (size < 1) {
            throw new IllegalArgumentException("independent batch size (" + size + ") must be >= 1");
        }
        long call = probeCalls++;
        RandomGenerator rng = Seeds.samplerGenerator(Seeds.derive(plan.seed, Seeds.PROBE, call, 0));
        int[] counts = new int[rows.length];
        long[] ends = new long[rows.length];
        for (int k = 0; k < rows.length; k++) {
            ends[k] = data.offset(k) + rows[k];
        }
        for (int m = 0; m < size; m++) {
            long i = rng.nextLong(n);
            int k = Arrays.binarySearch(ends, i);
            k = k >= 0 ? k + 1 : -k - 1;
            while (rows[k] == 0) {
                k++;
            }
            counts[k]++;
        }
        describe("riskmin: independent batch in round " + round);
        RoundSummary s = Jobs.independent(blocks, plan, h, counts, call, shares, depth);
        probeEvaluations += size;
        for (int j = 0; j < p; j++) {
            into[j] = s.gradient[j] / size;
        }
        penalty.addSmoothGradient(h, 0, d, 1.0, into);
        return s.loss / size;
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
        probeEvaluations += heldOut.size();
        return heldOut.dataLoss(h);
    }

    @Override
    public long evaluations() {
        return probeEvaluations;
    }

    // ---- FitControl -------------------------------------------------------------------------------

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
        stepFactor *= factor;
        if (inListeners && kind == Strategy.Kind.MINI_BATCH) {
            stepSize *= factor;
        }
    }

    /** Takes effect from the next round: the total B under mini-batch, the local batch under local strategies. */
    @Override
    public void requestBatchSize(int size) {
        if (size < 1) {
            throw new IllegalArgumentException("requested batch size (" + size + ") must be >= 1");
        }
        if (kind == Strategy.Kind.MINI_BATCH) {
            batchSize = (int) Math.min(size, n);
            allocate();
            return;
        }
        int allowed = size;
        for (int k = 0; k < rows.length; k++) {
            if (rows[k] > 0) {
                try {
                    parts.sampling().checkBatchSize(allowed, rows[k]);
                } catch (IllegalArgumentException e) {
                    allowed = rows[k];
                }
            }
        }
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
