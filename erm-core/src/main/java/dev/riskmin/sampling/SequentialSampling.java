package dev.riskmin.sampling;

import dev.riskmin.util.Arguments;
import java.util.random.RandomGenerator;

/**
 * Sequential passes in storage order: the draws are 0, 1, …, n−1, 0, 1, … with no randomness, and
 * each batch is the next B of them (a batch may wrap around from n−1 to 0). Every scale is 1. Useful
 * for reproducing cyclic (incremental) gradient methods and for tests; on data stored in a
 * meaningful order the batches are not representative, so prefer a random sampler for fitting.
 * (Common practice, no source.)
 */
public final class SequentialSampling implements Sampling {
    static final SequentialSampling INSTANCE = new SequentialSampling();

    private SequentialSampling() {
    }

    /** @param rng not used (sequential order draws nothing), but must not be null like every argument */
    @Override
    public BatchSource start(SamplingContext context, RandomGenerator rng) {
        Arguments.notNull("context", context);
        Arguments.notNull("rng", rng);
        return new Source(context.size());
    }

    @Override
    public void checkBatchSize(int batchSize, int n) {
        Draws.checkPositive(batchSize, n);
    }

    @Override
    public String name() {
        return "sequential";
    }

    @Override
    public String toString() {
        return name();
    }

    private static final class Source implements BatchSource {
        private final int n;
        private int position;

        Source(int n) {
            this.n = n;
        }

        @Override
        public void next(int[] batch, double[] scales, int size) {
            Draws.requireSize(size);
            final int count = n;
            int pos = position;
            for (int k = 0; k < size; k++) {
                batch[k] = pos;
                scales[k] = 1.0;
                pos = pos + 1 == count ? 0 : pos + 1;
            }
            position = pos;
        }

        @Override
        public boolean uniformScales() {
            return true;
        }
    }
}
