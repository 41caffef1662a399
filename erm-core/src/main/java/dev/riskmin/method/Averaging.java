package dev.riskmin.method;

import dev.riskmin.util.Arguments;

/**
 * Iterate averaging: the fit returns an average h̄ of the iterates instead of the last one.
 * <ul>
 * <li>{@link #polyakRuppert(long)}: the uniform running mean h̄<sub>k</sub> = h̄<sub>k−1</sub> + (h<sub>k</sub> − h̄<sub>k−1</sub>)/k over
 * the iterates from a start step on (Polyak &amp; Juditsky, SIAM J. Control Optim. 30(4), 1992; Ruppert 1988).
 * With steps t<sup>−p</sup>, p ∈ (1/2, 1), it attains the optimal asymptotic covariance.</li>
 * <li>{@link #tail(double)}: the uniform mean of the last fraction of the planned steps (suffix
 * averaging, Rakhlin, Shamir &amp; Sridharan, ICML 2012), which removes the log T factor of the full
 * mean under step 1/(λt).</li>
 * <li>{@link #exponential(double)}: h̄ ← β h̄ + (1 − β) h, initialized at the first iterate
 * (common practice, no source).</li>
 * </ul>
 * Immutable and thread-safe; {@link #start} gives a fit its own allocation-free accumulator.
 */
public final class Averaging {
    enum Kind { NONE, UNIFORM, TAIL, EXPONENTIAL }

    private static final Averaging NONE = new Averaging(Kind.NONE, 0, 0, 0);

    private final Kind kind;
    private final long startStep;
    private final double fraction;
    private final double beta;

    private Averaging(Kind kind, long startStep, double fraction, double beta) {
        this.kind = kind;
        this.startStep = startStep;
        this.fraction = fraction;
        this.beta = beta;
    }

    /** No averaging: the fit returns the last iterate. */
    public static Averaging none() {
        return NONE;
    }

    /** The uniform mean of all iterates. */
    public static Averaging polyakRuppert() {
        return new Averaging(Kind.UNIFORM, 0, 0, 0);
    }

    /** The uniform mean of the iterates after step {@code startStep} (≥ 0). */
    public static Averaging polyakRuppert(long startStep) {
        if (startStep < 0) {
            throw new IllegalArgumentException("averaging startStep (" + startStep + ") must be >= 0");
        }
        return new Averaging(Kind.UNIFORM, startStep, 0, 0);
    }

    /** The uniform mean of the last {@code fraction} ∈ (0, 1] of the planned steps. */
    public static Averaging tail(double fraction) {
        Arguments.inClosedRange("tail fraction", fraction, Double.MIN_VALUE, 1.0);
        return new Averaging(Kind.TAIL, 0, fraction, 0);
    }

    /** The exponential moving average with decay β ∈ (0, 1). */
    public static Averaging exponential(double beta) {
        Arguments.inOpenRange("averaging decay", beta, 0.0, 1.0);
        return new Averaging(Kind.EXPONENTIAL, 0, 0, beta);
    }

    /** @return whether this averages at all */
    public boolean active() {
        return kind != Kind.NONE;
    }

    /**
     * @param plannedSteps the step budget of the fit, or -1 when the fit has no step or epoch budget
     * @return the first step (counted from 0) whose iterate enters the average
     * @throws IllegalArgumentException if averaging would start after the budget ends, or tail
     *                                  averaging has no planned length, naming both numbers
     */
    public long firstAveragedStep(long plannedSteps) {
        switch (kind) {
            case TAIL:
                if (plannedSteps < 0) {
                    throw new IllegalArgumentException("tail averaging (fraction " + fraction
                            + ") needs a step or epoch budget to know where the tail starts");
                }
                return (long) Math.floor((1.0 - fraction) * plannedSteps);
            case UNIFORM:
                if (plannedSteps >= 0 && startStep >= plannedSteps) {
                    throw new IllegalArgumentException("averaging startStep (" + startStep
                            + ") is at or after the end of the budget (" + plannedSteps + " steps)");
                }
                return startStep;
            default:
                return 0;
        }
    }

    /** Starts one fit's accumulator over parameters of length p. */
    public Accumulator start(int p, long plannedSteps) {
        return new Accumulator(p, firstAveragedStep(plannedSteps));
    }

    @Override
    public String toString() {
        switch (kind) {
            case NONE:
                return "none";
            case UNIFORM:
                return "polyak-ruppert(from step " + startStep + ")";
            case TAIL:
                return "tail(" + fraction + ")";
            default:
                return "exponential(" + beta + ")";
        }
    }

    /** One fit's running average. Not thread-safe; allocation-free in {@link #add}. */
    public final class Accumulator {
        private final double[] mean;
        private final long first;
        private long count;

        private Accumulator(int p, long first) {
            this.mean = new double[p];
            this.first = first;
        }

        /** Adds the iterate after step t (counted from 0), if t is in the averaged range. */
        public void add(double[] h, long t) {
            if (kind == Kind.NONE || t < first) {
                return;
            }
            count++;
            if (kind == Kind.EXPONENTIAL) {
                if (count == 1) {
                    System.arraycopy(h, 0, mean, 0, h.length);
                } else {
                    double a = 1.0 - beta;
                    for (int j = 0; j < h.length; j++) {
                        mean[j] += a * (h[j] - mean[j]);
                    }
                }
                return;
            }
            double inv = 1.0 / count;
            for (int j = 0; j < h.length; j++) {
                mean[j] += (h[j] - mean[j]) * inv;
            }
        }

        /** @return whether this accumulator averages at all */
        public boolean active() {
            return kind != Kind.NONE;
        }

        /** @return how many iterates the average holds */
        public long count() {
            return count;
        }

        /** Copies the average into {@code out}; returns false (and leaves out alone) if it holds nothing. */
        public boolean copyTo(double[] out) {
            if (count == 0) {
                return false;
            }
            System.arraycopy(mean, 0, out, 0, mean.length);
            return true;
        }
    }
}
