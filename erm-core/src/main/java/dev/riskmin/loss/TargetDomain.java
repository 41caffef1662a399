package dev.riskmin.loss;

/** The targets y a loss accepts; checked for every row when a fit starts. */
public enum TargetDomain {
    /** Any finite y. */
    REAL("a finite real number"),
    /** Finite y ≥ 0 (counts or rates). */
    NON_NEGATIVE("a finite number >= 0"),
    /** y in {−1, +1} or {0, 1}: the positive class is y = 1, the negative y ≤ 0. */
    BINARY("a binary label in {0, 1} or {-1, +1}"),
    /** y = −1 (the negative class) or a proportion 0 ≤ y ≤ 1 (binary labels are the ends). */
    PROPORTION("-1 or a proportion in [0, 1]"),
    /** A class label 0 … K−1. */
    CLASS_LABEL("a class label 0..K-1");

    private final String description;

    TargetDomain(String description) {
        this.description = description;
    }

    /** @return whether y lies in this domain (for CLASS_LABEL, only that y is a non-negative whole number) */
    public boolean accepts(double y) {
        switch (this) {
            case REAL:
                return Double.isFinite(y);
            case NON_NEGATIVE:
                return Double.isFinite(y) && y >= 0;
            case BINARY:
                return y == 1 || y == 0 || y == -1;
            case PROPORTION:
                return y == -1 || (y >= 0 && y <= 1);
            case CLASS_LABEL:
                return y >= 0 && y == Math.rint(y) && y < Integer.MAX_VALUE;
            default:
                throw new AssertionError(this);
        }
    }

    /** @return words for error messages, e.g. "a finite number >= 0" */
    public String description() {
        return description;
    }
}
