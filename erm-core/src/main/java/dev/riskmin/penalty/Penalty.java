package dev.riskmin.penalty;

/**
 * A penalty R(w) = R<sub>smooth</sub>(w) + R<sub>prox</sub>(w) on a range of coefficients: the smooth
 * part enters every gradient, the other part is applied by its proximal operator
 * prox<sub>εR</sub>(v) = argmin<sub>u</sub> ½‖u − v‖² + ε R(u) after each step.
 *
 * <p>Every method works on the coefficients {@code w[from .. to)} only: the caller keeps
 * intercepts out of the range, so they are never penalized.
 */
public interface Penalty {

    /** @return R(w) over {@code w[from .. to)} */
    double value(double[] w, int from, int to);

    /**
     * g[j] += scale · ∂R<sub>smooth</sub>/∂w<sub>j</sub> for j in [from, to).
     *
     * @param w read only
     * @param g written
     */
    void addSmoothGradient(double[] w, int from, int to, double scale, double[] g);

    /**
     * Replaces {@code w[from .. to)} by prox<sub>ε R<sub>prox</sub></sub>(w): the proximal step of the
     * non-smooth part only (identity when there is none).
     *
     * @param w    read and written
     * @param step ε ≥ 0
     */
    void proximalStep(double[] w, int from, int to, double step);

    /**
     * Replaces {@code w[from .. to)} by prox<sub>εR</sub>(w) of the whole penalty.
     *
     * @param w    read and written
     * @param step ε ≥ 0
     */
    void fullProximal(double[] w, int from, int to, double step);

    /** @return the strength of the L1 part, λ<sub>1</sub> in λ<sub>1</sub>‖w‖<sub>1</sub> (0 if none) */
    double l1Strength();

    /** @return the strength of the L2 part, λ<sub>2</sub> in (λ<sub>2</sub>/2)‖w‖² (0 if none) */
    double l2Strength();

    /** @return whether R has no non-smooth part, so {@link #proximalStep} is the identity */
    default boolean smooth() {
        return l1Strength() == 0;
    }

    /**
     * @return whether R is exactly λ<sub>1</sub>‖w‖<sub>1</sub> + (λ<sub>2</sub>/2)‖w‖² with the strengths
     * reported above, so that update rules may apply it in closed form (lazily, on sparse data)
     */
    default boolean elasticNetForm() {
        return false;
    }

    /** @return a short name for reports, e.g. "l2(0.01)" */
    String name();

    /** R = 0. */
    static Penalty none() {
        return ElasticNetPenalty.NONE;
    }

    /** R(w) = (λ/2)‖w‖². */
    static Penalty l2(double strength) {
        return ElasticNetPenalty.of(0, strength);
    }

    /** R(w) = λ‖w‖<sub>1</sub>. */
    static Penalty l1(double strength) {
        return ElasticNetPenalty.of(strength, 0);
    }

    /** R(w) = λ<sub>1</sub>‖w‖<sub>1</sub> + (λ<sub>2</sub>/2)‖w‖² (Zou &amp; Hastie 2005). */
    static Penalty elasticNet(double l1Strength, double l2Strength) {
        return ElasticNetPenalty.of(l1Strength, l2Strength);
    }
}
