package dev.riskmin;

import dev.riskmin.data.Dataset;
import dev.riskmin.data.Standardizer;
import dev.riskmin.data.TargetKind;
import dev.riskmin.hook.ListenerGroup;
import dev.riskmin.hook.RunInfo;
import dev.riskmin.loss.Loss;
import dev.riskmin.loss.MulticlassLoss;
import dev.riskmin.method.Averaging;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.method.Updater;
import dev.riskmin.model.LinearModel;
import dev.riskmin.model.MulticlassModel;
import dev.riskmin.objective.GradientThreads;
import dev.riskmin.objective.LinearObjective;
import dev.riskmin.objective.MulticlassObjective;
import dev.riskmin.objective.Objective;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.sampling.BatchSource;
import dev.riskmin.sampling.Sampling;
import dev.riskmin.sampling.SamplingContext;
import dev.riskmin.step.Calibration;
import dev.riskmin.step.StepCalibration;
import dev.riskmin.step.StepSchedule;
import dev.riskmin.util.Arguments;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

import java.time.Duration;
import java.util.random.RandomGenerator;
import java.util.random.RandomGeneratorFactory;

/**
 * A configured stochastic minimizer of L(h) = (1/n) Σ<sub>i</sub> ω<sub>i</sub> ℓ<sub>i</sub>(h) + R(h).
 * Built once with {@link #builder()}, it is immutable and thread-safe: any number of threads may
 * call {@link #fit} at once, each fit keeping its own state. The same seed gives the same result,
 * bit for bit, for a given number of {@link Builder#threads(int) threads}.
 *
 * <p>Defaults: squared loss, no penalty, plain SGD, sampling without replacement, batch size 1,
 * 10 epochs, seed 0, an intercept, no standardization, no averaging, one thread. The default step size is
 * constant at the update rule's safe value for the largest per-sample smoothness constant
 * L<sub>max</sub> = max<sub>i</sub> L<sub>i</sub> + λ<sub>2</sub> (e.g. 1/L<sub>max</sub> for SGD, 1/(3L<sub>max</sub>) for SAGA);
 * where the loss has no smoothness constant (hinge, absolute, pinball) the initial step is calibrated
 * on a subsample (Bottou 2012) and decays as ε<sub>0</sub>(1 + t/m)<sup>−3/4</sup> with m steps per epoch,
 * which meets the Robbins–Monro conditions.
 *
 * <p>A converged fit is not a validated model: validate it on held-out data and, where it drives
 * decisions about people, money or safety, under the domain's own rules and review.
 */
public final class Minimizer {
    private static final Logger LOG = LoggerFactory.getLogger(Minimizer.class);
    private static final String GENERATOR = "L64X128MixRandom";
    private static final int CALIBRATION_SAMPLES = 1000;

    private final Loss loss;
    private final MulticlassLoss multiclassLoss;
    private final Penalty penalty;
    private final UpdateRule rule;
    private final StepSchedule schedule;
    private final Sampling sampling;
    private final int batchSize;
    private final Averaging averaging;
    private final double epochs;
    private final long maxSteps;
    private final long maxEvaluations;
    private final Duration timeLimit;
    private final long seed;
    private final boolean intercept;
    private final boolean standardize;
    private final double explosionFactor;
    private final int threads;
    private final int parallelThreshold;

    private Minimizer(Builder b) {
        this.loss = b.loss;
        this.multiclassLoss = b.multiclassLoss;
        this.penalty = b.penalty;
        this.rule = b.rule;
        this.schedule = b.schedule;
        this.sampling = b.sampling;
        this.batchSize = b.batchSize;
        this.averaging = b.averaging;
        boolean noBudget = Double.isNaN(b.epochs) && b.maxSteps < 0 && b.maxEvaluations < 0 && b.timeLimit == null;
        this.epochs = noBudget ? 10.0 : b.epochs;
        this.maxSteps = b.maxSteps;
        this.maxEvaluations = b.maxEvaluations;
        this.timeLimit = b.timeLimit;
        this.seed = b.seed;
        this.intercept = b.intercept;
        this.standardize = b.standardize;
        this.explosionFactor = b.explosionFactor;
        this.threads = b.threads;
        this.parallelThreshold = b.parallelThreshold;
    }

    public static Builder builder() {
        return new Builder();
    }

    /** Fits dense features and real targets (binary labels in {0,1} or {−1,+1}, counts and proportions included). */
    public Fit fit(double[][] x, double[] y) {
        return fit(Dataset.of(x, y), FitOptions.none());
    }

