package dev.riskmin.spark;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.StopReason;
import dev.riskmin.data.FeatureMatrix;
import dev.riskmin.hook.FitControl;
import dev.riskmin.hook.FitListener;
import dev.riskmin.hook.StepView;
import dev.riskmin.objective.LinearObjective;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.sampling.BatchSource;
import dev.riskmin.sampling.Sampling;
import dev.riskmin.sampling.SamplingContext;
import dev.riskmin.step.StepSchedule;

import java.io.Serializable;
import java.util.Arrays;
import java.util.random.RandomGenerator;

/**
 * The work one partition does in a round, on the executor that holds its block. Each method reads the
 * block through the core's {@link LinearObjective} (so the losses, weights and dense layout are the
 * core's own) and returns the partition's {@link RoundSummary}.
 *
 * <p>Scales. Partition k's objective normalizes its weights within the partition,
 * ω<sup>k</sup><sub>i</sub> = n<sub>k</sub> w<sub>i</sub>/W<sub>k</sub>; the whole data's is ω<sub>i</sub> = n w<sub>i</sub>/W. So the
 * gradient of row i on the global scale is c<sub>k</sub> ∇(ω<sup>k</sup><sub>i</sub> ℓ<sub>i</sub>) with
 * c<sub>k</sub> = π<sub>k</sub> n/n<sub>k</sub> (1 for unweighted rows), and the data term is
 * L<sub>data</sub> = Σ<sub>k</sub> π<sub>k</sub> L<sup>k</sup><sub>data</sub>.
 */
final class PartitionWork {
    private PartitionWork() {
    }

    /** Partition k's figures that the driver passes into every task. */
    record Shares(double[] share, double[] scale, long n) implements Serializable {
        double share(int k) {
            return share[k];
        }

        double scale(int k) {
            return scale[k];
        }
    }

    // ---- full passes ------------------------------------------------------------------------------

    /**
     * ∇L<sup>k</sup><sub>data</sub>(h) and L<sup>k</sup><sub>data</sub>(h) over every row of the partition (n<sub>k</sub>
     * evaluations), and, when asked, the largest per-row smoothness constant on the global scale,
     * max<sub>i</sub> c<sub>k</sub> L<sup>k</sup><sub>i</sub>.
     */
    static RoundSummary full(PartitionBlock block, Plan plan, double[] point, Shares shares, boolean smoothness) {
        long start = System.nanoTime();
        int k = block.partition;
        LinearObjective data = dataObjective(block, plan.parts().loss(), plan.intercept);
        double[] g = new double[point.length];
        double loss = data.gradient(point, g);
        RoundSummary s = RoundSummary.of(block, shares.share(k));
        s.addGradient(shares.share(k), g, loss);
        s.evaluations = block.rows;
        if (smoothness) {
            double c = shares.scale(k);
            double max = 0;
            for (int i = 0; i < block.rows; i++) {
                max = Math.max(max, c * data.sampleSmoothness(i));
            }
            s.maxSmoothness = max;
        }
        return s.timed(start);
    }

    // ---- one batch at a point (mini-batch rounds) -----------------------------------------------

    /**
     * Draws partition k's b<sub>k</sub> rows of round r with the configured sampling (generator seeded by
     * (seed, r, k)) and sums their gradients at the point.
     *
     * @param total B = Σ b<sub>k</sub>, for the draws' global scales
     */
    static RoundSummary batch(PartitionBlock block, Plan plan, double[] point, long round, int[] allocation,
                              int total, Shares shares) {
        long start = System.nanoTime();
        int k = block.partition;
        Plan.Parts parts = plan.parts();
        LinearObjective data = dataObjective(block, parts.loss(), plan.intercept);
        int b = allocation[k];
        BatchSource source = source(block, parts.sampling(), data, plan.seed, round);
        int[] indices = new int[b];
        double[] scales = new double[b];
        source.next(indices, scales, b);
        RoundSummary s = RoundSummary.of(block, shares.share(k));
        addBatch(s, block, data, parts.sampling(), point, indices, scales, b, total, shares);
        s.draws = b;
        s.evaluations = b;
        return s.timed(start);
    }

