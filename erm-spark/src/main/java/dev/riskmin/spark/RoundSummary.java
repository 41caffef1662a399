package dev.riskmin.spark;

import java.io.Serializable;
import java.util.ArrayList;
import java.util.List;

/**
 * What the partitions report about one round, combined by tree aggregation: each partition k fills a
 * fresh summary with its own figures weighted by its share π<sub>k</sub> = W<sub>k</sub>/W, and
 * {@link #merge} adds summaries. Every combined figure is a sum over partitions, so the tree's shape
 * changes nothing but rounding (and the tree adds in partition order, so not even that from run to run),
 * and the driver receives O(p) numbers per node of the tree's top level however many partitions there
 * are (plus the batch's indices, B numbers).
 *
 * <p>Gradients here are of the data term only (the driver adds the penalty's smooth part). With
 * ĝ<sub>k</sub> partition k's gradient (its batch mean, or its full mean), the summary holds
 * Σ π<sub>k</sub> ĝ<sub>k</sub> (the combined gradient), Σ π<sub>k</sub> ‖ĝ<sub>k</sub>‖² (so the driver gets the
 * spread Σ π<sub>k</sub> ‖ĝ<sub>k</sub> − ḡ‖² = Σ π<sub>k</sub> ‖ĝ<sub>k</sub>‖² − ‖ḡ‖² without seeing any ĝ<sub>k</sub>),
 * the same two sums for the local parameters h<sub>k</sub> of local strategies, the per-sample sums
 * behind the noise estimates, and counts.
 *
 * <p>A merge adopts the arrays of the first summary that has them rather than adding them to zeros,
 * so that one partition's figures come through bit for bit (0 + x is not x when x is −0).
 */
final class RoundSummary implements Serializable {
    private static final long serialVersionUID = 1L;

    int partitions;
    long rows;
    double shareSum;
    long draws;
    long evaluations;

    double[] gradient;
    double gradientSquares;
    double loss;

    long batchCount;
    double[] pooledSum;
    double pooledSquares;
    double stratifiedVariance;
    boolean varianceDefined = true;

    double[] parameters;
    double parameterSquares;
    double localObjective;

    double maxSmoothness = Double.NEGATIVE_INFINITY;
    List<Batch> batches = new ArrayList<>();
    String divergence;
    long slowestNanos;
    long totalNanos;

    /** A partition's part of the round's batch: local row indices and the global scale of each draw. */
    record Batch(int partition, int[] indices, double[] scales) implements Serializable {
    }

    /** Starts one partition's summary. */
    static RoundSummary of(PartitionBlock block, double share) {
        RoundSummary s = new RoundSummary();
        s.partitions = 1;
        s.rows = block.rows;
        s.shareSum = share;
        return s;
    }

    /**
     * Adds π<sub>k</sub> ĝ<sub>k</sub> and π<sub>k</sub> ‖ĝ<sub>k</sub>‖² and π<sub>k</sub> times the mean loss.
     *
     * @param g ĝ<sub>k</sub>, read only
     */
    void addGradient(double share, double[] g, double meanLoss) {
        double[] scaled = new double[g.length];
        double squares = 0;
        for (int j = 0; j < g.length; j++) {
            scaled[j] = share * g[j];
            squares += g[j] * g[j];
        }
        gradient = scaled;
        gradientSquares = share * squares;
        loss = share * meanLoss;
    }

