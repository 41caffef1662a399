package dev.riskmin.step;

import dev.riskmin.util.Arguments;

/**
 * A constant step ε<sub>t</sub> = ε. Not Robbins–Monro (Σ ε<sub>t</sub>² diverges): with a fixed step
 * SGD settles in a noise ball around a minimizer whose size grows with ε (Bottou, Curtis &amp;
 * Nocedal, SIAM Review 60(2), 2018, Thm 4.6; METHODS §3).
 */
public final class ConstantSchedule implements StepSchedule {
    private final double stepSize;

    private ConstantSchedule(double stepSize) {
        this.stepSize = stepSize;
    }

    /** @throws IllegalArgumentException naming stepSize unless it is finite and &gt; 0 */
    static ConstantSchedule of(double stepSize) {
        return new ConstantSchedule(Arguments.positive("stepSize", stepSize));
    }

    @Override
    public double stepSize(long t) {
        Steps.requireStep(t);
        return stepSize;
    }

    @Override
    public boolean robbinsMonro() {
        return false;
    }

    @Override
    public String name() {
        return "constant(" + stepSize + ")";
    }

    @Override
    public String toString() {
        return name();
    }
}
