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

    /**
     * @return whether this updater keeps the parameters in its own (lazy) form: then {@link #gradient}
     * ignores its {@code h} and leaves {@code gradient} unwritten, {@link #update} ignores both arrays,
     * and the caller must call {@link #materialize} before reading h and {@link #fillGradient} before
     * reading g<sub>B</sub>. Sparse fast paths do this so that a step costs O(non-zeros), not O(p).
     */
    default boolean lazy() {
        return false;
    }

    /** Writes the current parameters into h (lazy updaters only; O(p)). */
    default void materialize(double[] h) {
    }

    /** Writes the last step's g<sub>B</sub> into {@code gradient} (lazy updaters only; O(p + B·row)). */
    default void fillGradient(double[] gradient) {
    }

    /**
     * @return about how many parameter entries one step of batch size B touches (p for dense
     * updaters); the fit loop spaces its O(p) finiteness checks by p over this figure
     */
    default long touchedPerStep(int batchSize) {
        return Long.MAX_VALUE;
    }
}
