package dev.riskmin.step;

import dev.riskmin.util.Arguments;

/**
 * Polynomial decay ε<sub>t</sub> = ε<sub>0</sub> (1 + t/t<sub>0</sub>)<sup>−p</sup>. It meets the
 * Robbins–Monro conditions Σ ε<sub>t</sub> = ∞ and Σ ε<sub>t</sub>² &lt; ∞ (Robbins &amp; Monro,
 * Ann. Math. Statist. 22:400–407, 1951) exactly when p ∈ (½, 1]: p ≤ ½ makes Σ ε<sub>t</sub>²
 * diverge, p &gt; 1 makes Σ ε<sub>t</sub> converge (METHODS §5). Powers in (½, 1) are the ones
 * Polyak–Ruppert averaging wants (METHODS §6).
 */
public final class PolynomialSchedule implements StepSchedule {
    private final double initialStepSize;
    private final double t0;
    private final double power;

    private PolynomialSchedule(double initialStepSize, double t0, double power) {
        this.initialStepSize = initialStepSize;
        this.t0 = t0;
        this.power = power;
    }

    /**
     * @throws IllegalArgumentException naming initialStepSize or t0 unless finite and &gt; 0, or
     *                                  power unless finite and ≥ 0
     */
    static PolynomialSchedule of(double initialStepSize, double t0, double power) {
        Arguments.positive("initialStepSize", initialStepSize);
        Arguments.positive("t0", t0);
        Arguments.nonNegative("power", power);
        return new PolynomialSchedule(initialStepSize, t0, power);
    }

    @Override
    public double stepSize(long t) {
        Steps.requireStep(t);
        return initialStepSize * Math.pow(1.0 + t / t0, -power);
    }

    /** @return whether ½ &lt; p ≤ 1 */
    @Override
    public boolean robbinsMonro() {
        return power > 0.5 && power <= 1.0;
    }

    @Override
    public String name() {
        return "polynomial(initialStepSize=" + initialStepSize + ", t0=" + t0 + ", power=" + power + ")";
    }

    @Override
    public String toString() {
        return name();
    }
}
