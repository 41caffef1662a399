package dev.riskmin.sampling;

/**
 * A way for a sampler that visits storage in runs of consecutive rows to bring the next run closer
 * to the processor before its rows are read in a random order: a sequential read of rows
 * [from, to), which the hardware's stream prefetcher turns into a few long memory transfers,
 * after which the randomly ordered reads of those rows hit the cache. It changes only when data
 * are read, never what is computed. (Common practice, no source.)
 *
 * <p>Supplied by whoever owns the data (the {@code Minimizer} passes its objective's) through
 * {@link SamplingContext#withPrefetcher}; must be allocation-free and cheap compared with
 * processing the rows.
 */
@FunctionalInterface
public interface RowPrefetcher {

    /** Reads rows [from, to) of the training data sequentially; 0 ≤ from ≤ to ≤ n. */
    void prefetch(int from, int to);
}