    // ---- local runs -------------------------------------------------------------------------------

    /**
     * Round r of local SGD on partition k: the core's {@link Minimizer}, configured from the plan, fits the
     * partition's rows for H steps from the round's parameters h<sub>r</sub>, with seed s(seed, r, k) and the
     * fit's schedule continued from step r·H. The summary holds π<sub>k</sub> h<sub>k</sub> and the first local
     * batch's figures at h<sub>r</sub> (B more evaluations, for the driver's view of the round).
     */
    static RoundSummary localSgd(PartitionBlock block, Plan plan, double[] point, long round, int localSteps,
                                 int batchSize, double stepFactor, int total, Shares shares) {
        long start = System.nanoTime();
        int k = block.partition;
        Plan.Parts parts = plan.parts();
        StepSchedule schedule = ShiftedSchedule.of(parts.schedule(), round * localSteps, stepFactor);
        Minimizer minimizer = Minimizer.builder()
                .loss(parts.loss())
                .penalty(parts.penalty())
                .updateRule(parts.rule())
                .schedule(schedule)
                .sampling(parts.sampling())
                .batchSize(batchSize)
                .maxSteps(localSteps)
                .seed(Seeds.derive(plan.seed, Seeds.FIT, round, k))
                .intercept(plan.intercept)
                .explosionFactor(plan.explosionFactor)
                .build();
        FirstBatch first = new FirstBatch();
        Fit fit;
        try {
            fit = minimizer.fit(block.dataset(), FitOptions.builder().initialParameters(point).listener(first).build());
        } catch (IllegalArgumentException e) {
            throw inPartition(block, e);
        }
        LinearObjective data = dataObjective(block, parts.loss(), plan.intercept);
        RoundSummary s = RoundSummary.of(block, shares.share(k));
        if (first.length > 0) {
            addBatch(s, block, data, parts.sampling(), point, first.indices, first.scales, first.length, total, shares);
        }
        s.addLocal(shares.share(k), fit.parameters(), fit.finalObjective());
        s.draws = fit.steps() * batchSize;
        s.evaluations = fit.gradientEvaluations() + first.length;
        if (fit.stopReason() == StopReason.DIVERGED) {
            s.divergence = "partition " + k + ": " + fit.stopDetail();
        }
        return s.timed(start);
    }

    /**
     * Round r of distributed SVRG on partition k: m inner steps from the anchor h̃ = h<sub>r</sub> along
     * v = ĝ<sub>k</sub>(h) − ĝ<sub>k</sub>(h̃) + μ, with μ = ∇L(h̃) the full gradient of all the data (aggregated
     * before), batches drawn with seed s(seed, r, k), h ← prox<sub>εR</sub>(h − ε v) (Johnson &amp; Zhang, NIPS
     * 2013, with the anchor gradient of the whole data and local inner loops as in the distributed variants
     * of Lee, Lin, Ma &amp; Yang, JMLR 18, 2017, from memory). At h = h̃ the direction is μ itself, and at the
     * optimum every inner step is zero, so the rounds have no noise floor.
     *
     * @param anchorGradient μ, including the penalty's smooth part; read only
     */
    static RoundSummary localSvrg(PartitionBlock block, Plan plan, double[] anchor, double[] anchorGradient,
                                  long round, int innerSteps, int batchSize, double stepFactor, int total,
                                  Shares shares) {
        long start = System.nanoTime();
        int k = block.partition;
        Plan.Parts parts = plan.parts();
        LinearObjective objective;
        try {
            objective = LinearObjective.of(block.dataset(), parts.loss(), parts.penalty(), plan.intercept);
        } catch (IllegalArgumentException e) {
            throw inPartition(block, e);
        }
        LinearObjective data = dataObjective(block, parts.loss(), plan.intercept);
        parts.sampling().checkBatchSize(batchSize, block.rows);
        BatchSource source = source(block, parts.sampling(), data, plan.seed, round);
        StepSchedule schedule = ShiftedSchedule.of(parts.schedule(), round * innerSteps, stepFactor);
        int p = anchor.length;
        double[] h = anchor.clone();
        double[] g = new double[p];
        double[] gAnchor = new double[p];
        int[] indices = new int[batchSize];
        double[] scales = new double[batchSize];
        int[] firstIndices = null;
        double[] firstScales = null;
        String divergence = null;
        long steps = 0;
        for (int t = 0; t < innerSteps; t++) {
            source.next(indices, scales, batchSize);
            if (t == 0) {
                firstIndices = indices.clone();
                firstScales = scales.clone();
            }
            double[] sc = source.uniformScales() ? null : scales;
            double loss = objective.batchGradient(h, indices, sc, 0, batchSize, g);
            objective.batchGradient(anchor, indices, sc, 0, batchSize, gAnchor);
            double eps = schedule.stepSize(t);
            for (int j = 0; j < p; j++) {
                h[j] -= eps * (g[j] - gAnchor[j] + anchorGradient[j]);
            }
            objective.proximalStep(h, eps);
            steps++;
            if (!Double.isFinite(loss) || ((t & 15) == 15 || t == innerSteps - 1) && !finite(h)) {
                divergence = "partition " + k + ": the inner SVRG steps became non-finite by step " + t
                        + " of round " + round;
                System.arraycopy(anchor, 0, h, 0, p);
                break;
            }
        }
        RoundSummary s = RoundSummary.of(block, shares.share(k));
        addBatch(s, block, data, parts.sampling(), anchor, firstIndices, firstScales, batchSize, total, shares);
        s.addLocal(shares.share(k), h, Double.NaN);
        s.draws = steps * batchSize;
        s.evaluations = 2 * steps * batchSize + batchSize;
        s.divergence = divergence;
        return s.timed(start);
    }

