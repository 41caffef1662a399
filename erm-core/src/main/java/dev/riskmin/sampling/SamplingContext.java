package dev.riskmin.sampling;

import java.util.function.IntToDoubleFunction;

/**
 * What a sampler may know about the data: n, the strata (or null), and per-sample smoothness
 * constants L<sub>i</sub> (for importance sampling; +∞ where unknown).
 */
public final class SamplingContext {
    private final int size;
    private final int[] strata;
    private final IntToDoubleFunction smoothness;

    private SamplingContext(int size, int[] strata, IntToDoubleFunction smoothness) {
        this.size = size;
        this.strata = strata;
        this.smoothness = smoothness;
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
        return new SamplingContext(size, strata, smoothness);
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
