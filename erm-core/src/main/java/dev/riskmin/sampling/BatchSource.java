package dev.riskmin.sampling;

/**
 * One fit's stream of batches. Not thread-safe; allocation-free in {@link #next}.
 */
public interface BatchSource {

    /**
     * Draws the next batch: sample indices into {@code batch[0 .. size)} and per-draw scales into
     * {@code scales[0 .. size)}. The scales s<sub>k</sub> make the scaled batch mean an unbiased
     * estimate of the full mean: E[(1/B) Σ<sub>k</sub> s<sub>k</sub> g<sub>i<sub>k</sub></sub>] = (1/n) Σ<sub>i</sub> g<sub>i</sub>
     * (all 1 for uniform sampling; 1/(n p<sub>i</sub>) for importance sampling).
     *
     * @param batch  written
     * @param scales written
     * @param size   B ≥ 1 (may change between calls when a listener asks for another batch size)
     */
    void next(int[] batch, double[] scales, int size);

    /** @return whether every scale is 1, so callers may skip them */
    boolean uniformScales();
}