    /**
     * Adds a partition's batch: its mean gradient ĝ<sub>k</sub> = (1/b) Σ s<sub>j</sub> u<sub>j</sub> and the
     * per-sample sums for the noise. With T<sub>k</sub> = (Σ ‖s<sub>j</sub>u<sub>j</sub>‖² − b‖ĝ<sub>k</sub>‖²)/(b − 1),
     * the stratified variance of the combined gradient gains π<sub>k</sub>² f T<sub>k</sub>/b, with f = 1 for
     * independent draws and the finite-population factor 1 − b/n<sub>k</sub> otherwise (Cochran, <i>Sampling
     * Techniques</i>, 3rd ed., Wiley 1977, ch. 5, chapter from memory; METHODS §1). The pooled sums are of
     * the per-draw terms t<sub>j</sub> on the global scale (c<sub>k</sub> u<sub>j</sub>, times the draw's global
     * scale for independent draws), from which the driver forms the one-batch trace estimate of all draws.
     *
     * @param g       ĝ<sub>k</sub>, read only
     * @param squares Σ ‖s<sub>j</sub> u<sub>j</sub>‖²
     * @param drawFactor the factor F<sub>k</sub> with t<sub>j</sub> = F<sub>k</sub> s<sub>j</sub> u<sub>j</sub>
     */
    void addBatch(double share, double[] g, double meanLoss, double squares, int b, int rowsInPartition,
                  boolean independent, double drawFactor, Batch batch) {
        double normSquared = 0;
        double[] pooled = new double[g.length];
        for (int j = 0; j < g.length; j++) {
            normSquared += g[j] * g[j];
            pooled[j] = drawFactor * b * g[j];
        }
        addGradient(share, g, meanLoss);
        batchCount = b;
        pooledSum = pooled;
        pooledSquares = drawFactor * drawFactor * squares;
        if (b >= 2) {
            double t = Math.max(0.0, (squares - b * normSquared) / (b - 1));
            double f = independent ? 1.0 : 1.0 - (double) b / rowsInPartition;
            stratifiedVariance = share * share * f * t / b;
        } else if (b >= rowsInPartition && !independent) {
            stratifiedVariance = 0.0; // every row drawn: no sampling variance
        } else {
            varianceDefined = false;
        }
        batches.add(batch);
    }

    /** Adds π<sub>k</sub> h<sub>k</sub>, π<sub>k</sub> ‖h<sub>k</sub>‖² and π<sub>k</sub> L<sub>k</sub>(h<sub>k</sub>). */
    void addLocal(double share, double[] local, double objective) {
        double[] scaled = new double[local.length];
        double squares = 0;
        for (int j = 0; j < local.length; j++) {
            scaled[j] = share * local[j];
            squares += local[j] * local[j];
        }
        parameters = scaled;
        parameterSquares = share * squares;
        localObjective = share * objective;
    }

    /** Adds another summary into this one and returns this one (the other may be reused). */
    RoundSummary merge(RoundSummary o) {
        partitions += o.partitions;
        rows += o.rows;
        shareSum += o.shareSum;
        draws += o.draws;
        evaluations += o.evaluations;
        gradient = sum(gradient, o.gradient);
        gradientSquares += o.gradientSquares;
        loss += o.loss;
        batchCount += o.batchCount;
        pooledSum = sum(pooledSum, o.pooledSum);
        pooledSquares += o.pooledSquares;
        stratifiedVariance += o.stratifiedVariance;
        varianceDefined &= o.varianceDefined;
        parameters = sum(parameters, o.parameters);
        parameterSquares += o.parameterSquares;
        localObjective += o.localObjective;
        maxSmoothness = Math.max(maxSmoothness, o.maxSmoothness);
        batches.addAll(o.batches);
        if (divergence == null) {
            divergence = o.divergence;
        }
        slowestNanos = Math.max(slowestNanos, o.slowestNanos);
        totalNanos += o.totalNanos;
        return this;
    }

    private static double[] sum(double[] a, double[] b) {
        if (a == null) {
            return b;
        }
        if (b == null) {
            return a;
        }
        for (int j = 0; j < a.length; j++) {
            a[j] += b[j];
        }
        return a;
    }

    /** Records how long the partition's work took (the slowest and the total over partitions). */
    RoundSummary timed(long startNanos) {
        long spent = System.nanoTime() - startNanos;
        slowestNanos = spent;
        totalNanos = spent;
        return this;
    }
}