    /** Fits dense features and class labels 0 … K−1. */
    public Fit fit(double[][] x, int[] labels) {
        Dataset data = multiclassLoss != null
                ? Dataset.of(x, labels)
                : Dataset.builder().features(x).targets(asDoubles(labels)).build();
        return fit(data, FitOptions.none());
    }

    public Fit fit(Dataset data) {
        return fit(data, FitOptions.none());
    }

    /**
     * Fits a linear model (single-output, or K-class when a multiclass loss is configured).
     *
     * @throws IllegalArgumentException if a target is outside the loss's domain, the batch size does not
     *                                  suit the sampling, strata are needed but missing, or averaging
     *                                  would start after the budget ends — each message naming the option
     *                                  and value
     */
    public Fit fit(Dataset data, FitOptions options) {
        Arguments.notNull("data", data);
        Arguments.notNull("options", options);
        Standardizer standardizer = standardize ? Standardizer.fit(data) : null;
        Dataset fitted = standardizer != null ? standardizer.apply(data) : data;
        Objective objective;
        Objective heldOut = null;
        Dataset heldOutData = options.heldOut();
        if (heldOutData != null) {
            if (heldOutData.dimension() != data.dimension()) {
                throw new IllegalArgumentException("held-out data have " + heldOutData.dimension()
                        + " features, the training data " + data.dimension());
            }
            heldOutData = standardizer != null ? standardizer.apply(heldOutData) : heldOutData;
        }
        int blocks;
        FitLoop.Outcome out;
        // The workers of the parallel batch gradient live for this fit only (started at the first large
        // batch); they are stopped before the result is assembled, whatever way the loop ended.
        GradientThreads workers = threads > 1 && multiclassLoss == null
                ? GradientThreads.of(threads, parallelThreshold) : null;
        try {
            if (multiclassLoss != null) {
                objective = MulticlassObjective.of(fitted, multiclassLoss, penalty, intercept);
                if (heldOutData != null) {
                    if (heldOutData.classes() != fitted.classes()) {
                        throw new IllegalArgumentException("held-out data have " + heldOutData.classes()
                                + " classes, the training data " + fitted.classes());
                    }
                    heldOut = MulticlassObjective.of(heldOutData, multiclassLoss, penalty, intercept);
                }
                blocks = fitted.classes();
            } else {
                if (data.targetKind() == TargetKind.CLASSES && data.classes() > 2) {
                    throw new IllegalArgumentException("the dataset has " + data.classes() + " classes but the loss "
                            + loss.name() + " is single-output; configure a multiclass loss");
                }
                objective = workers != null
                        ? LinearObjective.of(fitted, loss, penalty, intercept, workers)
                        : LinearObjective.of(fitted, loss, penalty, intercept);
                if (heldOutData != null) {
                    heldOut = LinearObjective.of(heldOutData, loss, penalty, intercept);
                }
                blocks = 1;
            }
            double[] h0 = options.initialParameters();
            if (h0 == null) {
                h0 = new double[objective.dimension()];
            } else {
                requireLength(h0, objective.dimension());
                if (standardizer != null) {
                    h0 = standardizer.fromOriginalScale(h0, blocks, intercept);
                }
            }
            int[] strata = sampling.needsStrata() ? strataOf(fitted) : null;
            out = run(objective, heldOut, h0, strata, options);
        } finally {
            if (workers != null) {
                workers.close();
            }
        }
        double[] params = out.parameters();
        double[] last = out.lastIterate();
        if (standardizer != null) {
            params = standardizer.toOriginalScale(params, blocks, intercept);
            last = standardizer.toOriginalScale(last, blocks, intercept);
        }
        int d = data.dimension();
        LinearModel model = null;
        MulticlassModel multiclass = null;
        if (multiclassLoss != null) {
            int stride = intercept ? d + 1 : d;
            double[] w = new double[blocks * d];
            double[] b = new double[blocks];
            for (int k = 0; k < blocks; k++) {
                System.arraycopy(params, k * stride, w, k * d, d);
                b[k] = intercept ? params[k * stride + d] : 0.0;
            }
            multiclass = MulticlassModel.of(w, b, d, multiclassLoss.response(), multiclassLoss.name());
        } else {
            double[] w = java.util.Arrays.copyOf(params, d);
            model = LinearModel.of(w, intercept ? params[d] : 0.0, loss.response(), loss.name());
        }
        return finish(out, model, multiclass, params, last, options, standardizer != null);
    }

