package dev.riskmin.util;

/**
 * Argument checks whose messages name the option and the offending value, in the form
 * {@code "stepSize (-0.1) must be > 0"}. Messages are built only on failure, so the checks are
 * cheap enough for configuration paths (never call them per step).
 */
public final class Arguments {
    private Arguments() {
    }

    /** @throws IllegalArgumentException if {@code value} is not finite and strictly positive */
    public static double positive(String name, double value) {
        if (!(value > 0) || Double.isInfinite(value)) {
            throw new IllegalArgumentException(name + " (" + value + ") must be finite and > 0");
        }
        return value;
    }

    /** @throws IllegalArgumentException if {@code value} is not finite and at least 0 */
    public static double nonNegative(String name, double value) {
        if (!(value >= 0) || Double.isInfinite(value)) {
            throw new IllegalArgumentException(name + " (" + value + ") must be finite and >= 0");
        }
        return value;
    }

    /** @throws IllegalArgumentException if {@code value} is not finite */
    public static double finite(String name, double value) {
        if (!Double.isFinite(value)) {
            throw new IllegalArgumentException(name + " (" + value + ") must be finite");
        }
        return value;
    }

    /** @throws IllegalArgumentException if {@code value} lies outside [lo, hi] or is NaN */
    public static double inClosedRange(String name, double value, double lo, double hi) {
        if (!(value >= lo && value <= hi)) {
            throw new IllegalArgumentException(name + " (" + value + ") must be in [" + lo + ", " + hi + "]");
        }
        return value;
    }

    /** @throws IllegalArgumentException if {@code value} lies outside the open interval (lo, hi) or is NaN */
    public static double inOpenRange(String name, double value, double lo, double hi) {
        if (!(value > lo && value < hi)) {
            throw new IllegalArgumentException(name + " (" + value + ") must be in (" + lo + ", " + hi + ")");
        }
        return value;
    }

    /** @throws IllegalArgumentException if {@code value < 1} */
    public static int positive(String name, int value) {
        if (value < 1) {
            throw new IllegalArgumentException(name + " (" + value + ") must be >= 1");
        }
        return value;
    }

    /** @throws IllegalArgumentException if {@code value < 1} */
    public static long positive(String name, long value) {
        if (value < 1) {
            throw new IllegalArgumentException(name + " (" + value + ") must be >= 1");
        }
        return value;
    }

    /** @throws IllegalArgumentException if {@code value < 0} */
    public static int nonNegative(String name, int value) {
        if (value < 0) {
            throw new IllegalArgumentException(name + " (" + value + ") must be >= 0");
        }
        return value;
    }

    /** @throws NullPointerException naming {@code name} if {@code value} is null */
    public static <T> T notNull(String name, T value) {
        if (value == null) {
            throw new NullPointerException(name + " must not be null");
        }
        return value;
    }

    /**
     * @throws IllegalArgumentException naming the vector if its length is not {@code length}, or naming
     *                                  the index and value of its first non-finite entry
     */
    public static double[] finiteVector(String name, double[] values, int length) {
        if (values.length != length) {
            throw new IllegalArgumentException(name + " have " + values.length + " entries, expected " + length);
        }
        for (int j = 0; j < length; j++) {
            if (!Double.isFinite(values[j])) {
                throw new IllegalArgumentException(name + "[" + j + "] is " + values[j]);
            }
        }
        return values;
    }

    /** @throws IllegalArgumentException naming the option if the duration is not positive */
    public static java.time.Duration positive(String name, java.time.Duration value) {
        notNull(name, value);
        if (value.isNegative() || value.isZero()) {
            throw new IllegalArgumentException(name + " (" + value + ") must be > 0");
        }
        return value;
    }

    /** @throws IllegalArgumentException if {@code value} is not finite and at least {@code min} */
    public static double atLeast(String name, double value, double min) {
        if (!(value >= min) || Double.isInfinite(value)) {
            throw new IllegalArgumentException(name + " (" + value + ") must be finite and >= " + min);
        }
        return value;
    }
}
