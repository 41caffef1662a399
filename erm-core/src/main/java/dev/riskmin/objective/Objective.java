package dev.riskmin.objective;

import dev.riskmin.penalty.Penalty;

/**
 * The empirical risk plus penalty over a parameter vector h of length p:
 * L(h) = (1/n) Σ<sub>i</sub> ω<sub>i</sub> ℓ<sub>i</sub>(h) + R(h), with normalized sample weights
 * ω<sub>i</sub> (mean one; all one when unweighted). Per METHODS (notation), the sample function is
 * f<sub>i</sub>(h) = ω<sub>i</sub> ℓ<sub>i</sub>(h) + R<sub>smooth</sub>(h), so that the mean of the
 * f<sub>i</sub> is L minus the non-smooth part of R, which is applied by {@link #proximalStep}.
 *
 * <p>All gradient methods write into caller-owned arrays of length {@link #dimension()} and allocate
 * nothing. Penalties never touch intercepts.
 *
 * <p>Not thread-safe: an objective keeps scratch buffers; use one instance per thread.
 */
public interface Objective {

    /** @return n, the number of samples */
    int size();

    /** @return p, the number of parameters */
    int dimension();

    /** @return ω<sub>i</sub> ℓ<sub>i</sub>(h), the weighted loss of sample i (no penalty) */
    double sampleLoss(double[] h, int i);

    /**
     * g += scale · ∇(ω<sub>i</sub> ℓ<sub>i</sub>)(h): the gradient of sample i's weighted loss, no penalty.
     *
     * @param h read only
     * @param g written (accumulated into)
     * @return ω<sub>i</sub> ℓ<sub>i</sub>(h)
     */
    double addSampleGradient(double[] h, int i, double scale, double[] g);

    /**
     * g = (1/B) Σ<sub>k</sub> s<sub>k</sub> ∇(ω<sub>i<sub>k</sub></sub> ℓ<sub>i<sub>k</sub></sub>)(h) + ∇R<sub>smooth</sub>(h)
     * over the batch i<sub>k</sub> = {@code batch[from + k]}, k &lt; B = {@code length}, with per-draw
     * scales s<sub>k</sub> = {@code scales[from + k]} (all one when {@code scales} is null; importance
     * sampling passes 1/(n p<sub>i</sub>) here to keep the estimate unbiased).
     *
     * @param h      read only
     * @param batch  read only
     * @param scales read only, or null
     * @param g      written (overwritten)
     * @return (1/B) Σ<sub>k</sub> s<sub>k</sub> ω<sub>i<sub>k</sub></sub> ℓ<sub>i<sub>k</sub></sub>(h), the batch's data loss
     */
    double batchGradient(double[] h, int[] batch, double[] scales, int from, int length, double[] g);

    /** @return (1/n) Σ<sub>i</sub> ω<sub>i</sub> ℓ<sub>i</sub>(h), the data term alone (no penalty; n loss evaluations) */
    default double dataLoss(double[] h) {
        int n = size();
        double sum = 0;
        for (int i = 0; i < n; i++) {
            sum += sampleLoss(h, i);
        }
        return sum / n;
    }

    /** @return L(h), the data term plus the whole penalty */
    double value(double[] h);

    /**
     * g = ∇ of the data term + ∇R<sub>smooth</sub>(h): the full gradient over all n samples.
     *
     * @param g written (overwritten)
     * @return L(h), including the whole penalty
     */
    double gradient(double[] h, double[] g);

    /** @return the penalty (applied to coefficients only) */
    Penalty penalty();

    /** @return R(h) over the penalized coordinates */
    double penaltyValue(double[] h);

    /** g += scale · ∇R<sub>smooth</sub>(h) on the penalized coordinates. */
    void addPenaltyGradient(double[] h, double scale, double[] g);

    /** h ← prox of step · R<sub>prox</sub> on the penalized coordinates (identity for smooth penalties). */
    void proximalStep(double[] h, double step);

    /** h ← prox of step · R (the whole penalty) on the penalized coordinates. */
    void fullProximalStep(double[] h, double step);

    /** @return whether coordinate j is penalized (false for intercepts) */
    boolean penalized(int j);

    /**
     * @return L<sub>i</sub>, a Lipschitz constant of ∇(ω<sub>i</sub> ℓ<sub>i</sub>) (without the penalty):
     * β ω<sub>i</sub> (‖x<sub>i</sub>‖² + 1) for a linear model with intercept; +∞ if unknown
     */
    double sampleSmoothness(int i);

    /** @return the linear structure of a single-output linear model, or null for other objectives */
    default LinearStructure linearStructure() {
        return null;
    }
}
