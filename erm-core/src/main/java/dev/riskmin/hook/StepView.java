package dev.riskmin.hook;

/**
 * A read-only view of the fit at one step t: parameters h<sub>t</sub>, the batch i<sub>1..B</sub>
 * with per-draw scales, the stochastic gradient g<sub>B</sub> and the step size ε<sub>t</sub> about
 * to be applied. Valid only during the listener call that received it; copy what must outlive it.
 */
public interface StepView {

    /** @return t, the number of steps completed before this one (0 at the first step) */
    long step();

    /** @return the epoch this step belongs to: ⌊draws before this step / n⌋ */
    int epoch();

    /** @return the samples drawn so far (B per step) */
    long draws();

    /** @return n */
    int sampleCount();

    /** @return p */
    int dimension();

    /** @return ε<sub>t</sub>, including any scaling a listener asked for */
    double stepSize();

    /** @return the batch's mean data loss (1/B) Σ s<sub>k</sub> ω<sub>i</sub> ℓ<sub>i</sub>(h<sub>t</sub>) */
    double batchLoss();

    /** @return B */
    int batchLength();

    /** @return i<sub>k</sub>, the k-th sample of the batch */
    int batchIndex(int k);

    /** @return s<sub>k</sub>, the k-th draw's unbiasing scale (1 for uniform sampling) */
    double batchScale(int k);

    /** @return h<sub>t,j</sub> */
    double parameter(int j);

    /** Copies h<sub>t</sub> into {@code into} (written; length ≥ p). */
    void copyParameters(double[] into);

    /** @return g<sub>B,j</sub> (for Nesterov momentum, evaluated at the look-ahead point) */
    double batchGradient(int j);

    /** Copies g<sub>B</sub> into {@code into} (written; length ≥ p). */
    void copyBatchGradient(double[] into);

    /** @return per-sample gradient evaluations spent by the update rule so far */
    long gradientEvaluations();

    /** @return nanoseconds since the fit started */
    long elapsedNanos();

    /** @return the on-demand probe at h<sub>t</sub> */
    Probe probe();
}
