package dev.riskmin.examples.bench;

import dev.riskmin.Fit;
import dev.riskmin.StopReason;
import dev.riskmin.hook.FitControl;
import dev.riskmin.hook.FitListener;
import dev.riskmin.hook.StepView;

/**
 * A listener that notes the fit's elapsed time at each epoch end, so an epoch's time excludes the
 * fit's set-up (step-size default, tables) and its closing full objective. It reads nothing else, so
 * a lazy updater is not made to write its parameters out.
 */
public final class EpochClock implements FitListener {
    private final long[] ends;
    private int count;

    /** @param capacity the most epoch ends recorded */
    public EpochClock(int capacity) {
        this.ends = new long[capacity];
    }

    @Override
    public void epochEnded(StepView view, FitControl control) {
        if (count < ends.length) {
            ends[count++] = view.elapsedNanos();
        }
    }

    /**
     * @throws IllegalStateException naming the stop reason if the fit stopped before its epoch budget
     *                               (a timed epoch of a diverged fit would mean nothing)
     */
    public static void requireBudgetSpent(Fit fit) {
        if (fit.stopReason() != StopReason.EPOCH_BUDGET) {
            throw new IllegalStateException("a timed fit stopped early (" + fit.stopReason() + ": "
                    + fit.stopDetail() + ")");
        }
    }

    /** @return the number of epoch ends seen */
    public int epochs() {
        return count;
    }

    /**
     * @param skip how many first epochs to leave out (the first runs partly in the interpreter)
     * @return the median time of the remaining epochs, in nanoseconds
     * @throws IllegalStateException if no epoch remains
     */
    public double medianEpochNanos(int skip) {
        return Timing.median(epochNanos(skip));
    }

    /**
     * @param skip how many first epochs to leave out
     * @return the times of the remaining epochs, in nanoseconds
     * @throws IllegalStateException if no epoch remains
     */
    public double[] epochNanos(int skip) {
        int m = count - skip;
        if (m < 1 || skip < 1) {
            throw new IllegalStateException("epochs recorded (" + count + ") leave none after skipping " + skip);
        }
        double[] times = new double[m];
        for (int e = skip; e < count; e++) {
            times[e - skip] = ends[e] - ends[e - 1];
        }
        return times;
    }
}
