package dev.riskmin.objective;

import dev.riskmin.penalty.Penalty;

/**
 * Which coordinates of h a penalty acts on, as disjoint ranges [from, to): intercepts are left out.
 * Applies the penalty's operations range by range, without allocation.
 */
final class PenaltyLayout {
    private final Penalty penalty;
    private final int[] ranges; // from0, to0, from1, to1, ...
    private final boolean[] mask;

    PenaltyLayout(Penalty penalty, int[] ranges, int dimension) {
        this.penalty = penalty;
        this.ranges = ranges.clone();
        this.mask = new boolean[dimension];
        for (int r = 0; r < ranges.length; r += 2) {
            for (int j = ranges[r]; j < ranges[r + 1]; j++) {
                mask[j] = true;
            }
        }
    }

    /** Penalizes every coordinate j with {@code mask[j]}, grouping runs into ranges. */
    static PenaltyLayout ofMask(Penalty penalty, boolean[] mask) {
        int count = 0;
        for (int j = 0; j < mask.length; j++) {
            if (mask[j] && (j == 0 || !mask[j - 1])) {
                count++;
            }
        }
        int[] ranges = new int[2 * count];
        int r = 0;
        for (int j = 0; j < mask.length; j++) {
            if (mask[j] && (j == 0 || !mask[j - 1])) {
                ranges[r] = j;
            }
            if (mask[j] && (j == mask.length - 1 || !mask[j + 1])) {
                ranges[r + 1] = j + 1;
                r += 2;
            }
        }
        return new PenaltyLayout(penalty, ranges, mask.length);
    }

    /** K blocks of d coefficients each followed (when {@code intercept}) by one unpenalized intercept. */
    static PenaltyLayout blocks(Penalty penalty, int blocks, int d, boolean intercept) {
        int stride = intercept ? d + 1 : d;
        int[] ranges = new int[2 * blocks];
        for (int k = 0; k < blocks; k++) {
            ranges[2 * k] = k * stride;
            ranges[2 * k + 1] = k * stride + d;
        }
        return new PenaltyLayout(penalty, ranges, blocks * stride);
    }

    Penalty penalty() {
        return penalty;
    }

    boolean penalized(int j) {
        return mask[j];
    }

    double value(double[] h) {
        double s = 0;
        for (int r = 0; r < ranges.length; r += 2) {
            s += penalty.value(h, ranges[r], ranges[r + 1]);
        }
        return s;
    }

    void addGradient(double[] h, double scale, double[] g) {
        for (int r = 0; r < ranges.length; r += 2) {
            penalty.addSmoothGradient(h, ranges[r], ranges[r + 1], scale, g);
        }
    }

    void proximalStep(double[] h, double step) {
        if (penalty.smooth()) {
            return;
        }
        for (int r = 0; r < ranges.length; r += 2) {
            penalty.proximalStep(h, ranges[r], ranges[r + 1], step);
        }
    }

    void fullProximalStep(double[] h, double step) {
        for (int r = 0; r < ranges.length; r += 2) {
            penalty.fullProximal(h, ranges[r], ranges[r + 1], step);
        }
    }
}
