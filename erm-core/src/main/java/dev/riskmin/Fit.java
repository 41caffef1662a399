package dev.riskmin;

import dev.riskmin.model.LinearModel;
import dev.riskmin.model.MulticlassModel;

import java.time.Duration;
import java.util.List;

/**
 * The outcome of one fit: the model (for linear objectives), the parameters, why the fit stopped,
 * and what it cost. Immutable.
 *
 * <p>A converged fit is not a validated model: check it on held-out data and, where it drives
 * decisions about people, money or safety, under the domain's own rules and review.
 */
public final class Fit {
    private final LinearModel model;
    private final MulticlassModel multiclassModel;
    private final double[] parameters;
    private final double[] lastIterate;
    private final boolean averaged;
    private final StopReason stopReason;
    private final String stopDetail;
    private final long steps;
    private final double epochs;
    private final long gradientEvaluations;
    private final long probeEvaluations;
    private final Duration wallTime;
    private final double initialObjective;
    private final double finalObjective;
    private final double stepSizeFactor;
    private final int finalBatchSize;
    private final List<String> listenerFailures;
    private final boolean standardized;

    Fit(LinearModel model, MulticlassModel multiclassModel, double[] parameters, double[] lastIterate,
        boolean averaged, StopReason stopReason, String stopDetail, long steps, double epochs,
        long gradientEvaluations, long probeEvaluations, Duration wallTime, double initialObjective,
        double finalObjective, double stepSizeFactor, int finalBatchSize, List<String> listenerFailures,
        boolean standardized) {
        this.model = model;
        this.multiclassModel = multiclassModel;
        this.parameters = parameters;
        this.lastIterate = lastIterate;
        this.averaged = averaged;
        this.stopReason = stopReason;
        this.stopDetail = stopDetail;
        this.steps = steps;
        this.epochs = epochs;
        this.gradientEvaluations = gradientEvaluations;
        this.probeEvaluations = probeEvaluations;
        this.wallTime = wallTime;
        this.initialObjective = initialObjective;
        this.finalObjective = finalObjective;
        this.stepSizeFactor = stepSizeFactor;
        this.finalBatchSize = finalBatchSize;
        this.listenerFailures = List.copyOf(listenerFailures);
        this.standardized = standardized;
    }

    /**
     * @return whether the features were standardized for the fit (the model and parameters are on the
     * original scale either way; the objectives are on the fitted scale)
     */
    public boolean standardized() {
        return standardized;
    }

    /**
     * @return the single-output linear model on the original feature scale
     * @throws IllegalStateException if the fit was multiclass or of a general objective
     */
    public LinearModel model() {
        if (model == null) {
            throw new IllegalStateException(multiclassModel != null
                    ? "this fit is multiclass: use multiclassModel()"
                    : "a fit of a general objective has no linear model: use parameters()");
        }
        return model;
    }

    /**
     * @return the K-class linear model on the original feature scale
     * @throws IllegalStateException if the fit was not multiclass
     */
    public MulticlassModel multiclassModel() {
        if (multiclassModel == null) {
            throw new IllegalStateException("this fit is not multiclass: use model() or parameters()");
        }
        return multiclassModel;
    }

    /** @return whether {@link #model()} is available */
    public boolean hasModel() {
        return model != null;
    }

    /**
     * @return a copy of the returned parameters h (the average when averaging was on, else the last
     * iterate), in the objective's layout and, for linear models, on the original feature scale;
     * always finite
     */
    public double[] parameters() {
        return parameters.clone();
    }

    /** @return a copy of the last iterate (same layout and scale as {@link #parameters()}); always finite */
    public double[] lastIterate() {
        return lastIterate.clone();
    }

    /** @return whether {@link #parameters()} is an average of iterates */
    public boolean averaged() {
        return averaged;
    }

    public StopReason stopReason() {
        return stopReason;
    }

    /** @return the reason in words, with its figures */
    public String stopDetail() {
        return stopDetail;
    }

    /** @return steps taken */
    public long steps() {
        return steps;
    }

    /** @return passes over the data: draws / n */
    public double epochs() {
        return epochs;
    }

    /** @return per-sample gradient evaluations spent by the update rule */
    public long gradientEvaluations() {
        return gradientEvaluations;
    }

    /** @return per-sample gradient evaluations spent by listeners through the probe */
    public long probeEvaluations() {
        return probeEvaluations;
    }

    public Duration wallTime() {
        return wallTime;
    }

    /**
     * @return an estimate of the objective at the starting point (mean over up to 4,096 evenly spaced
     * samples plus the penalty), on the scale the problem was fitted on
     */
    public double initialObjective() {
        return initialObjective;
    }

