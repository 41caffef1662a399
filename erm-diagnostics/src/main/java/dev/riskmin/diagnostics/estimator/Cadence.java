package dev.riskmin.diagnostics.estimator;

import java.util.Locale;

/**
 * When a monitor pays for a costly measurement (per-sample gradients, a full gradient, the full
 * objective, the held-out loss). Immutable.
 *
 * <ul>
 * <li>{@link #every(long)}: at steps 0, k, 2k, … whatever the measurement costs.</li>
 * <li>{@link #share(double)}: a budget. The monitor measures at step t only if its probe
 * evaluations so far plus the expected cost of this measurement stay within the given share of
 * the gradient evaluations the fit itself has spent by then (the update rule's count, so SVRG's
 * and SAGA's extra evaluations count as the fit's). The expected cost is the measured cost of the
 * previous measurement (probe evaluations before and after it; zero when another monitor already
 * paid at that step keeps the previous figure), and before the first measurement the monitor's
 * own estimate. A budget of 1 % keeps the monitor's evaluations within about 1 % of the fit's,
 * at the price that an expensive measurement (a full gradient costs n) comes rarely: at 1 % a
 * full gradient is affordable once per 100 epochs of plain SGD, so a short fit may see none. Use
 * {@link #every(long)} where the cost is acceptable.</li>
 * <li>{@link #never()}: not at all.</li>
 * </ul>
 *
 * The budget rule and the 1 % default are this library's choices (common practice, no source).
 */
public final class Cadence {
    private static final Cadence NEVER = new Cadence(0, 0);

    private final long steps;
    private final double share;

    private Cadence(long steps, double share) {
        this.steps = steps;
        this.share = share;
    }

    /**
     * @param steps k ≥ 1: measure at steps 0, k, 2k, …
     * @throws IllegalArgumentException if k &lt; 1
     */
    public static Cadence every(long steps) {
        if (steps < 1) {
            throw new IllegalArgumentException("cadence steps (" + steps + ") must be >= 1");
        }
        return new Cadence(steps, 0);
    }

    /**
     * @param fraction the share of the fit's gradient evaluations the measurement may add, in (0, 1]
     * @throws IllegalArgumentException if the fraction is outside (0, 1] or NaN
     */
    public static Cadence share(double fraction) {
        if (!(fraction > 0 && fraction <= 1)) {
            throw new IllegalArgumentException("cadence share (" + fraction + ") must be in (0, 1]");
        }
        return new Cadence(0, fraction);
    }

    /** @return a cadence that never measures */
    public static Cadence never() {
        return NEVER;
    }

    /** @return whether this is a fixed cadence ({@link #every(long)}) */
    public boolean fixed() {
        return steps > 0;
    }

    /** @return whether this cadence ever measures */
    public boolean active() {
        return steps > 0 || share > 0;
    }

    /** @return k of {@link #every(long)}, or 0 */
    public long steps() {
        return steps;
    }

    /** @return the budget share of {@link #share(double)}, or 0 */
    public double budgetShare() {
        return share;
    }

    /** @return a fresh per-fit pacer with the given estimate of the first measurement's cost */
    Pacer start(long firstCostEstimate) {
        return new Pacer(steps, share, firstCostEstimate);
    }

    @Override
    public String toString() {
        if (steps > 0) {
            return "every " + steps + " steps";
        }
        return share > 0 ? String.format(Locale.ROOT, "within %.3g%% of the fit's evaluations", 100 * share) : "never";
    }

    @Override
    public boolean equals(Object o) {
        return o instanceof Cadence c && c.steps == steps && Double.compare(c.share, share) == 0;
    }

    @Override
    public int hashCode() {
        return Long.hashCode(steps) * 31 + Double.hashCode(share);
    }

    /** The state of one cadence over one fit: what was spent, and what the next measurement is expected to cost. */
    static final class Pacer {
        private final long steps;
        private final double share;
        private long spent;
        private long expected;

        private Pacer(long steps, double share, long firstCostEstimate) {
            this.steps = steps;
            this.share = share;
            this.expected = Math.max(0, firstCostEstimate);
        }

        /** @return whether a measurement is due at this step (O(1), allocation-free) */
        boolean due(long step, long fitEvaluations) {
            if (steps > 0) {
                return step % steps == 0;
            }
            return share > 0 && spent + expected <= share * fitEvaluations;
        }

        /** Records what a measurement cost (probe evaluations); a positive cost becomes the next expectation. */
        void charge(long cost) {
            spent += cost;
            if (cost > 0) {
                expected = cost;
            }
        }

        /** Sets the expected cost of the next measurement (e.g. once the real reference cost is known). */
        void expect(long cost) {
            expected = Math.max(0, cost);
        }

        long spent() {
            return spent;
        }

        long expected() {
            return expected;
        }
    }
}
