package dev.riskmin.sampling;

import dev.riskmin.util.Arguments;
import java.util.function.IntToDoubleFunction;

/**
 * What a sampler may know about the data: n, the strata (or null), per-sample smoothness
 * constants L<sub>i</sub> (for importance sampling; +∞ where unknown), and optionally a
 * {@link RowPrefetcher} that samplers visiting storage in runs of rows may call.
 */
public final class SamplingContext {
    private final int size;
    private final int[] strata;
    private final IntToDoubleFunction smoothness;
    private final RowPrefetcher prefetcher; // null: none

    private SamplingContext(int size, int[] strata, IntToDoubleFunction smoothness, RowPrefetcher prefetcher) {
        this.size = size;
        this.strata = strata;
        this.smoothness = smoothness;
        this.prefetcher = prefetcher;
    }

    /**
     * @param size       n ≥ 1
     * @param strata     read only (not copied; must not change during the fit), values 0..S−1; or null
     * @param smoothness L<sub>i</sub> for sample i; or null when unknown
     */
    public static SamplingContext of(int size, int[] strata, IntToDoubleFunction smoothness) {
        if (size < 1) {
            throw new IllegalArgumentException("sample count (" + size + ") must be >= 1");
        }
        if (strata != null && strata.length != size) {
            throw new IllegalArgumentException("strata have " + strata.length + " entries, expected " + size);
        }
        return new SamplingContext(size, strata, smoothness, null);
    }

    /**
     * @param value reads rows [from, to) of the training data ahead of their use (see
     *              {@link RowPrefetcher}); only samplers that visit storage in runs call it
     * @return a copy of this context with that prefetcher
     */
    public SamplingContext withPrefetcher(RowPrefetcher value) {
        return new SamplingContext(size, strata, smoothness, Arguments.notNull("prefetcher", value));
    }

    /** @return the prefetcher given by {@link #withPrefetcher}, or null */
    public RowPrefetcher prefetcher() {
        return prefetcher;
    }

    /** @return n */
    public int size() {
        return size;
    }

    /** @return the strata (read only), or null */
    public int[] strata() {
        return strata;
    }

    /** @return L<sub>i</sub>, or +∞ when unknown */
    public double smoothness(int i) {
        return smoothness == null ? Double.POSITIVE_INFINITY : smoothness.applyAsDouble(i);
    }
}