    /**
     * Fits a general objective (for example a user's {@link dev.riskmin.objective.SampleFunction}
     * through {@link dev.riskmin.objective.GeneralObjective}); the fit has parameters but no model.
     * The configured loss, intercept and standardization do not apply; stratified sampling is not
     * available (no strata).
     */
    public Fit fit(Objective objective, FitOptions options) {
        Arguments.notNull("objective", objective);
        Arguments.notNull("options", options);
        dev.riskmin.util.Allocations.requireParameters("objective dimension (" + objective.dimension() + ")",
                objective.dimension());
        double[] h0 = options.initialParameters();
        if (h0 == null) {
            h0 = new double[objective.dimension()];
        } else {
            requireLength(h0, objective.dimension());
        }
        if (sampling.needsStrata()) {
            throw new IllegalArgumentException("sampling " + sampling.name()
                    + " needs strata, which a general objective does not have; choose another sampling");
        }
        FitLoop.Outcome out = run(objective, null, h0, null, options);
        return finish(out, null, null, out.parameters(), out.lastIterate(), options, false);
    }

    private Fit finish(FitLoop.Outcome out, LinearModel model, MulticlassModel multiclass, double[] params,
                       double[] last, FitOptions options, boolean standardized) {
        Fit fit = new Fit(model, multiclass, params, last, out.averaged(), out.reason(), out.detail(), out.steps(),
                (double) out.draws() / out.sampleCount(), out.gradientEvaluations(),
                out.probeEvaluations(), Duration.ofNanos(out.nanos()), out.initialObjective(), out.finalObjective(),
                out.stepSizeFactor(), out.batchSize(), out.listenerFailures(), standardized);
        ListenerGroup.finished(options.listenerList(), fit);
        return fit;
    }

    private FitLoop.Outcome run(Objective objective, Objective heldOut, double[] h0, int[] strata,
                                FitOptions options) {
        int n = objective.size();
        sampling.checkBatchSize(batchSize, n);
        RandomGenerator.SplittableGenerator master =
                RandomGeneratorFactory.<RandomGenerator.SplittableGenerator>of(GENERATOR).create(seed);
        RandomGenerator samplingRng = master.split();
        RandomGenerator probeRng = master.split();
        RandomGenerator calibrationRng = master.split();
        int stepsPerEpoch = (n + batchSize - 1) / batchSize;
        long maxDraws = Double.isNaN(epochs) ? -1 : (long) Math.ceil(epochs * n);
        long planned = plannedSteps(maxDraws);
        double lMax = largestSmoothness(objective);
        StepSchedule steps = schedule != null ? schedule : defaultSchedule(objective, h0, stepsPerEpoch, calibrationRng, lMax);
        SamplingContext context = SamplingContext.of(n, strata, objective::sampleSmoothness);
        if (objective instanceof LinearObjective) {
            context = context.withPrefetcher(((LinearObjective) objective)::prefetchRows);
        }
        BatchSource source = sampling.start(context, samplingRng);
        Updater updater = rule.start(objective, h0, stepsPerEpoch);
        RunInfo info = new RunInfo(n, objective.dimension(), batchSize, sampling.independentDraws(),
                lossName(objective), penalty.name(), rule.name(), steps.name(), sampling.name(), planned, seed,
                rule.varianceReduced(), heldOut != null, lMax);
        long timeNanos = timeLimit == null ? -1 : timeLimit.toNanos();
        FitLoop.Settings settings = new FitLoop.Settings(updater, source, sampling, steps, averaging, batchSize,
                maxSteps, maxDraws, maxEvaluations, timeNanos, explosionFactor, probeRng, info);
        return new FitLoop(objective, heldOut, h0, settings, options.listenerList(), options.cancellation()).run();
    }

    private String lossName(Objective objective) {
        if (objective instanceof LinearObjective || objective instanceof MulticlassObjective) {
            return multiclassLoss != null ? multiclassLoss.name() : loss.name();
        }
        return "general";
    }

    private long plannedSteps(long maxDraws) {
        long planned = -1;
        if (maxDraws >= 0) {
            planned = (maxDraws + batchSize - 1) / batchSize;
        }
        if (maxSteps >= 0) {
            planned = planned < 0 ? maxSteps : Math.min(planned, maxSteps);
        }
        return planned;
    }

    /** @return L_max = max_i L_i + λ2 (+∞ for losses without a smoothness constant); one O(n) pass */
    private static double largestSmoothness(Objective objective) {
        double lMax = 0;
        for (int i = 0, n = objective.size(); i < n; i++) {
            lMax = Math.max(lMax, objective.sampleSmoothness(i));
        }
        return lMax + objective.penalty().l2Strength();
    }

