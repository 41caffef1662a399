package dev.riskmin.hook;

/**
 * What a fit is about to do: sizes, the configuration's names, and the budget.
 *
 * @param sampleCount     n
 * @param dimension       p, the number of parameters
 * @param batchSize       the starting B
 * @param withReplacement whether batches are drawn with replacement (false: without, stratified or sequential)
 * @param loss            the loss's name
 * @param penalty         the penalty's name
 * @param updateRule      the update rule's name
 * @param schedule        the step schedule's name
 * @param sampling        the sampling's name
 * @param plannedSteps    the step budget implied by the step and epoch budgets, or -1 if none
 * @param seed            the seed of every random choice of the fit
 * @param varianceReduced whether the update rule corrects its steps with control variates (SVRG, SAGA),
 *                        so that gradient noise does not set a floor on the accuracy
 * @param heldOut         whether the fit was given held-out data ({@link Probe#heldOutLoss()} works)
 * @param largestSmoothness L<sub>max</sub> = max<sub>i</sub> L<sub>i</sub> + λ<sub>2</sub>, the largest per-sample
 *                        smoothness constant plus the L2 strength (1/L<sub>max</sub> is a safe plain-SGD step);
 *                        +∞ for losses without one, NaN when not computed
 */
public record RunInfo(int sampleCount, int dimension, int batchSize, boolean withReplacement, String loss,
                      String penalty, String updateRule, String schedule, String sampling, long plannedSteps,
                      long seed, boolean varianceReduced, boolean heldOut,
                      double largestSmoothness) {
}