    /** @return L(h) at the returned parameters, over all n samples, on the scale the problem was fitted on */
    public double finalObjective() {
        return finalObjective;
    }

    /** @return the product of step-size factors that listeners asked for */
    public double stepSizeFactor() {
        return stepSizeFactor;
    }

    /** @return the batch size in force at the end */
    public int finalBatchSize() {
        return finalBatchSize;
    }

    /** @return one line per listener that threw and was detached */
    public List<String> listenerFailures() {
        return listenerFailures;
    }

    /**
     * A builder for fits produced outside the in-memory fit loop (for example by a distributed
     * driver); every figure defaults to "not measured" (NaN, 0, empty). {@link Builder#build()}
     * checks that the parameters are finite, as every fit promises.
     */
    public static Builder builder(double[] parameters, StopReason stopReason) {
        return new Builder(parameters, stopReason);
    }

    /** Collects a fit's parts; {@link #build()} returns an immutable {@link Fit}. */
    public static final class Builder {
        private final double[] parameters;
        private final StopReason stopReason;
        private double[] lastIterate;
        private LinearModel model;
        private MulticlassModel multiclassModel;
        private boolean averaged;
        private String stopDetail = "";
        private long steps;
        private double epochs;
        private long gradientEvaluations;
        private long probeEvaluations;
        private Duration wallTime = Duration.ZERO;
        private double initialObjective = Double.NaN;
        private double finalObjective = Double.NaN;
        private double stepSizeFactor = 1.0;
        private int finalBatchSize;
        private List<String> listenerFailures = List.of();
        private boolean standardized;

        private Builder(double[] parameters, StopReason stopReason) {
            if (parameters == null || stopReason == null) {
                throw new NullPointerException("parameters and stop reason must not be null");
            }
            for (int j = 0; j < parameters.length; j++) {
                if (!Double.isFinite(parameters[j])) {
                    throw new IllegalArgumentException("parameters[" + j + "] is " + parameters[j]
                            + ": a fit never returns non-finite parameters");
                }
            }
            this.parameters = parameters.clone();
            this.stopReason = stopReason;
        }

        public Builder lastIterate(double[] value) {
            this.lastIterate = value.clone();
            return this;
        }

        public Builder model(LinearModel value) {
            this.model = value;
            return this;
        }

        public Builder multiclassModel(MulticlassModel value) {
            this.multiclassModel = value;
            return this;
        }

        public Builder averaged(boolean value) {
            this.averaged = value;
            return this;
        }

        public Builder stopDetail(String value) {
            this.stopDetail = value == null ? "" : value;
            return this;
        }

        public Builder counts(long stepCount, double epochCount, long evaluations, long probeCount) {
            this.steps = stepCount;
            this.epochs = epochCount;
            this.gradientEvaluations = evaluations;
            this.probeEvaluations = probeCount;
            return this;
        }

        public Builder wallTime(Duration value) {
            this.wallTime = value;
            return this;
        }

        public Builder objectives(double initial, double last) {
            this.initialObjective = initial;
            this.finalObjective = last;
            return this;
        }

        public Builder stepSizeFactor(double value) {
            this.stepSizeFactor = value;
            return this;
        }

        public Builder finalBatchSize(int value) {
            this.finalBatchSize = value;
            return this;
        }

        public Builder listenerFailures(List<String> value) {
            this.listenerFailures = List.copyOf(value);
            return this;
        }

        public Builder standardized(boolean value) {
            this.standardized = value;
            return this;
        }

        public Fit build() {
            double[] last = lastIterate != null ? lastIterate : parameters;
            for (int j = 0; j < last.length; j++) {
                if (!Double.isFinite(last[j])) {
                    throw new IllegalArgumentException("lastIterate[" + j + "] is " + last[j]);
                }
            }
            return new Fit(model, multiclassModel, parameters.clone(), last.clone(), averaged, stopReason, stopDetail,
                    steps, epochs, gradientEvaluations, probeEvaluations, wallTime, initialObjective, finalObjective,
                    stepSizeFactor, finalBatchSize, listenerFailures, standardized);
        }
    }

    @Override
    public String toString() {
        return "Fit[" + stopReason + (stopDetail.isEmpty() ? "" : " (" + stopDetail + ")") + ", steps=" + steps
                + ", epochs=" + String.format("%.3f", epochs) + ", evaluations=" + gradientEvaluations
                + ", objective=" + finalObjective + ", time=" + wallTime.toMillis() + " ms]";
    }
}
