package dev.riskmin.sampling;

import dev.riskmin.util.Arguments;
import java.util.random.RandomGenerator;

/**
 * Importance sampling by per-sample smoothness, partially biased towards uniform: each draw picks
 * sample i with probability
 * <pre>
 *   p<sub>i</sub> = u/n + (1 − u) L<sub>i</sub> / Σ<sub>k</sub> L<sub>k</sub>
 * </pre>
 * with uniform share u ∈ (0, 1] (default ½) and scale s<sub>i</sub> = 1/(n p<sub>i</sub>), so that
 * E[s<sub>i</sub> g<sub>i</sub>] = Σ<sub>i</sub> p<sub>i</sub> g<sub>i</sub>/(n p<sub>i</sub>) = G exactly (METHODS §9).
 * Drawing in proportion to the smoothness constants L<sub>i</sub> replaces the largest L<sub>i</sub>
 * by their mean in SGD's step-size limit; mixing in the uniform share (their "partially biased
 * sampling") keeps every p<sub>i</sub> ≥ u/n, so no sample is starved and no scale exceeds 1/u
 * (Needell, Srebro &amp; Ward, "Stochastic gradient descent, weighted sampling, and the randomized
 * Kaczmarz algorithm", NIPS 2014; Math. Program. 155, 2016). With u = 1, or when all L<sub>i</sub>
 * are equal (or all zero), this is uniform sampling with replacement and every scale is 1.
 *
 * <p>Draws use Walker's alias method, O(1) per draw after O(n) set-up (Walker, "An efficient method
 * for generating discrete random variables with general distributions", ACM TOMS 3(3), 1977), with
 * the table built by Vose's numerically stable construction (Vose, "A linear algorithm for
 * generating random numbers with a given distribution", IEEE TSE 17(9), 1991; volume and issue
 * numbers from memory). Each draw takes one bounded int and one double from the generator.
 */
public final class ImportanceSampling implements Sampling {
    /** The default uniform share u = ½ of the partially biased sampling. */
    public static final double DEFAULT_UNIFORM_SHARE = 0.5;

    private final double uniformShare;

    private ImportanceSampling(double uniformShare) {
        this.uniformShare = uniformShare;
    }

    /** @throws IllegalArgumentException naming the value unless 0 &lt; uniformShare ≤ 1 */
    static ImportanceSampling of(double uniformShare) {
        if (!(uniformShare > 0 && uniformShare <= 1)) {
            throw new IllegalArgumentException("uniformShare (" + uniformShare + ") must be in (0, 1]");
        }
        return new ImportanceSampling(uniformShare);
    }

    /** @return u, the share of probability spread uniformly */
    public double uniformShare() {
        return uniformShare;
    }

    /**
     * @throws IllegalArgumentException naming the first sample whose smoothness L<sub>i</sub> is
     *                                  infinite, NaN or negative (unknown smoothness reads as +∞)
     */
    @Override
    public boolean independentDraws() {
        return true;
    }

    @Override
    public BatchSource start(SamplingContext context, RandomGenerator rng) {
        Arguments.notNull("context", context);
        Arguments.notNull("rng", rng);
        int n = context.size();
        double[] smoothness = new double[n];
        double max = 0;
        for (int i = 0; i < n; i++) {
            double l = context.smoothness(i);
            if (!Double.isFinite(l)) {
                throw new IllegalArgumentException("importance sampling needs finite per-sample smoothness; sample "
                        + i + " has " + l);
            }
            if (l < 0) {
                throw new IllegalArgumentException("importance sampling needs per-sample smoothness >= 0; sample "
                        + i + " has " + l);
            }
            smoothness[i] = l;
            max = Math.max(max, l);
        }
        if (uniformShare == 1 || max == 0 || allEqual(smoothness)) {
            return new UniformSource(n, rng);
        }
        // Dividing by the largest L_i first keeps the sum finite however large the constants are.
        double sum = 0;
        for (int i = 0; i < n; i++) {
            smoothness[i] /= max;
            sum += smoothness[i];
        }
        double[] p = new double[n];
        double u = uniformShare;
        for (int i = 0; i < n; i++) {
            p[i] = u / n + (1 - u) * smoothness[i] / sum;
        }
        return new AliasSource(p, rng);
    }

