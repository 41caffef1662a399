package dev.riskmin.step;

import dev.riskmin.util.Arguments;

/**
 * Inverse-time decay ε<sub>t</sub> = ε<sub>0</sub>/(1 + λ ε<sub>0</sub> t) (Bottou, "Stochastic gradient
 * descent tricks", <i>Neural Networks: Tricks of the Trade</i>, 2nd ed., LNCS 7700, 2012; METHODS §5).
 * For λ &gt; 0 this equals 1/(λ (t + t<sub>0</sub>)) with t<sub>0</sub> = 1/(λ ε<sub>0</sub>): the
 * 1/(λ t) schedule for a λ-strongly convex objective, shifted so that it starts at ε<sub>0</sub>.
 * Robbins–Monro when λ &gt; 0; with λ = 0 it is the constant ε<sub>0</sub>.
 */
public final class InverseTimeSchedule implements StepSchedule {
    private final double initialStepSize;
    private final double lambda;

    private InverseTimeSchedule(double initialStepSize, double lambda) {
        this.initialStepSize = initialStepSize;
        this.lambda = lambda;
    }

    /**
     * @throws IllegalArgumentException naming initialStepSize unless finite and &gt; 0, or lambda
     *                                  unless finite and ≥ 0
     */
    static InverseTimeSchedule of(double initialStepSize, double lambda) {
        Arguments.positive("initialStepSize", initialStepSize);
        Arguments.nonNegative("lambda", lambda);
        return new InverseTimeSchedule(initialStepSize, lambda);
    }

    @Override
    public double stepSize(long t) {
        Steps.requireStep(t);
        if (t == 0) {
            return initialStepSize; // λ ε0 may overflow to ∞, and ∞ · 0 would be NaN
        }
        return initialStepSize / (1.0 + lambda * initialStepSize * t);
    }

    /** @return whether λ &gt; 0 (Σ 1/t diverges, Σ 1/t² converges) */
    @Override
    public boolean robbinsMonro() {
        return lambda > 0;
    }

    @Override
    public String name() {
        return "inverseTime(initialStepSize=" + initialStepSize + ", lambda=" + lambda + ")";
    }

    @Override
    public String toString() {
        return name();
    }
}
