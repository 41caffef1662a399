package dev.riskmin.spark;

import dev.riskmin.sampling.Sampling;

/**
 * Splits a batch of B draws among partitions in proportion to their rows, b<sub>k</sub> ≈ B n<sub>k</sub>/n
 * (proportional allocation, Cochran, <i>Sampling Techniques</i>, 3rd ed., Wiley 1977, ch. 5, chapter from
 * memory), by the largest-remainder rule: each partition gets ⌊B n<sub>k</sub>/n⌋ and the draws left over go to
 * the partitions with the largest fractional parts (ties to the lower index). A partition then gets at
 * least one draw, so every partition is represented and the combined estimate stays unbiased, and at most
 * what its sampling allows (n<sub>k</sub> without replacement). The total may therefore differ from B a little.
 */
final class Allocation {
    private Allocation() {
    }

    /**
     * @param batch B ≥ 1
     * @param rows  n<sub>k</sub> per partition (0 for an empty one, which gets no draws); read only
     * @return b<sub>k</sub> per partition
     */
    static int[] proportional(int batch, int[] rows, Sampling sampling) {
        long n = 0;
        for (int r : rows) {
            n += r;
        }
        int[] out = new int[rows.length];
        double[] remainder = new double[rows.length];
        long given = 0;
        for (int k = 0; k < rows.length; k++) {
            double quota = (double) batch * rows[k] / n;
            out[k] = (int) Math.floor(quota);
            remainder[k] = quota - out[k];
            given += out[k];
        }
        for (long left = batch - given; left > 0; left--) {
            int best = -1;
            for (int k = 0; k < rows.length; k++) {
                if (rows[k] > 0 && (best < 0 || remainder[k] > remainder[best])) {
                    best = k;
                }
            }
            out[best]++;
            remainder[best] = -1;
        }
        for (int k = 0; k < rows.length; k++) {
            if (rows[k] == 0) {
                out[k] = 0;
                continue;
            }
            out[k] = Math.max(1, out[k]);
            try {
                sampling.checkBatchSize(out[k], rows[k]);
            } catch (IllegalArgumentException e) {
                out[k] = rows[k]; // a partition smaller than its share gives all its rows
            }
        }
        return out;
    }
}
