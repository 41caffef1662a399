package dev.riskmin.spark;

import dev.riskmin.util.Arguments;

/**
 * How a distributed fit spends its rounds. A round costs one or two Spark jobs; each job ships the
 * parameters (p numbers) to every partition and brings back one summary of O(p) numbers per partition,
 * combined by tree aggregation. The strategies differ in how much work a partition does per round, and so
 * in how many rounds (jobs) a fit needs. Immutable.
 *
 * <ul>
 * <li>{@link #miniBatch()}: each round every partition draws its share of a batch of B rows, the driver sums
 * the gradients and takes one step with the configured update rule (Robbins &amp; Monro 1951 with a batch
 * spread over the partitions; the estimate is stratified by partition, so it is unbiased and no noisier
 * than a simple random sample of B rows). One job per step: the same iterates as in-memory mini-batch SGD
 * with the same batch size, to sampling.</li>
 * <li>{@link #localSgd(int)}: each round every partition runs H steps of the configured update rule on its
 * own rows from the round's parameters, and the driver averages the local parameters with weights
 * π<sub>k</sub> = W<sub>k</sub>/W. With one round this is the one-shot averaging of Zinkevich, Weimer, Smola
 * &amp; Li (NIPS 2010); with H local steps between averages it is local SGD (Stich, ICLR 2019), which reaches
 * the rate of mini-batch SGD with up to √T fewer communications when the partitions hold similar data.
 * H = 1 is mini-batch SGD with batch P·B (for smooth penalties). Being a whole in-memory fit, a local run
 * also pays what every fit pays once: it draws a fresh permutation for sampling without replacement, and
 * evaluates its partition's objective at its end (n<sub>k</sub> loss evaluations); choose H·B of the order
 * of n<sub>k</sub> or more, so that this stays a small part of the round.</li>
 * <li>{@link #svrg(int)}: each round first aggregates the full gradient μ = ∇L(h<sub>r</sub>) (one job, n
 * gradient evaluations), then every partition runs m inner steps along ĝ<sub>k</sub>(h) − ĝ<sub>k</sub>(h<sub>r</sub>) + μ
 * and the driver averages (Johnson &amp; Zhang, NIPS 2013, with local inner loops as in the distributed
 * variants of Lee, Lin, Ma &amp; Yang, JMLR 18, 2017, from memory). At the optimum every inner step is zero,
 * so there is no noise floor: a constant step converges to the optimum itself on strongly convex
 * objectives. Two jobs per round.</li>
 * </ul>
 */
public final class Strategy {
    enum Kind {
        MINI_BATCH, LOCAL_SGD, SVRG
    }

    private static final Strategy MINI_BATCH = new Strategy(Kind.MINI_BATCH, 1);

    private final Kind kind;
    private final int localSteps;

    private Strategy(Kind kind, int localSteps) {
        this.kind = kind;
        this.localSteps = localSteps;
    }

    /** Distributed mini-batch: one step per round, taken on the driver. */
    public static Strategy miniBatch() {
        return MINI_BATCH;
    }

    /**
     * Local SGD: H local steps per partition per round, then a weighted average.
     *
     * @throws IllegalArgumentException if localSteps &lt; 1
     */
    public static Strategy localSgd(int localSteps) {
        return new Strategy(Kind.LOCAL_SGD, Arguments.positive("localSteps", localSteps));
    }

    /**
     * SVRG rounds: a full-gradient anchor, then m inner steps per partition, then a weighted average.
     *
     * @throws IllegalArgumentException if innerSteps &lt; 1
     */
    public static Strategy svrg(int innerSteps) {
        return new Strategy(Kind.SVRG, Arguments.positive("innerSteps", innerSteps));
    }

    Kind kind() {
        return kind;
    }

    /** @return H (local SGD), m (SVRG), or 1 (mini-batch): the steps a partition's schedule advances per round */
    public int localSteps() {
        return localSteps;
    }

    /** @return a short name for reports, e.g. "local SGD (H=50)" */
    public String name() {
        switch (kind) {
            case MINI_BATCH:
                return "mini-batch";
            case LOCAL_SGD:
                return "local SGD (H=" + localSteps + ")";
            default:
                return "SVRG rounds (m=" + localSteps + ")";
        }
    }

    @Override
    public String toString() {
        return name();
    }
}
