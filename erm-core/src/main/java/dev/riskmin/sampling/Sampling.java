package dev.riskmin.sampling;

import java.util.random.RandomGenerator;

/**
 * How batches are drawn: an immutable, thread-safe configuration that starts one
 * {@link BatchSource} per fit.
 */
public interface Sampling {

    /**
     * @param rng the fit's generator for sampling (the source keeps it; the caller must not share it)
     * @throws IllegalArgumentException if the context lacks what this sampling needs (e.g. strata),
     *                                  with a message naming what is missing
     */
    BatchSource start(SamplingContext context, RandomGenerator rng);

    /**
     * @throws IllegalArgumentException naming the batch size if this sampling cannot draw batches of
     *                                  that size from n samples (e.g. B &gt; n without replacement)
     */
    default void checkBatchSize(int batchSize, int n) {
    }

    /**
     * @return whether draws are independent and identically distributed (with replacement or by
     * importance), so that the variance of a batch mean carries no finite-population correction
     */
    default boolean independentDraws() {
        return false;
    }

    /** @return whether this sampling needs strata in its context */
    default boolean needsStrata() {
        return false;
    }

    /** @return a short name for reports */
    String name();

    /** @return uniform draws with replacement, i.i.d. on {0, …, n−1} (see {@link WithReplacementSampling}) */
    static Sampling withReplacement() {
        return WithReplacementSampling.INSTANCE;
    }

    /**
     * @return uniform draws without replacement: a fresh random permutation each epoch, batches taken
     * as consecutive runs of it (see {@link WithoutReplacementSampling}); needs B ≤ n
     */
    static Sampling withoutReplacement() {
        return WithoutReplacementSampling.INSTANCE;
    }

    /**
     * @return sampling without replacement that keeps memory locality: each epoch, a random rotation,
     * a random order of blocks of {@value BlockShuffledSampling#DEFAULT_BLOCK_ROWS} consecutive rows
     * and a random order of rows within each block; every draw is uniform and every sample is drawn
     * once per epoch, but rows of one block tend to share a batch (see {@link BlockShuffledSampling});
     * needs B ≤ n
     */
    static Sampling blockShuffled() {
        return BlockShuffledSampling.of(BlockShuffledSampling.DEFAULT_BLOCK_ROWS);
    }

    /**
     * @param blockRows m ≥ 1, the consecutive rows per block (1 gives plain sampling without replacement)
     * @return block-shuffled sampling without replacement with blocks of m rows (see {@link BlockShuffledSampling})
     * @throws IllegalArgumentException naming blockRows if it is below 1
     */
    static Sampling blockShuffled(int blockRows) {
        return BlockShuffledSampling.of(blockRows);
    }

    /**
     * @return stratified draws: each batch keeps every stratum within ±1 of its proportional count,
     * without replacement inside a stratum (see {@link StratifiedSampling}); needs strata and B ≤ n
     */
    static Sampling stratified() {
        return StratifiedSampling.INSTANCE;
    }

    /**
     * @return importance sampling by per-sample smoothness with uniform share ½:
     * p<sub>i</sub> = 1/(2n) + L<sub>i</sub>/(2 Σ L), scales 1/(n p<sub>i</sub>) (see {@link ImportanceSampling})
     */
    static Sampling importance() {
        return ImportanceSampling.of(ImportanceSampling.DEFAULT_UNIFORM_SHARE);
    }

    /**
     * @param uniformShare u in (0, 1]: p<sub>i</sub> = u/n + (1 − u) L<sub>i</sub>/Σ L (1 means uniform)
     * @return importance sampling by per-sample smoothness (see {@link ImportanceSampling})
     * @throws IllegalArgumentException naming uniformShare if it is outside (0, 1] or NaN
     */
    static Sampling importance(double uniformShare) {
        return ImportanceSampling.of(uniformShare);
    }

    /** @return the samples in storage order 0, 1, …, n−1, 0, 1, …, without randomness (see {@link SequentialSampling}) */
    static Sampling sequential() {
        return SequentialSampling.INSTANCE;
    }
}