    // ---- probes -----------------------------------------------------------------------------------

    /** Per-row gradients (row-major) and losses of one partition's part of a batch, on the global scale. */
    record SampleRows(int partition, double[] rows, double[] losses) implements Serializable {
    }

    /**
     * The unscaled data gradients c<sub>k</sub> ∇(ω<sup>k</sup><sub>i</sub> ℓ<sub>i</sub>)(h) and losses
     * c<sub>k</sub> ω<sup>k</sup><sub>i</sub> ℓ<sub>i</sub>(h) of the given rows of the partition, in the order given.
     */
    static SampleRows sampleRows(PartitionBlock block, Plan plan, double[] point, int[] indices, Shares shares) {
        LinearObjective data = dataObjective(block, plan.parts().loss(), plan.intercept);
        int p = point.length;
        double c = shares.scale(block.partition);
        double[] rows = new double[indices.length * p];
        double[] losses = new double[indices.length];
        double[] row = new double[p];
        for (int r = 0; r < indices.length; r++) {
            Arrays.fill(row, 0.0);
            losses[r] = c * data.addSampleGradient(point, indices[r], c, row);
            System.arraycopy(row, 0, rows, r * p, p);
        }
        return new SampleRows(block.partition, rows, losses);
    }

    /**
     * Sums c<sub>k</sub> ∇(ω<sup>k</sup><sub>i</sub> ℓ<sub>i</sub>)(h) and the losses over {@code counts[k]} rows drawn
     * uniformly with replacement from the partition (generator seeded by the probe stream).
     */
    static RoundSummary independent(PartitionBlock block, Plan plan, double[] point, int[] counts, long call,
                                    Shares shares) {
        int k = block.partition;
        LinearObjective data = dataObjective(block, plan.parts().loss(), plan.intercept);
        RandomGenerator rng = Seeds.samplerGenerator(Seeds.derive(plan.seed, Seeds.PROBE, call, k + 1));
        double c = shares.scale(k);
        double[] g = new double[point.length];
        double loss = 0;
        for (int m = 0; m < counts[k]; m++) {
            loss += c * data.addSampleGradient(point, rng.nextInt(block.rows), c, g);
        }
        RoundSummary s = RoundSummary.of(block, shares.share(k));
        s.gradient = g;
        s.loss = loss;
        s.evaluations = counts[k];
        return s;
    }

    // ---- shared pieces ----------------------------------------------------------------------------

