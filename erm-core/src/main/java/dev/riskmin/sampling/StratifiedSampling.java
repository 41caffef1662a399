package dev.riskmin.sampling;

import dev.riskmin.util.Arguments;
import java.util.random.RandomGenerator;

/**
 * Stratified sampling with proportional allocation (Cochran, <i>Sampling Techniques</i>, 3rd ed.,
 * Wiley 1977, ch. 5, chapter from memory; METHODS §1): with strata of sizes N<sub>h</sub> and
 * weights W<sub>h</sub> = N<sub>h</sub>/N, a batch of B draws gives stratum h either
 * ⌊B W<sub>h</sub>⌋ or ⌊B W<sub>h</sub>⌋ + 1 draws, so every stratum is within ±1 of its
 * proportional count B W<sub>h</sub> in every batch; within a stratum the draws run through a
 * random permutation of its members, reshuffled when exhausted (sampling without replacement
 * inside the stratum).
 *
 * <p>Allocation of the leftover draws: the floors ⌊B W<sub>h</sub>⌋ leave R = Σ<sub>h</sub> r<sub>h</sub>
 * draws, with remainders r<sub>h</sub> = B W<sub>h</sub> − ⌊B W<sub>h</sub>⌋ ∈ [0, 1) and R a whole
 * number. Instead of always favouring the largest remainders, each batch gives the R extra draws to
 * R distinct strata chosen by systematic selection with inclusion probabilities r<sub>h</sub>: one
 * uniform offset u ∈ {0, …, N−1} and the points u, u + N, …, u + (R−1)N laid over the consecutive
 * integer intervals of lengths N r<sub>h</sub> (Madow, Ann. Math. Statist. 1949, from memory). All
 * arithmetic is in whole numbers, so stratum h gets its extra draw with probability exactly
 * r<sub>h</sub>, and its expected count per batch is exactly B W<sub>h</sub>.
 *
 * <p>Scales: for a stratum with B W<sub>h</sub> ≥ 1, which gets n<sub>h</sub> ≥ 1 draws in every
 * batch, s = B W<sub>h</sub>/n<sub>h</sub>, so the scaled batch mean (1/B) Σ<sub>k</sub> s<sub>k</sub> g<sub>i<sub>k</sub></sub>
 * is the stratified estimator Σ<sub>h</sub> W<sub>h</sub> ḡ<sub>h</sub>, unbiased in every batch
 * (Cochran ch. 5). A stratum with B W<sub>h</sub> &lt; 1 appears in a batch (once) only with
 * probability B W<sub>h</sub>; there the scale B W<sub>h</sub>/n<sub>h</sub> would drop its share
 * whenever it is absent and bias the mean, so it uses s = 1, which keeps its contribution unbiased
 * on average over the allocation: E[(n<sub>h</sub>/B) ḡ<sub>h</sub>] = W<sub>h</sub> G<sub>h</sub>.
 *
 * <p>Draws within a batch come grouped by stratum (stratum 0 first). Requires strata in the context
 * (numbered 0 … S−1 without gaps) and B ≤ n.
 */
public final class StratifiedSampling implements Sampling {
    static final StratifiedSampling INSTANCE = new StratifiedSampling();

    private StratifiedSampling() {
    }

    /**
     * @throws IllegalArgumentException if the context has no strata, or a stratum label is negative,
     *                                  at least n, or leaves a gap (an empty stratum), naming it
     */
    @Override
    public BatchSource start(SamplingContext context, RandomGenerator rng) {
        Arguments.notNull("context", context);
        Arguments.notNull("rng", rng);
        int[] strata = context.strata();
        if (strata == null) {
            throw new IllegalArgumentException(
                    "stratified sampling needs strata: give them in the dataset or use class labels");
        }
        return new Source(strata, rng);
    }

    /** @throws IllegalArgumentException if B &lt; 1 or B &gt; n, naming both */
    @Override
    public void checkBatchSize(int batchSize, int n) {
        Draws.checkPositive(batchSize, n);
        Draws.requireAtMost(batchSize, n, "for stratified sampling");
    }

