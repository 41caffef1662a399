package dev.riskmin.hook;

/**
 * Computes, on demand, quantities at the current parameters h<sub>t</sub> that the fit does not
 * need for itself. A listener pays only for what it asks: {@link #sampleGradient} costs one
 * gradient, {@link #fullGradient} n of them. Results go into caller-owned arrays; nothing is
 * allocated except when {@link #independentBatchGradient} is first asked for a larger batch.
 * Probe evaluations are counted apart from the fit's budget.
 */
public interface Probe {

    /**
     * Writes ∇f<sub>i</sub>(h<sub>t</sub>) = ∇(ω<sub>i</sub> ℓ<sub>i</sub>)(h<sub>t</sub>) + ∇R<sub>smooth</sub>(h<sub>t</sub>)
     * for the k-th sample of the current batch (unscaled: multiply by {@link StepView#batchScale} for
     * the term that enters g<sub>B</sub>).
     *
     * @param into written; length ≥ p
     * @return ω<sub>i</sub> ℓ<sub>i</sub>(h<sub>t</sub>)
     */
    double sampleGradient(int k, double[] into);

    /**
     * Writes the full gradient ∇L(h<sub>t</sub>) (smooth part) and returns L(h<sub>t</sub>).
     *
     * @param into written; length ≥ p
     */
    double fullGradient(double[] into);

    /** @return L(h<sub>t</sub>), the full objective (n loss evaluations) */
    double objective();

    /**
     * Draws a fresh batch of {@code size} samples uniformly with replacement, independent of the
     * fit's own sampling (its own generator stream), and writes that batch's mean gradient.
     *
     * @param into written; length ≥ p
     * @return the batch's mean data loss
     */
    double independentBatchGradient(int size, double[] into);

    /** @return whether the fit was given held-out data ({@link dev.riskmin.FitOptions.Builder#heldOut}) */
    boolean hasHeldOut();

    /**
     * @return the mean weighted data loss (1/m) Σ ω<sub>i</sub> ℓ<sub>i</sub>(h<sub>t</sub>) over the m held-out
     * samples, without the penalty (m loss evaluations)
     * @throws IllegalStateException if the fit has no held-out data
     */
    double heldOutLoss();

    /**
     * @return ω<sub>i</sub> ℓ<sub>i</sub>(h<sub>t</sub>), the weighted data loss of sample i at the current
     * parameters (one loss evaluation) — for paired comparisons on a fixed subsample
     * @throws IllegalStateException where the fit cannot evaluate single samples (the default)
     * @throws IndexOutOfBoundsException if i is not in [0, n)
     */
    default double rowLoss(int i) {
        throw new IllegalStateException("this fit's probe cannot evaluate single samples");
    }

    /** @return the probe's gradient evaluations so far in this fit */
    long evaluations();
}