    /**
     * Adds the batch's figures at the point: ĝ<sub>k</sub> = (1/b) Σ s<sub>j</sub> u<sub>j</sub> with u<sub>j</sub> =
     * ∇(ω<sup>k</sup> ℓ)(h) of the j-th draw, the mean loss, and Σ ‖s<sub>j</sub> u<sub>j</sub>‖², using
     * ‖u‖² = (ω ℓ')² (‖x‖² + 1) for a linear model (b evaluations).
     */
    private static void addBatch(RoundSummary s, PartitionBlock block, LinearObjective data, Sampling sampling,
                                 double[] point, int[] indices, double[] scales, int b, int total, Shares shares) {
        int k = block.partition;
        FeatureMatrix x = data.features();
        double extra = data.hasIntercept() ? 1.0 : 0.0;
        double[] g = new double[point.length];
        double inverse = 1.0 / b;
        double loss = 0;
        double squares = 0;
        for (int m = 0; m < b; m++) {
            int i = indices[m];
            double sc = scales[m];
            double z = data.prediction(point, i);
            double a = sc * data.weightedDerivative(z, i);
            loss += sc * data.weightedLoss(z, i);
            data.addFeatures(i, a * inverse, g);
            squares += a * a * (x.rowSquaredNorm(i) + extra);
        }
        boolean independent = sampling.independentDraws();
        double spread = (double) total * block.rows / ((double) shares.n() * b);
        double[] global = new double[b];
        for (int m = 0; m < b; m++) {
            global[m] = scales[m] * spread;
        }
        double factor = shares.scale(k) * (independent ? spread : 1.0);
        s.addBatch(shares.share(k), g, loss * inverse, squares, b, block.rows, independent, factor,
                new RoundSummary.Batch(k, indices.clone(), global));
    }

    private static BatchSource source(PartitionBlock block, Sampling sampling, LinearObjective data, long seed,
                                      long round) {
        int[] strata = sampling.needsStrata() ? binaryStrata(block, sampling) : null;
        RandomGenerator rng = Seeds.samplerGenerator(Seeds.derive(seed, Seeds.FIT, round, block.partition));
        return sampling.start(SamplingContext.of(block.rows, strata, data::sampleSmoothness), rng);
    }

    /** Strata from binary labels, as the core's minimizer forms them (one stratum when only one class is present). */
    private static int[] binaryStrata(PartitionBlock block, Sampling sampling) {
        int[] strata = new int[block.rows];
        boolean positive = false;
        boolean negative = false;
        for (int i = 0; i < block.rows; i++) {
            double y = block.targets[i];
            if (y != 1 && y != 0 && y != -1) {
                throw new IllegalArgumentException("partition " + block.partition + ", row " + i + ": sampling "
                        + sampling.name() + " needs binary labels to form strata, but target column '"
                        + block.targetColumn + "' holds " + y);
            }
            strata[i] = y > 0 ? 1 : 0;
            positive |= y > 0;
            negative |= y <= 0;
        }
        if (!positive || !negative) {
            Arrays.fill(strata, 0);
        }
        return strata;
    }

    private static LinearObjective dataObjective(PartitionBlock block, dev.riskmin.loss.Loss loss, boolean intercept) {
        try {
            return LinearObjective.of(block.dataset(), loss, Penalty.none(), intercept);
        } catch (IllegalArgumentException e) {
            throw inPartition(block, e);
        }
    }

    private static IllegalArgumentException inPartition(PartitionBlock block, IllegalArgumentException e) {
        return new IllegalArgumentException("partition " + block.partition + " (target column '" + block.targetColumn
                + "', rows counted from 0 within the partition): " + e.getMessage(), e);
    }

    private static boolean finite(double[] v) {
        for (double x : v) {
            if (!Double.isFinite(x)) {
                return false;
            }
        }
        return true;
    }

    /** Records the first local batch of a local run (the only step it looks at). */
    private static final class FirstBatch implements FitListener {
        int length;
        int[] indices;
        double[] scales;

        @Override
        public void step(StepView view, FitControl control) {
            if (view.step() == 0) {
                length = view.batchLength();
                indices = new int[length];
                scales = new double[length];
                for (int m = 0; m < length; m++) {
                    indices[m] = view.batchIndex(m);
                    scales[m] = view.batchScale(m);
                }
            }
        }
    }
}
