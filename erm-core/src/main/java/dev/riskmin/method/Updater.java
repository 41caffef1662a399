package dev.riskmin.method;

/**
 * One fit's update rule in motion. Each step is split in two so that listeners can look at the
 * stochastic gradient before the parameters move:
 * {@link #gradient} evaluates the batch gradient g<sub>B</sub>, then {@link #update} moves h.
 * Not thread-safe; allocation-free per step.
 */
public interface Updater {

    /**
     * Evaluates the stochastic gradient of this step, g<sub>B</sub> = (1/B) Σ<sub>k</sub> s<sub>k</sub> ∇f<sub>i<sub>k</sub></sub>,
     * at the point the rule needs (h itself, or the look-ahead point for Nesterov momentum).
     *
     * @param h        read only: the current parameters
     * @param batch    read only: indices {@code batch[0 .. length)}
     * @param scales   read only per-draw scales, or null when all are one
     * @param gradient written: g<sub>B</sub>
     * @return the batch's mean data loss (1/B) Σ<sub>k</sub> s<sub>k</sub> ω<sub>i</sub> ℓ<sub>i</sub>
     */
    double gradient(double[] h, int[] batch, double[] scales, int length, double[] gradient);

    /**
     * Moves h by one step of size ε, using the gradient of the preceding {@link #gradient} call
     * (and the rule's own state), then applies the proximal step of the penalty's non-smooth part.
     *
     * @param h        read and written
     * @param gradient read only: what {@link #gradient} wrote
     */
    void update(double[] h, double[] gradient, double stepSize);

    /** @return the gradient evaluations (per-sample gradients) this rule has spent so far, in total */
    long gradientEvaluations();
}