    private static boolean allEqual(double[] values) {
        for (double v : values) {
            if (v != values[0]) {
                return false;
            }
        }
        return true;
    }

    @Override
    public void checkBatchSize(int batchSize, int n) {
        Draws.checkPositive(batchSize, n);
    }

    @Override
    public String name() {
        return "importance(uniformShare=" + uniformShare + ")";
    }

    @Override
    public String toString() {
        return name();
    }

    @Override
    public boolean equals(Object other) {
        return other instanceof ImportanceSampling
                && Double.compare(((ImportanceSampling) other).uniformShare, uniformShare) == 0;
    }

    @Override
    public int hashCode() {
        return Double.hashCode(uniformShare);
    }

    /** All p<sub>i</sub> equal: plain uniform draws with replacement, scale 1. */
    private static final class UniformSource implements BatchSource {
        private final int n;
        private final RandomGenerator rng;

        UniformSource(int n, RandomGenerator rng) {
            this.n = n;
            this.rng = rng;
        }

        @Override
        public void next(int[] batch, double[] scales, int size) {
            Draws.requireSize(size);
            for (int k = 0; k < size; k++) {
                batch[k] = rng.nextInt(n);
                scales[k] = 1.0;
            }
        }

        @Override
        public boolean uniformScales() {
            return true;
        }
    }

    /**
     * The alias table: column i is kept with probability {@code keep[i]} and otherwise yields
     * {@code alias[i]}; columns are chosen uniformly, so P(i) = (keep[i] + Σ<sub>j: alias[j] = i</sub> (1 − keep[j]))/n = p<sub>i</sub>.
     */
    private static final class AliasSource implements BatchSource {
        private final int n;
        private final double[] keep;
        private final int[] alias;
        private final double[] scale;
        private final RandomGenerator rng;

        AliasSource(double[] p, RandomGenerator rng) {
            int n = p.length;
            this.n = n;
            this.keep = new double[n];
            this.alias = new int[n];
            this.scale = new double[n];
            this.rng = rng;
            double[] mass = new double[n];
            int[] small = new int[n];
            int[] large = new int[n];
            int smallCount = 0;
            int largeCount = 0;
            for (int i = 0; i < n; i++) {
                scale[i] = 1.0 / (n * p[i]);
                mass[i] = p[i] * n;
                alias[i] = i;
                if (mass[i] < 1.0) {
                    small[smallCount++] = i;
                } else {
                    large[largeCount++] = i;
                }
            }
            // Vose: pair each under-full column with an over-full donor; (donor + column) − 1 rather than
            // donor − (1 − column) keeps the rounding error from accumulating in the donor.
            while (smallCount > 0 && largeCount > 0) {
                int column = small[--smallCount];
                int donor = large[--largeCount];
                keep[column] = mass[column];
                alias[column] = donor;
                mass[donor] = (mass[donor] + mass[column]) - 1.0;
                if (mass[donor] < 1.0) {
                    small[smallCount++] = donor;
                } else {
                    large[largeCount++] = donor;
                }
            }
            // What is left is full up to rounding.
            while (largeCount > 0) {
                keep[large[--largeCount]] = 1.0;
            }
            while (smallCount > 0) {
                keep[small[--smallCount]] = 1.0;
            }
        }

        @Override
        public void next(int[] batch, double[] scales, int size) {
            Draws.requireSize(size);
            final int count = n;
            final double[] keepColumn = keep;
            final int[] aliasOf = alias;
            final double[] scaleOf = scale;
            final RandomGenerator random = rng;
            for (int k = 0; k < size; k++) {
                int i = random.nextInt(count);
                if (random.nextDouble() >= keepColumn[i]) {
                    i = aliasOf[i];
                }
                batch[k] = i;
                scales[k] = scaleOf[i];
            }
        }

        @Override
        public boolean uniformScales() {
            return false;
        }
    }
}
