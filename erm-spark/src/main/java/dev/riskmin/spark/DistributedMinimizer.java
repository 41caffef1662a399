package dev.riskmin.spark;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.loss.Loss;
import dev.riskmin.loss.Losses;
import dev.riskmin.method.Averaging;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.sampling.Sampling;
import dev.riskmin.sampling.SequentialSampling;
import dev.riskmin.step.StepSchedule;
import dev.riskmin.util.Arguments;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.types.StructType;

import java.io.IOException;
import java.io.ObjectOutputStream;
import java.io.OutputStream;
import java.time.Duration;

/**
 * A configured minimizer of L(h) = (1/n) Σ<sub>i</sub> ω<sub>i</sub> ℓ(w·x<sub>i</sub> + b, y<sub>i</sub>) + R(w) over rows
 * held by Spark — the objective of the core's {@code Minimizer} on the same rows — by one of the
 * {@link Strategy strategies}. It returns the core's {@link Fit} and drives the core's listeners
 * ({@link dev.riskmin.hook.FitListener}, so {@code Diagnostics} and the stopping tests attach unchanged)
 * on the driver, one step per round. Immutable and thread-safe; build it once with {@link #builder()}.
 *
 * <p>Components travel as {@link Recipe}s and are made on every executor; listeners never leave the
 * driver. Defaults: squared loss, no penalty, plain SGD, sampling without replacement, the mini-batch
 * strategy with B = 1,024 rows per round (B = 1 per partition under the local strategies, as in memory),
 * 100 rounds, seed 0, an intercept, no averaging, tree aggregation of depth 2. The default step size is
 * the update rule's safe constant for the largest per-row smoothness constant
 * L<sub>max</sub> = max<sub>i</sub> L<sub>i</sub> + λ<sub>2</sub> over all rows (found by the first job), as the
 * in-memory minimizer's; a loss without a smoothness constant needs an explicit schedule.
 *
 * <p>Reproducibility: the same seed, data and partitioning give the same fit, bit for bit, whatever the
 * executors (see {@link #partitionSeed}); a different partitioning is a different run.
 *
 * <p>Not supported here (use the in-memory minimizer, or prepare the data in Spark): multiclass losses,
 * feature standardization, sparse rows, and sequential sampling (which would restart at row 0 of every
 * partition in every round).
 */
public final class DistributedMinimizer {
    static final int DEFAULT_ROUNDS = 100;
    static final int DEFAULT_MINI_BATCH = 1024;

    private final Plan plan;
    private final Strategy strategy;
    private final int batchSize;
    private final Averaging averaging;
    private final long rounds;
    private final double epochs;
    private final long maxEvaluations;
    private final Duration timeLimit;
    private final int treeDepth;

    private DistributedMinimizer(Builder b) {
        this.plan = new Plan(b.loss, b.penalty, b.rule, b.schedule, b.sampling, b.intercept, b.seed, b.explosionFactor);
        this.strategy = b.strategy;
        this.batchSize = b.batchSize > 0 ? b.batchSize
                : b.strategy.kind() == Strategy.Kind.MINI_BATCH ? DEFAULT_MINI_BATCH : 1;
        this.averaging = b.averaging;
        boolean noBudget = b.rounds < 0 && Double.isNaN(b.epochs) && b.maxEvaluations < 0 && b.timeLimit == null;
        this.rounds = noBudget ? DEFAULT_ROUNDS : b.rounds;
        this.epochs = b.epochs;
        this.maxEvaluations = b.maxEvaluations;
        this.timeLimit = b.timeLimit;
        this.treeDepth = b.treeDepth;
    }

    public static Builder builder() {
        return new Builder();
    }

    /**
     * The seed of partition k's draws in round r: s(seed, r, k) = seed ⊕ mix(r·2<sup>32</sup> + k), with mix the
     * SplitMix64 finalizer (a bijection with mix(0) = 0). Distinct (round, partition) pairs get distinct
     * seeds, and partition 0 in round 0 gets the fit's seed itself. Under local SGD, partition k's local run
     * of round r is the core's {@code Minimizer} with this seed; under the other strategies its sampler's
     * generator is made from it as the {@code Minimizer} makes its own.
     *
     * @throws IllegalArgumentException if the round is outside [0, 2<sup>31</sup>) or the partition is negative
     */
    public static long partitionSeed(long seed, long round, int partition) {
        return Seeds.derive(seed, Seeds.FIT, round, partition);
    }

    /**
     * Fits rows already converted (and cached) by {@link PartitionedData}; the data stay cached.
     *
     * @throws IllegalArgumentException if the data do not suit the configuration (a target outside the loss's
     *                                  domain, a partition smaller than the local batch under sampling without
     *                                  replacement, initial parameters or held-out data of the wrong size, a loss
     *                                  without smoothness constant and no schedule), naming the partition or option
     */
    public Fit fit(PartitionedData data, FitOptions options) {
        Arguments.notNull("data", data);
        Arguments.notNull("options", options);
        return new RoundLoop(this, data, options).run();
    }

