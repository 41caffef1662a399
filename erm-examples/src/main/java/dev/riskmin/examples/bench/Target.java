package dev.riskmin.examples.bench;

import java.math.BigDecimal;

/**
 * A bound on a ratio: the ratio r passes when r ≥ bound ({@link #atLeast}) or r ≤ bound
 * ({@link #atMost}). The bounds are the project's performance targets, not published figures.
 *
 * @param atLeast whether the bound is a floor (true) or a ceiling (false)
 * @param bound   the bound, finite
 */
public record Target(boolean atLeast, double bound) {

    public Target {
        if (!Double.isFinite(bound)) {
            throw new IllegalArgumentException("target bound (" + bound + ") must be finite");
        }
    }

    /** r ≥ bound. */
    public static Target atLeast(double bound) {
        return new Target(true, bound);
    }

    /** r ≤ bound. */
    public static Target atMost(double bound) {
        return new Target(false, bound);
    }

    /** @return whether the ratio meets the bound (false for NaN) */
    public boolean met(double ratio) {
        return atLeast ? ratio >= bound : ratio <= bound;
    }

    @Override
    public String toString() {
        return (atLeast ? ">= " : "<= ") + BigDecimal.valueOf(bound).stripTrailingZeros().toPlainString();
    }
}
