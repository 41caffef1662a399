package dev.riskmin.sampling;

import java.util.random.RandomGenerator;

/**
 * Shared pieces of the samplers: the Fisher–Yates shuffle and the batch-size checks. The checks
 * build their messages only on failure, so {@link #requireSize} may sit in {@code next()}.
 */
final class Draws {
    private Draws() {
    }

    /**
     * Shuffles {@code a[from .. to)} in place into a uniformly random permutation: for
     * k = m−1, …, 1 swap entry k with an entry drawn uniformly from 0 … k (Fisher &amp; Yates 1938,
     * in Durstenfeld's in-place form, CACM 7(7):420, 1964; issue and page from memory).
     * Allocation-free; uses exactly m − 1 draws of {@code rng}.
     */
    static void shuffle(int[] a, int from, int to, RandomGenerator rng) {
        for (int k = to - from - 1; k > 0; k--) {
            int j = from + rng.nextInt(k + 1);
            int i = from + k;
            int swap = a[i];
            a[i] = a[j];
            a[j] = swap;
        }
    }

    /** Refuses a batch size below 1 (called per batch: the message is built only on failure). */
    static void requireSize(int size) {
        if (size < 1) {
            throw badSize(size);
        }
    }

    /** Refuses a batch size below 1 or a sample count below 1 (configuration path). */
    static void checkPositive(int batchSize, int n) {
        if (batchSize < 1) {
            throw badSize(batchSize);
        }
        if (n < 1) {
            throw new IllegalArgumentException("sample count (" + n + ") must be >= 1");
        }
    }

    /** Refuses B &gt; n for samplers that draw each sample at most once per pass. */
    static void requireAtMost(int batchSize, int n, String sampling) {
        if (batchSize > n) {
            throw new IllegalArgumentException("batchSize (" + batchSize + ") must be <= n (" + n + ") " + sampling);
        }
    }

    private static IllegalArgumentException badSize(int size) {
        return new IllegalArgumentException("batchSize (" + size + ") must be >= 1");
    }
}
