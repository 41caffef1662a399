package dev.riskmin.loss;

/** The class-label check shared by the multiclass losses; the message is built only on failure. */
final class MulticlassLabels {
    private MulticlassLabels() {
    }

    /** @throws IllegalArgumentException naming y and K if y is outside [0, K) */
    static void require(int y, int classes) {
        if (y < 0 || y >= classes) {
            throw outside(y, classes);
        }
    }

    private static IllegalArgumentException outside(int y, int classes) {
        return new IllegalArgumentException("y (" + y + ") must be a class label in [0, " + classes + ")");
    }
}
