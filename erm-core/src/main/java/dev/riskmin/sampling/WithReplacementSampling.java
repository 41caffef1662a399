package dev.riskmin.sampling;

import dev.riskmin.util.Arguments;
import java.util.random.RandomGenerator;

/**
 * Uniform sampling with replacement: every batch entry is an independent draw i ~ U{0, …, n−1},
 * so the batch mean of per-sample gradients is unbiased with Cov(g<sub>B</sub>) = Σ/B
 * (METHODS §1; Cochran, <i>Sampling Techniques</i>, 3rd ed., Wiley 1977, ch. 2, chapter from memory).
 * Every scale is 1. Any batch size B ≥ 1 is allowed, also B &gt; n.
 */
public final class WithReplacementSampling implements Sampling {
    static final WithReplacementSampling INSTANCE = new WithReplacementSampling();

    private WithReplacementSampling() {
    }

    @Override
    public boolean independentDraws() {
        return true;
    }

    @Override
    public BatchSource start(SamplingContext context, RandomGenerator rng) {
        Arguments.notNull("context", context);
        Arguments.notNull("rng", rng);
        return new Source(context.size(), rng);
    }

    @Override
    public void checkBatchSize(int batchSize, int n) {
        Draws.checkPositive(batchSize, n);
    }

    @Override
    public String name() {
        return "with replacement";
    }

    @Override
    public String toString() {
        return name();
    }

    private static final class Source implements BatchSource {
        private final int n;
        private final RandomGenerator rng;

        Source(int n, RandomGenerator rng) {
            this.n = n;
            this.rng = rng;
        }

        @Override
        public void next(int[] batch, double[] scales, int size) {
            Draws.requireSize(size);
            final int count = n;
            final RandomGenerator random = rng;
            for (int k = 0; k < size; k++) {
                batch[k] = random.nextInt(count);
                scales[k] = 1.0;
            }
        }

        @Override
        public boolean uniformScales() {
            return true;
        }
    }
}