    @Override
    public boolean needsStrata() {
        return true;
    }

    @Override
    public String name() {
        return "stratified";
    }

    @Override
    public String toString() {
        return name();
    }

    private static final class Source implements BatchSource {
        private final int n;
        private final int strataCount;
        private final int[] stratumSize;   // N_h
        private final int[] offset;        // stratum h's members sit in members[offset[h] .. offset[h + 1])
        private final int[] members;
        private final int[] position;      // next unused entry of each stratum's permutation
        private final int[] quota;         // n_h of the current batch (scratch)
        private final RandomGenerator rng;

        Source(int[] strata, RandomGenerator rng) {
            int n = strata.length;
            int max = -1;
            for (int i = 0; i < n; i++) {
                int s = strata[i];
                if (s < 0 || s >= n) {
                    throw new IllegalArgumentException("strata[" + i + "] (" + s + ") must be in [0, " + n
                            + "): strata are numbered 0..S-1 without gaps");
                }
                max = Math.max(max, s);
            }
            int count = max + 1;
            int[] sizes = new int[count];
            for (int s : strata) {
                sizes[s]++;
            }
            for (int h = 0; h < count; h++) {
                if (sizes[h] == 0) {
                    throw new IllegalArgumentException("stratum " + h + " is empty: strata must be numbered 0.."
                            + max + " without gaps");
                }
            }
            int[] start = new int[count + 1];
            for (int h = 0; h < count; h++) {
                start[h + 1] = start[h] + sizes[h];
            }
            int[] grouped = new int[n];
            int[] fill = start.clone();
            for (int i = 0; i < n; i++) {
                grouped[fill[strata[i]]++] = i;
            }
            this.n = n;
            this.strataCount = count;
            this.stratumSize = sizes;
            this.offset = start;
            this.members = grouped;
            this.position = sizes.clone(); // exhausted: the first draw from each stratum shuffles it
            this.quota = new int[count];
            this.rng = rng;
        }

        @Override
        public void next(int[] batch, double[] scales, int size) {
            Draws.requireSize(size);
            final int total = n;
            if (size > total) {
                Draws.requireAtMost(size, total, "for stratified sampling");
            }
            final int count = strataCount;
            final int[] sizes = stratumSize;
            final int[] q = quota;
            final long b = size;
            long remainders = 0;
            for (int h = 0; h < count; h++) {
                long share = b * sizes[h]; // B W_h = share / N, kept whole to allocate exactly
                long floor = share / total;
                q[h] = (int) floor;
                remainders += share - floor * total;
            }
            long extras = remainders / total; // Σ r_h is a whole number R (Σ_h B N_h = B N)
            if (extras > 0) {
                long point = rng.nextInt(total);
                long cumulative = 0;
                for (int h = 0; h < count; h++) {
                    long end = cumulative + (b * sizes[h]) % total;
                    if (point < end) { // each interval is shorter than N, so it holds at most one point
                        q[h]++;
                        point += total;
                    }
                    cumulative = end;
                }
            }
            int k = 0;
            for (int h = 0; h < count; h++) {
                int draws = q[h];
                if (draws == 0) {
                    continue;
                }
                long share = b * sizes[h];
                double scale = share >= total ? (double) share / ((double) total * draws) : 1.0;
                for (int j = 0; j < draws; j++) {
                    batch[k] = nextMember(h);
                    scales[k] = scale;
                    k++;
                }
            }
        }

        private int nextMember(int h) {
            int from = offset[h];
            int pos = position[h];
            if (pos == stratumSize[h]) {
                Draws.shuffle(members, from, offset[h + 1], rng);
                pos = 0;
            }
            position[h] = pos + 1;
            return members[from + pos];
        }

        @Override
        public boolean uniformScales() {
            return strataCount == 1;
        }
    }
}