    private StepSchedule defaultSchedule(Objective objective, double[] h0, int stepsPerEpoch, RandomGenerator rng,
                                         double lMax) {
        if (Double.isFinite(lMax) && lMax > 0) {
            return StepSchedule.constant(rule.defaultStepSize(lMax));
        }
        int trial = Math.min(objective.size(), CALIBRATION_SAMPLES);
        Calibration calibration = StepCalibration.of(batchSize).withTrialSamples(trial).calibrate(objective, h0, rng);
        LOG.debug("default step size calibrated on {} samples: {}", trial, calibration);
        double eps0 = calibration.stepSize();
        return StepSchedule.polynomial(eps0, stepsPerEpoch, 0.75);
    }

    private int[] strataOf(Dataset data) {
        if (data.stratified()) {
            return data.strataCopy();
        }
        int n = data.size();
        int[] strata = new int[n];
        if (data.targetKind() == TargetKind.CLASSES) {
            for (int i = 0; i < n; i++) {
                strata[i] = (int) data.target(i);
            }
        } else {
            for (int i = 0; i < n; i++) {
                double y = data.target(i);
                if (y != 1 && y != 0 && y != -1) {
                    throw new IllegalArgumentException("sampling " + sampling.name() + " needs strata: y[" + i + "] ("
                            + y + ") is not a binary label, so give strata in the dataset");
                }
            }
            for (int i = 0; i < n; i++) {
                strata[i] = data.target(i) > 0 ? 1 : 0;
            }
            boolean anyPositive = false;
            boolean anyNegative = false;
            for (int s : strata) {
                anyPositive |= s == 1;
                anyNegative |= s == 0;
            }
            if (!anyPositive || !anyNegative) {
                java.util.Arrays.fill(strata, 0); // a single class is a single stratum
            }
        }
        return renumber(strata);
    }

    /** Renumbers stratum ids to 0..S−1 without gaps (a class absent from the data has no stratum). */
    private static int[] renumber(int[] strata) {
        int max = 0;
        for (int s : strata) {
            max = Math.max(max, s);
        }
        int[] map = new int[max + 1];
        java.util.Arrays.fill(map, -1);
        int next = 0;
        for (int s : strata) {
            if (map[s] < 0) {
                map[s] = next++;
            }
        }
        int[] out = new int[strata.length];
        for (int i = 0; i < strata.length; i++) {
            out[i] = map[strata[i]];
        }
        return out;
    }

    private static void requireLength(double[] h0, int p) {
        if (h0.length != p) {
            throw new IllegalArgumentException("initialParameters has " + h0.length + " entries, the problem has " + p
                    + " parameters");
        }
    }

    private static double[] asDoubles(int[] labels) {
        double[] y = new double[labels.length];
        for (int i = 0; i < labels.length; i++) {
            y[i] = labels[i];
        }
        return y;
    }

    @Override
    public String toString() {
        return "Minimizer[loss=" + (multiclassLoss != null ? multiclassLoss.name() : loss.name()) + ", penalty="
                + penalty.name() + ", rule=" + rule.name() + ", schedule="
                + (schedule == null ? "default" : schedule.name()) + ", sampling=" + sampling.name() + ", batchSize="
                + batchSize + ", averaging=" + averaging + ", seed=" + seed + (threads > 1 ? ", threads=" + threads : "") + "]";
    }

    /**
     * Collects a configuration. Setters validate their argument at once (the message names the
     * option and value); {@link #build()} checks combinations and returns a new immutable
     * {@link Minimizer}.
     */
    public static final class Builder {
        private Loss loss = dev.riskmin.loss.Losses.squared();
        private MulticlassLoss multiclassLoss;
        private Penalty penalty = Penalty.none();
        private UpdateRule rule = UpdateRule.sgd();
        private StepSchedule schedule;
        private Sampling sampling = Sampling.withoutReplacement();
        private int batchSize = 1;
        private Averaging averaging = Averaging.none();
        private double epochs = Double.NaN;
        private long maxSteps = -1;
        private long maxEvaluations = -1;
        private Duration timeLimit;
        private long seed;
        private boolean intercept = true;
        private boolean standardize;
        private double explosionFactor = 1e6;
        private int threads = 1;
        private int parallelThreshold = GradientThreads.DEFAULT_PARALLEL_THRESHOLD;

        private Builder() {
        }

        /** A single-output loss (default squared). */
        public Builder loss(Loss value) {
            this.loss = Arguments.notNull("loss", value);
            this.multiclassLoss = null;
            return this;
        }

        /** A K-class loss; fits then need class labels and give a {@link MulticlassModel}. */
        public Builder loss(MulticlassLoss value) {
            this.multiclassLoss = Arguments.notNull("loss", value);
            return this;
        }

