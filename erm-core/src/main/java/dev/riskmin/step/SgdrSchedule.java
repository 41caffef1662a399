package dev.riskmin.step;

import dev.riskmin.util.Arguments;

/**
 * Cosine annealing with warm restarts, SGDR (Loshchilov &amp; Hutter, "SGDR: Stochastic gradient
 * descent with warm restarts", ICLR 2017; METHODS §5):
 * <pre>
 *   ε<sub>t</sub> = ε<sub>min</sub> + (ε<sub>max</sub> − ε<sub>min</sub>) (1 + cos(π T<sub>cur</sub>/T<sub>i</sub>))/2
 * </pre>
 * where cycle i lasts T<sub>i</sub> = T<sub>0</sub> m<sup>i</sup> steps (period T<sub>0</sub>, growth m ≥ 1),
 * starts at S<sub>i</sub> = T<sub>0</sub> (m<sup>i</sup> − 1)/(m − 1) (S<sub>i</sub> = i T<sub>0</sub> when m = 1)
 * and T<sub>cur</sub> = t − S<sub>i</sub> counts the steps since the last restart.
 *
 * @implNote T<sub>cur</sub> runs over [0, T<sub>i</sub>): the step at a restart is ε<sub>max</sub>,
 * the last step of a cycle is just above ε<sub>min</sub>, and ε<sub>min</sub> itself is the limit
 * reached at the restart instant (the paper counts T<sub>cur</sub> in fractional epochs; here it
 * counts steps). With a non-integer growth the cycle boundaries S<sub>i</sub> may fall between
 * steps. Finding the cycle takes a logarithm and at most a few corrections, so the cost per call
 * does not grow with t. Not Robbins–Monro.
 */
public final class SgdrSchedule implements StepSchedule {
    private final double maxStepSize;
    private final double minStepSize;
    private final long period;
    private final double periodGrowth;
    private final double logGrowth;

    private SgdrSchedule(double maxStepSize, double minStepSize, long period, double periodGrowth) {
        this.maxStepSize = maxStepSize;
        this.minStepSize = minStepSize;
        this.period = period;
        this.periodGrowth = periodGrowth;
        this.logGrowth = Math.log(periodGrowth);
    }

    /**
     * @throws IllegalArgumentException naming maxStepSize unless finite and &gt; 0, minStepSize unless
     *                                  in [0, maxStepSize], period unless ≥ 1, or periodGrowth unless
     *                                  finite and ≥ 1
     */
    static SgdrSchedule of(double maxStepSize, double minStepSize, long period, double periodGrowth) {
        Arguments.positive("maxStepSize", maxStepSize);
        if (!(minStepSize >= 0 && minStepSize <= maxStepSize)) {
            throw new IllegalArgumentException("minStepSize (" + minStepSize + ") must be in [0, maxStepSize ("
                    + maxStepSize + ")]");
        }
        Arguments.positive("period", period);
        if (!(periodGrowth >= 1) || Double.isInfinite(periodGrowth)) {
            throw new IllegalArgumentException("periodGrowth (" + periodGrowth + ") must be finite and >= 1");
        }
        return new SgdrSchedule(maxStepSize, minStepSize, period, periodGrowth);
    }

    @Override
    public double stepSize(long t) {
        Steps.requireStep(t);
        double fraction;
        if (periodGrowth == 1.0) {
            fraction = (double) (t % period) / period;
        } else {
            double time = t;
            long i = (long) Math.floor(Math.log1p(time * (periodGrowth - 1) / period) / logGrowth);
            if (i < 0) {
                i = 0;
            }
            // The logarithm can land one cycle off near a boundary; settle on S_i ≤ t < S_(i+1).
            while (i > 0 && cycleStart(i) > time) {
                i--;
            }
            while (cycleStart(i + 1) <= time) {
                i++;
            }
            double start = cycleStart(i);
            fraction = (time - start) / (cycleStart(i + 1) - start);
        }
        // The cosine factor is halved before it scales the range, so a range near the largest double
        // cannot overflow (halving is exact, so the result is the same wherever nothing overflows).
        // Rounding can carry min + (max − min) a little above max, and past the largest double.
        return Math.min(maxStepSize,
                minStepSize + (maxStepSize - minStepSize) * ((1.0 + Math.cos(Math.PI * fraction)) * 0.5));
    }

    /** S<sub>i</sub> = T<sub>0</sub>(m<sup>i</sup> − 1)/(m − 1), exact for whole T<sub>0</sub>, m and i while it fits a double. */
    private double cycleStart(long i) {
        return period * (Math.pow(periodGrowth, i) - 1.0) / (periodGrowth - 1.0);
    }

    @Override
    public boolean robbinsMonro() {
        return false;
    }

    @Override
    public String name() {
        return "cosineRestarts(maxStepSize=" + maxStepSize + ", minStepSize=" + minStepSize + ", period=" + period
                + ", periodGrowth=" + periodGrowth + ")";
    }

    @Override
    public String toString() {
        return name();
    }
}
