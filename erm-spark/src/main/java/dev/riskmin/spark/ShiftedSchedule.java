package dev.riskmin.spark;

import dev.riskmin.step.StepSchedule;

/**
 * A schedule read from a later step on and scaled: ε'<sub>t</sub> = c · ε<sub>t<sub>0</sub> + t</sub>. A local run
 * of round r starts its own step count at 0, while the fit's schedule counts every local step of the
 * partition since the fit began (t<sub>0</sub> = r · H); c is the product of the step-size factors
 * listeners asked for.
 */
final class ShiftedSchedule implements StepSchedule {
    private final StepSchedule base;
    private final long offset;
    private final double factor;

    private ShiftedSchedule(StepSchedule base, long offset, double factor) {
        this.base = base;
        this.offset = offset;
        this.factor = factor;
    }

    /** @return the base itself when there is nothing to shift or scale, so that its steps are the same bits */
    static StepSchedule of(StepSchedule base, long offset, double factor) {
        if (offset == 0 && factor == 1.0) {
            return base;
        }
        return new ShiftedSchedule(base, offset, factor);
    }

    @Override
    public double stepSize(long t) {
        return factor * base.stepSize(offset + t);
    }

    @Override
    public boolean robbinsMonro() {
        return base.robbinsMonro();
    }

    @Override
    public String name() {
        return base.name();
    }
}
