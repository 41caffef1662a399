package dev.riskmin.step;

/** Shared checks of the schedules (messages built only on failure, so they may run per step). */
final class Steps {
    private Steps() {
    }

    static void requireStep(long t) {
        if (t < 0) {
            throw new IllegalArgumentException("t (" + t + ") must be >= 0");
        }
    }
}
