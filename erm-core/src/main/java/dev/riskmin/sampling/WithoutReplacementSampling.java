package dev.riskmin.sampling;

import dev.riskmin.util.Arguments;
import java.util.random.RandomGenerator;

/**
 * Uniform sampling without replacement, epoch by epoch: the draws are the concatenation of
 * independent uniformly random permutations of {0, …, n−1} (a fresh Fisher–Yates shuffle each
 * epoch), and each batch is the next B entries of that stream. When a permutation runs out in the
 * middle of a batch, the rest of the batch comes from the next permutation, so every batch holds
 * exactly B entries and every block of n consecutive draws (counted from the start) holds every
 * sample exactly once, whether or not B divides n. When B divides n, one epoch's batch means
 * therefore average to the full mean exactly.
 *
 * <p>Within one permutation the batch mean has E‖g<sub>B</sub> − G‖² = (1 − B/n) tr(S²)/B, with the
 * finite-population correction (METHODS §1; Cochran, <i>Sampling Techniques</i>, 3rd ed., Wiley
 * 1977, ch. 2, chapter from memory). Every scale is 1. Requires B ≤ n.
 */
public final class WithoutReplacementSampling implements Sampling {
    static final WithoutReplacementSampling INSTANCE = new WithoutReplacementSampling();

    private WithoutReplacementSampling() {
    }

    @Override
    public BatchSource start(SamplingContext context, RandomGenerator rng) {
        Arguments.notNull("context", context);
        Arguments.notNull("rng", rng);
        return new Source(context.size(), rng);
    }

    /** @throws IllegalArgumentException if B &lt; 1 or B &gt; n, naming both */
    @Override
    public void checkBatchSize(int batchSize, int n) {
        Draws.checkPositive(batchSize, n);
        Draws.requireAtMost(batchSize, n, "without replacement");
    }

    @Override
    public String name() {
        return "without replacement";
    }

    @Override
    public String toString() {
        return name();
    }

    private static final class Source implements BatchSource {
        private final int[] permutation;
        private final RandomGenerator rng;
        private int position;

        Source(int n, RandomGenerator rng) {
            this.permutation = new int[n];
            for (int i = 0; i < n; i++) {
                permutation[i] = i;
            }
            this.rng = rng;
            // Position n makes the first draw shuffle, so the first epoch is random like the others.
            this.position = n;
        }

        @Override
        public void next(int[] batch, double[] scales, int size) {
            Draws.requireSize(size);
            final int[] perm = permutation;
            final int n = perm.length;
            if (size > n) {
                Draws.requireAtMost(size, n, "without replacement");
            }
            int pos = position;
            for (int k = 0; k < size; k++) {
                if (pos == n) {
                    Draws.shuffle(perm, 0, n, rng);
                    pos = 0;
                }
                batch[k] = perm[pos++];
                scales[k] = 1.0;
            }
            position = pos;
        }

        @Override
        public boolean uniformScales() {
            return true;
        }
    }
}