        public Builder penalty(Penalty value) {
            this.penalty = Arguments.notNull("penalty", value);
            return this;
        }

        public Builder updateRule(UpdateRule value) {
            this.rule = Arguments.notNull("updateRule", value);
            return this;
        }

        /** The step-size schedule ε<sub>t</sub> (default: see the class documentation). */
        public Builder schedule(StepSchedule value) {
            this.schedule = Arguments.notNull("schedule", value);
            return this;
        }

        /** Shorthand for a constant step size. */
        public Builder stepSize(double value) {
            Arguments.positive("stepSize", value);
            this.schedule = StepSchedule.constant(value);
            return this;
        }

        public Builder sampling(Sampling value) {
            this.sampling = Arguments.notNull("sampling", value);
            return this;
        }

        public Builder batchSize(int value) {
            this.batchSize = Arguments.positive("batchSize", value);
            return this;
        }

        public Builder averaging(Averaging value) {
            this.averaging = Arguments.notNull("averaging", value);
            return this;
        }

        /** Stops after this many passes over the data (n draws each; fractions allowed). */
        public Builder epochs(double value) {
            this.epochs = Arguments.positive("epochs", value);
            return this;
        }

        public Builder maxSteps(long value) {
            this.maxSteps = Arguments.positive("maxSteps", value);
            return this;
        }

        public Builder maxGradientEvaluations(long value) {
            this.maxEvaluations = Arguments.positive("maxGradientEvaluations", value);
            return this;
        }

        public Builder timeLimit(Duration value) {
            this.timeLimit = Arguments.positive("timeLimit", value);
            return this;
        }

        public Builder seed(long value) {
            this.seed = value;
            return this;
        }

        /** Whether the model has an unpenalized intercept (default true). */
        public Builder intercept(boolean value) {
            this.intercept = value;
            return this;
        }

        /**
         * Whether to standardize features before fitting (default false). The penalty then acts on the
         * standardized scale; the model is reported on the original scale.
         */
        public Builder standardize(boolean value) {
            this.standardize = value;
            return this;
        }

        /** The divergence guard's factor (default 1e6): see {@link StopReason#DIVERGED}. */
        public Builder explosionFactor(double value) {
            this.explosionFactor = Arguments.atLeast("explosionFactor", value, 1.0);
            return this;
        }

        /**
         * The number of threads T (default 1) that evaluate a batch gradient of at least
         * {@link #parallelThreshold(int) parallelThreshold} draws together, the fitting thread included.
         * The batch is cut into T contiguous chunks whose partial sums are added in a fixed order, so a
         * fit is still bit-identical from run to run for a given T; its results differ from T = 1 only
         * by rounding (see {@link LinearObjective#batchGradient}). The T − 1 daemon worker threads
         * ({@code riskmin-gradient-1} …) are started at the first large batch of a fit and stopped
         * before {@code fit} returns or throws. Applies to single-output linear models, dense or sparse,
         * and to what update rules compute through the batch gradient (SGD, momentum, Nesterov, AdaGrad,
         * Adam, SVRG; SAGA for linear models uses its own per-sample loop and stays on one thread);
         * multiclass models and general objectives stay on one thread. Worth it only for large batches
         * (B ≥ 1024 or so) on a machine with idle cores. A loss of your own is then called from several
         * threads at once and must be stateless or thread-safe (the library's losses are).
         *
         * @throws IllegalArgumentException naming threads unless 1 ≤ value ≤ {@value GradientThreads#MAX_THREADS}
         */
        public Builder threads(int value) {
            if (value < 1 || value > GradientThreads.MAX_THREADS) {
                throw new IllegalArgumentException("threads (" + value + ") must be in [1, "
                        + GradientThreads.MAX_THREADS + "]");
            }
            this.threads = value;
            return this;
        }

        /**
         * The smallest batch, in draws, whose gradient is split across {@link #threads(int) threads}
         * (default {@value GradientThreads#DEFAULT_PARALLEL_THRESHOLD}); smaller batches are evaluated on
         * the fitting thread alone, where handing work to another thread would cost more than it saves.
         *
         * @throws IllegalArgumentException naming parallelThreshold if the value is below 1
         */
        public Builder parallelThreshold(int value) {
            this.parallelThreshold = Arguments.positive("parallelThreshold", value);
            return this;
        }

        /**
         * @throws IllegalArgumentException if averaging would start after the step budget ends (naming both)
         */
        public Minimizer build() {
            if (maxSteps >= 0 && Double.isNaN(epochs)) {
                averaging.firstAveragedStep(maxSteps);
            }
            return new Minimizer(this);
        }
    }
}
