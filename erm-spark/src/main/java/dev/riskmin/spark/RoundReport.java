package dev.riskmin.spark;

/**
 * The figures of one round of a distributed fit, computed on the driver from the partitions' summaries
 * at no extra Spark job. NaN marks a figure the round's strategy does not produce. Notation: π<sub>k</sub>
 * the partitions' shares, ĝ<sub>k</sub> partition k's batch gradient at h<sub>r</sub> (data term), ḡ = Σ π<sub>k</sub> ĝ<sub>k</sub>,
 * h<sub>k</sub> its local parameters after the round (local strategies), h̄ = Σ π<sub>k</sub> h<sub>k</sub>.
 *
 * @param round              r, counted from 0
 * @param strategy           the strategy's name
 * @param partitions         the partitions that took part
 * @param batchSize          B, the round's batch summed over partitions (the first local batch of each
 *                           partition under local strategies)
 * @param stepSize           ε at the round's first step (local step r·H under local strategies)
 * @param batchLoss          the batch's mean data loss at h<sub>r</sub>, Σ π<sub>k</sub> (1/b<sub>k</sub>) Σ ω ℓ
 * @param batchGradientNorm  ‖g<sub>B</sub>‖ with the penalty's smooth part, as listeners see it
 * @param noiseTrace         the one-batch trace estimate T = (Σ ‖t<sub>j</sub>‖² − ‖Σ t<sub>j</sub>‖²/B)/(B − 1) of all
 *                           draws on the global scale: tr Σ for independent draws, tr S² otherwise (METHODS §1;
 *                           exact for a self-weighting batch, approximately so with proportional allocation)
 * @param batchMeanVariance  the stratified estimate of E‖ḡ − ∇L<sub>data</sub>‖², Σ π<sub>k</sub>² f<sub>k</sub> T<sub>k</sub>/b<sub>k</sub>
 *                           (Cochran 1977, ch. 5, from memory); NaN when a partition drew one row
 * @param gradientSpread     Σ π<sub>k</sub> ‖ĝ<sub>k</sub> − ḡ‖²: how far the partitions' batch gradients scatter
 *                           (sampling noise plus differences between the partitions' data)
 * @param fullGradientSpread Σ π<sub>k</sub> ‖∇L<sub>k</sub> − ∇L‖² from the full gradients when the round
 *                           aggregated them (SVRG anchor): the partitions' heterogeneity alone
 * @param objective          L(h<sub>r</sub>) when the round aggregated the full gradient, else NaN
 * @param gradientNorm       ‖∇L(h<sub>r</sub>)‖ (smooth part) when known, else NaN
 * @param localModelSpread   Σ π<sub>k</sub> ‖h<sub>k</sub> − h̄‖² (local strategies): how far the local runs drifted apart
 * @param localObjective     Σ π<sub>k</sub> L<sub>k</sub>(h<sub>k</sub>), the local runs' own objectives at their end
 *                           (local SGD, which computes them anyway; NaN otherwise)
 * @param moveNorm           ‖h<sub>r+1</sub> − h<sub>r</sub>‖, 0 when a listener halted the fit this round
 * @param moveCosine         cos(h<sub>r+1</sub> − h<sub>r</sub>, −g<sub>B</sub>): 1 for a plain SGD step without penalty,
 *                           lower as local steps turn away from the round's first gradient
 * @param roundNanos         wall time of the round's Spark jobs on the driver
 * @param slowestPartitionNanos the longest time one partition computed in the round (stragglers show here)
 * @param meanPartitionNanos the mean over partitions of that time
 */
public record RoundReport(long round, String strategy, int partitions, int batchSize, double stepSize,
                          double batchLoss, double batchGradientNorm, double noiseTrace, double batchMeanVariance,
                          double gradientSpread, double fullGradientSpread, double objective, double gradientNorm,
                          double localModelSpread, double localObjective, double moveNorm, double moveCosine, long roundNanos,
                          long slowestPartitionNanos, long meanPartitionNanos) {
}
