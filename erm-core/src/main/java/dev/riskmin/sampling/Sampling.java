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

    /** @return whether this sampling needs strata in its context */
    default boolean needsStrata() {
        return false;
    }

    /** @return a short name for reports */
    String name();
}
