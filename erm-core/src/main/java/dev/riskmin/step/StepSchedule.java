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

    /**
     * @return ε<sub>t</sub> = stepSize (see {@link ConstantSchedule})
     * @throws IllegalArgumentException naming stepSize unless it is finite and &gt; 0
     */
    static StepSchedule constant(double stepSize) {
        return ConstantSchedule.of(stepSize);
    }

    /**
     * @return ε<sub>t</sub> = ε<sub>0</sub>/(1 + λ ε<sub>0</sub> t) (Bottou 2012; see {@link InverseTimeSchedule})
     * @throws IllegalArgumentException naming initialStepSize unless finite and &gt; 0, or lambda unless finite and ≥ 0
     */
    static StepSchedule inverseTime(double initialStepSize, double lambda) {
        return InverseTimeSchedule.of(initialStepSize, lambda);
    }

    /**
     * @return ε<sub>t</sub> = ε<sub>0</sub> (1 + t/t<sub>0</sub>)<sup>−p</sup>, Robbins–Monro iff p ∈ (½, 1]
     * (see {@link PolynomialSchedule})
     * @throws IllegalArgumentException naming initialStepSize or t0 unless finite and &gt; 0, or power unless finite and ≥ 0
     */
    static StepSchedule polynomial(double initialStepSize, double t0, double power) {
        return PolynomialSchedule.of(initialStepSize, t0, power);
    }

    /**
     * @return ε<sub>t</sub> = ε<sub>0</sub> factor<sup>⌊t/every⌋</sup> (see {@link StepDecaySchedule})
     * @throws IllegalArgumentException naming initialStepSize unless finite and &gt; 0, factor unless in (0, 1], or every unless ≥ 1
     */
    static StepSchedule stepDecay(double initialStepSize, double factor, long every) {
        return StepDecaySchedule.of(initialStepSize, factor, every);
    }

    /**
     * @return SGDR, ε = ε<sub>min</sub> + (ε<sub>max</sub> − ε<sub>min</sub>)(1 + cos(π T<sub>cur</sub>/T<sub>i</sub>))/2 with
     * T<sub>0</sub> = period and T<sub>i+1</sub> = periodGrowth · T<sub>i</sub> (Loshchilov &amp; Hutter 2017; see {@link SgdrSchedule})
     * @throws IllegalArgumentException naming maxStepSize unless finite and &gt; 0, minStepSize unless in
     *                                  [0, maxStepSize], period unless ≥ 1, or periodGrowth unless finite and ≥ 1
     */
    static StepSchedule cosineRestarts(double maxStepSize, double minStepSize, long period, double periodGrowth) {
        return SgdrSchedule.of(maxStepSize, minStepSize, period, periodGrowth);
    }

    /**
     * @return ε<sub>t</sub> = inner(t) (t + 1)/steps for t &lt; steps, then inner(t) (Goyal et al. 2017;
     * see {@link WarmUpSchedule})
     * @throws NullPointerException     if inner is null
     * @throws IllegalArgumentException naming steps unless ≥ 1
     */
    static StepSchedule warmUp(StepSchedule inner, long steps) {
        return WarmUpSchedule.of(inner, steps);
    }
}