    /**
     * Converts the rows (see {@link PartitionedData#of(Dataset, Columns)}), fits them and releases the
     * converted blocks.
     */
    public Fit fit(Dataset<Row> rows, Columns columns, FitOptions options) {
        Arguments.notNull("options", options);
        try (PartitionedData data = PartitionedData.of(rows, columns)) {
            return fit(data, options);
        }
    }

    /**
     * Converts an RDD of rows laid out as {@code schema} says (see
     * {@link PartitionedData#of(JavaRDD, StructType, Columns, PartitionedData.EmptyPartitions)}), fits them
     * and releases the converted blocks.
     */
    public Fit fit(JavaRDD<Row> rows, StructType schema, Columns columns, FitOptions options) {
        Arguments.notNull("options", options);
        try (PartitionedData data = PartitionedData.of(rows, schema, columns, PartitionedData.EmptyPartitions.REJECT)) {
            return fit(data, options);
        }
    }

    /**
     * Writes the full gradient ∇L(h) (data term by tree aggregation over all rows, plus the penalty's smooth
     * part) and returns L(h): one Spark job, n gradient evaluations.
     *
     * @param h    read only; length p = d (+1 with an intercept)
     * @param into written; length ≥ p
     */
    public double gradient(PartitionedData data, double[] h, double[] into) {
        Arguments.notNull("data", data);
        Arguments.notNull("h", h);
        Plan.Parts parts = plan.parts();
        int d = data.dimension();
        requireLength(h, parameterCount(d));
        RoundSummary s = Jobs.full(data.blocks(), plan, h, RoundLoop.shares(data), false, treeDepth);
        System.arraycopy(s.gradient, 0, into, 0, h.length);
        parts.penalty().addSmoothGradient(h, 0, d, 1.0, into);
        return s.loss + parts.penalty().value(h, 0, d);
    }

    /** @return L(h) over all rows (one Spark job) */
    public double objective(PartitionedData data, double[] h) {
        return gradient(data, h, new double[h.length]);
    }

    private int parameterCount(int d) {
        return plan.intercept ? d + 1 : d;
    }

    static void requireLength(double[] h, int p) {
        if (h.length != p) {
            throw new IllegalArgumentException("parameters have " + h.length + " entries, the problem has " + p);
        }
    }

    // ---- for the round loop --------------------------------------------------------------------------

    Plan plan() {
        return plan;
    }

    Strategy strategy() {
        return strategy;
    }

    int batchSize() {
        return batchSize;
    }

    Averaging averaging() {
        return averaging;
    }

    long rounds() {
        return rounds;
    }

    double epochs() {
        return epochs;
    }

    long maxEvaluations() {
        return maxEvaluations;
    }

    Duration timeLimit() {
        return timeLimit;
    }

    int treeDepth() {
        return treeDepth;
    }

    @Override
    public String toString() {
        Plan.Parts parts = plan.parts();
        return "DistributedMinimizer[strategy=" + strategy.name() + ", loss=" + parts.loss().name() + ", penalty="
                + parts.penalty().name() + ", rule=" + parts.rule().name() + ", sampling=" + parts.sampling().name()
                + ", batchSize=" + batchSize + ", seed=" + plan.seed + "]";
    }

    /**
     * Collects a configuration. Setters validate at once (the message names the option and value);
     * {@link #build()} checks that every recipe makes its component and can be serialized.
     */
    public static final class Builder {
        private Recipe<Loss> loss = Losses::squared;
        private Recipe<Penalty> penalty = Penalty::none;
        private Recipe<UpdateRule> rule = UpdateRule::sgd;
        private Recipe<StepSchedule> schedule;
        private Recipe<Sampling> sampling = Sampling::withoutReplacement;
        private Strategy strategy = Strategy.miniBatch();
        private int batchSize = -1;
        private Averaging averaging = Averaging.none();
        private long rounds = -1;
        private double epochs = Double.NaN;
        private long maxEvaluations = -1;
        private Duration timeLimit;
        private long seed;
        private boolean intercept = true;
        private double explosionFactor = 1e6;
        private int treeDepth = 2;

        private Builder() {
        }

        /** A single-output loss (default squared), e.g. {@code Losses::logistic}. */
        public Builder loss(Recipe<Loss> value) {
            this.loss = Arguments.notNull("loss", value);
            return this;
        }

        /** The penalty (default none), e.g. {@code () -> Penalty.l2(1e-3)}. */
        public Builder penalty(Recipe<Penalty> value) {
            this.penalty = Arguments.notNull("penalty", value);
            return this;
        }

