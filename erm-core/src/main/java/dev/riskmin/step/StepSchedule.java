package dev.riskmin.step;

/**
 * A step-size schedule ε<sub>t</sub> for steps t = 0, 1, 2, … . Implementations are immutable and
 * thread-safe; {@link #stepSize} must be allocation-free and return a finite ε ≥ 0.
 */
@FunctionalInterface
public interface StepSchedule {

    /** @return ε<sub>t</sub> */
    double stepSize(long t);

    /**
     * @return whether Σ ε<sub>t</sub> = ∞ and Σ ε<sub>t</sub>² &lt; ∞ (Robbins &amp; Monro, Ann. Math. Statist.
     * 22:400–407, 1951), the conditions under which SGD converges to a minimizer rather than to a
     * noise ball around it; false unless a schedule knows it holds
     */
    default boolean robbinsMonro() {
        return false;
    }

    /** @return the schedule with every step multiplied by {@code factor} (used by calibration) */
    default StepSchedule scaled(double factor) {
        StepSchedule self = this;
        return new StepSchedule() {
            @Override
            public double stepSize(long t) {
                return factor * self.stepSize(t);
            }

            @Override
            public boolean robbinsMonro() {
                return self.robbinsMonro();
            }

            @Override
            public String name() {
                return factor + " x " + self.name();
            }
        };
    }

    /** @return a short name for reports */
    default String name() {
        return "custom";
    }
}
