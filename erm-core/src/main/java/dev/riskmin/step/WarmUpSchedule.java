package dev.riskmin.step;

import dev.riskmin.util.Arguments;

/**
 * A linear warm-up in front of another schedule (Goyal et al., "Accurate, large minibatch SGD:
 * training ImageNet in 1 hour", arXiv:1706.02677, 2017, §2.2, section from memory; METHODS §5):
 * <pre>
 *   ε<sub>t</sub> = ε<sup>inner</sup><sub>t</sub> (t + 1)/W   for t &lt; W,   ε<sub>t</sub> = ε<sup>inner</sup><sub>t</sub>   for t ≥ W
 * </pre>
 * with W warm-up steps. The ramp starts at ε<sup>inner</sup><sub>0</sub>/W rather than 0 (a zero
 * step would waste a step) and reaches the inner schedule exactly at t = W − 1, where the factor
 * (t + 1)/W is exactly 1. The ramp is monotone whenever (t + 1) ε<sup>inner</sup><sub>t</sub> is
 * non-decreasing on t &lt; W, e.g. for a constant inner schedule or for a warm-up no longer than the
 * inner schedule's decay scale. Robbins–Monro exactly when the inner schedule is (a finite prefix
 * changes neither series' convergence).
 */
public final class WarmUpSchedule implements StepSchedule {
    private final StepSchedule inner;
    private final long steps;

    private WarmUpSchedule(StepSchedule inner, long steps) {
        this.inner = inner;
        this.steps = steps;
    }

    /**
     * @throws NullPointerException     naming inner if it is null
     * @throws IllegalArgumentException naming steps unless ≥ 1
     */
    static WarmUpSchedule of(StepSchedule inner, long steps) {
        Arguments.notNull("inner", inner);
        Arguments.positive("steps", steps);
        return new WarmUpSchedule(inner, steps);
    }

    @Override
    public double stepSize(long t) {
        Steps.requireStep(t);
        double target = inner.stepSize(t);
        return t < steps ? target * ((double) (t + 1) / steps) : target;
    }

    @Override
    public boolean robbinsMonro() {
        return inner.robbinsMonro();
    }

    @Override
    public String name() {
        return "warmUp(" + inner.name() + ", steps=" + steps + ")";
    }

    @Override
    public String toString() {
        return name();
    }
}