        /**
         * The update rule (default plain SGD): applied on the driver under the mini-batch strategy (SAGA,
         * which keeps a gradient per row, is not available there), in every local run under local SGD, and
         * not used by the SVRG strategy, whose inner steps are SVRG's own.
         */
        public Builder updateRule(Recipe<UpdateRule> value) {
            this.rule = Arguments.notNull("updateRule", value);
            return this;
        }

        /**
         * The step schedule ε<sub>t</sub>, counted in rounds under the mini-batch strategy and in local steps
         * (r·H + t) under the local strategies (default: see the class documentation).
         */
        public Builder schedule(Recipe<StepSchedule> value) {
            this.schedule = Arguments.notNull("schedule", value);
            return this;
        }

        /** Shorthand for a constant step size. */
        public Builder stepSize(double value) {
            Arguments.positive("stepSize", value);
            this.schedule = () -> StepSchedule.constant(value);
            return this;
        }

        /** How each partition draws its rows (default without replacement); sequential sampling is refused. */
        public Builder sampling(Recipe<Sampling> value) {
            this.sampling = Arguments.notNull("sampling", value);
            return this;
        }

        /** How rounds are spent (default {@link Strategy#miniBatch()}). */
        public Builder strategy(Strategy value) {
            this.strategy = Arguments.notNull("strategy", value);
            return this;
        }

        /**
         * B: the rows per round summed over partitions under the mini-batch strategy (default 1,024), the rows
         * per local step of each partition under the local strategies (default 1).
         */
        public Builder batchSize(int value) {
            this.batchSize = Arguments.positive("batchSize", value);
            return this;
        }

        /** Iterate averaging over the rounds' parameters, on the driver (default none). */
        public Builder averaging(Averaging value) {
            this.averaging = Arguments.notNull("averaging", value);
            return this;
        }

        /** Stops after this many rounds. */
        public Builder rounds(long value) {
            this.rounds = Arguments.positive("rounds", value);
            return this;
        }

        /** Stops after this many passes' worth of draws (n draws each, summed over partitions). */
        public Builder epochs(double value) {
            this.epochs = Arguments.positive("epochs", value);
            return this;
        }

        /** Stops once the partitions have spent this many per-row gradient evaluations. */
        public Builder maxGradientEvaluations(long value) {
            this.maxEvaluations = Arguments.positive("maxGradientEvaluations", value);
            return this;
        }

        public Builder timeLimit(Duration value) {
            this.timeLimit = Arguments.positive("timeLimit", value);
            return this;
        }

        /** The seed of every random choice (see {@link DistributedMinimizer#partitionSeed}). */
        public Builder seed(long value) {
            this.seed = value;
            return this;
        }

        /** Whether the model has an unpenalized intercept (default true). */
        public Builder intercept(boolean value) {
            this.intercept = value;
            return this;
        }

        /** The divergence guard's factor (default 1e6), as the in-memory minimizer's. */
        public Builder explosionFactor(double value) {
            this.explosionFactor = Arguments.atLeast("explosionFactor", value, 1.0);
            return this;
        }

        /**
         * The depth of the aggregation tree (default 2): with P partitions the driver receives about
         * P<sup>1/depth</sup> summaries per job instead of P.
         */
        public Builder treeDepth(int value) {
            this.treeDepth = Arguments.positive("treeDepth", value);
            return this;
        }

        /**
         * @throws IllegalArgumentException if a recipe makes null or cannot be serialized (naming the option and
         *                                  the class that could not be), or the sampling is sequential
         */
        public DistributedMinimizer build() {
            requireSerializable("loss", loss);
            requireSerializable("penalty", penalty);
            requireSerializable("updateRule", rule);
            requireSerializable("sampling", sampling);
            if (schedule != null) {
                requireSerializable("schedule", schedule);
            }
            Sampling made = sampling.make();
            if (made instanceof SequentialSampling) {
                throw new IllegalArgumentException("sampling " + made.name() + " would restart at row 0 of every "
                        + "partition in every round of a distributed fit, so its batches would repeat; choose a "
                        + "random sampling");
            }
            if (averaging.active() && rounds > 0 && Double.isNaN(epochs)) {
                averaging.firstAveragedStep(rounds);
            }
            return new DistributedMinimizer(this);
        }

        private static void requireSerializable(String option, Recipe<?> recipe) {
            if (recipe.make() == null) {
                throw new IllegalArgumentException("the " + option + " recipe made null");
            }
            try (ObjectOutputStream out = new ObjectOutputStream(OutputStream.nullOutputStream())) {
                out.writeObject(recipe);
            } catch (IOException e) {
                throw new IllegalArgumentException("the " + option + " recipe cannot be serialized (" + e
                        + "); a recipe may capture only numbers, strings and other serializable values, and "
                        + "should make its component inside, e.g. () -> Penalty.l2(1e-3)", e);
            }
        }
    }
}
