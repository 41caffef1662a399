package dev.riskmin.step;

import dev.riskmin.util.Arguments;

/**
 * Step decay ε<sub>t</sub> = ε<sub>0</sub> γ<sup>⌊t/s⌋</sup>: the step is multiplied by γ every s steps
 * (METHODS §5; common practice, no source). Never Robbins–Monro: with γ &lt; 1 the sum Σ ε<sub>t</sub>
 * = ε<sub>0</sub> s/(1 − γ) is finite, and with γ = 1 the schedule is constant.
 */
public final class StepDecaySchedule implements StepSchedule {
    private final double initialStepSize;
    private final double factor;
    private final long every;

    private StepDecaySchedule(double initialStepSize, double factor, long every) {
        this.initialStepSize = initialStepSize;
        this.factor = factor;
        this.every = every;
    }

    /**
     * @throws IllegalArgumentException naming initialStepSize unless finite and &gt; 0, factor unless
     *                                  in (0, 1], or every unless ≥ 1
     */
    static StepDecaySchedule of(double initialStepSize, double factor, long every) {
        Arguments.positive("initialStepSize", initialStepSize);
        if (!(factor > 0 && factor <= 1)) {
            throw new IllegalArgumentException("factor (" + factor + ") must be in (0, 1]");
        }
        Arguments.positive("every", every);
        return new StepDecaySchedule(initialStepSize, factor, every);
    }

    @Override
    public double stepSize(long t) {
        Steps.requireStep(t);
        return initialStepSize * Math.pow(factor, (double) (t / every));
    }

    @Override
    public boolean robbinsMonro() {
        return false;
    }

    @Override
    public String name() {
        return "stepDecay(initialStepSize=" + initialStepSize + ", factor=" + factor + ", every=" + every + ")";
    }

    @Override
    public String toString() {
        return name();
    }
}
