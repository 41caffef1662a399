package dev.riskmin.step;

import dev.riskmin.objective.Objective;
import dev.riskmin.util.Arguments;
import java.util.ArrayList;
import java.util.List;
import java.util.random.RandomGenerator;

/**
 * Picks an initial step size ε<sub>0</sub> by trial passes on a subsample (Bottou, "Stochastic
 * gradient descent tricks", <i>Neural Networks: Tricks of the Trade</i>, 2nd ed., LNCS 7700, 2012;
 * procedure as in the author's public SGD code, METHODS §5).
 *
 * <p>Procedure: draw m = min(trialSamples, n) samples by a random permutation of the caller's
 * generator. A trial with step ε copies the starting h and makes one pass over the m samples in
 * batches of B: h ← h − ε g<sub>batch</sub>(h), then h ← prox<sub>ε R</sub>(h) (the objective's
 * {@link Objective#proximalStep}). Its score is the mean data loss on the m samples plus the
 * penalty R(h), after the pass; a non-finite score counts as losing. Starting with the pair
 * (ε, 2ε) from the initial guess ε (default 1): while the smaller step wins, halve the pair; while
 * the larger wins, double it; stop at the first reversal. The result is the smaller member of the
 * final pair, so it is the best step tried or half of it: conservative by at most a factor 2. If both
 * steps of the pair lose (non-finite scores), the pair is halved too, so a diverging start still
 * ends at a small finite step.
 *
 * <p>Immutable and thread-safe as a configuration; {@link #calibrate} runs on the caller's objective
 * (which is not thread-safe) and allocates its work arrays per call (not a hot path).
 */
public final class StepCalibration {
    /** Default number of trial samples, as in the published procedure. */
    public static final int DEFAULT_TRIAL_SAMPLES = 1000;
    /** Default budget of trial passes. */
    public static final int DEFAULT_MAX_TRIALS = 40;

    private final int trialSamples;
    private final int batchSize;
    private final double initialStep;
    private final int maxTrials;

    private StepCalibration(int trialSamples, int batchSize, double initialStep, int maxTrials) {
        this.trialSamples = trialSamples;
        this.batchSize = batchSize;
        this.initialStep = initialStep;
        this.maxTrials = maxTrials;
    }

    /**
     * @param batchSize B ≥ 1 of the trial passes (use the fit's batch size)
     * @return a calibration with 1,000 trial samples, initial guess 1 and at most 40 trials
     * @throws IllegalArgumentException naming batchSize if it is below 1
     */
    public static StepCalibration of(int batchSize) {
        Arguments.positive("batchSize", batchSize);
        return new StepCalibration(DEFAULT_TRIAL_SAMPLES, batchSize, 1.0, DEFAULT_MAX_TRIALS);
    }

    /** @throws IllegalArgumentException naming trialSamples if it is below 1 */
    public StepCalibration withTrialSamples(int trialSamples) {
        Arguments.positive("trialSamples", trialSamples);
        return new StepCalibration(trialSamples, batchSize, initialStep, maxTrials);
    }

    /** @throws IllegalArgumentException naming initialStep unless it is finite and &gt; 0 */
    public StepCalibration withInitialStep(double initialStep) {
        Arguments.positive("initialStep", initialStep);
        return new StepCalibration(trialSamples, batchSize, initialStep, maxTrials);
    }

    /** @throws IllegalArgumentException naming maxTrials if it is below 2 (the first pair) */
    public StepCalibration withMaxTrials(int maxTrials) {
        if (maxTrials < 2) {
            throw new IllegalArgumentException("maxTrials (" + maxTrials + ") must be >= 2");
        }
        return new StepCalibration(trialSamples, batchSize, initialStep, maxTrials);
    }

    public int trialSamples() {
        return trialSamples;
    }

    public int batchSize() {
        return batchSize;
    }

    public double initialStep() {
        return initialStep;
    }

    public int maxTrials() {
        return maxTrials;
    }

    /**
     * @param objective the objective (its scratch buffers are used; not thread-safe)
     * @param h         the starting parameters, read only, length p
     * @param rng       chooses the trial samples
     * @return the chosen ε<sub>0</sub> and every trial
     * @throws IllegalArgumentException if h's length differs from the objective's dimension
     * @throws IllegalStateException    if no trial within the budget has a finite score (e.g. the loss
     *                                  at h is already non-finite), naming the smallest step tried
     */
    public Calibration calibrate(Objective objective, double[] h, RandomGenerator rng) {
        Arguments.notNull("objective", objective);
        Arguments.notNull("h", h);
        Arguments.notNull("rng", rng);
        int p = objective.dimension();
        if (h.length != p) {
            throw new IllegalArgumentException("h has " + h.length + " entries, but the objective has dimension " + p);
        }
        int n = objective.size();
        int m = Math.min(trialSamples, n);
        int[] order = new int[n];
        for (int i = 0; i < n; i++) {
            order[i] = i;
        }
        // A partial Fisher–Yates shuffle: the first m entries are a uniformly random ordered subsample.
        for (int k = 0; k < m; k++) {
            int j = k + rng.nextInt(n - k);
            int swap = order[k];
            order[k] = order[j];
            order[j] = swap;
        }
        Pass pass = new Pass(objective, h, order, m, Math.min(batchSize, m));
        List<Calibration.Trial> trials = new ArrayList<>();

        double lo = initialStep;
        double hi = 2 * initialStep;
        double loScore = pass.score(lo, trials);
        double hiScore = pass.score(hi, trials);
        if (smallerWins(loScore, hiScore)) {
            while (smallerWins(loScore, hiScore) && trials.size() < maxTrials) {
                hi = lo;
                hiScore = loScore;
                lo = lo / 2;
                loScore = pass.score(lo, trials);
            }
        } else {
            while (key(hiScore) < key(loScore) && trials.size() < maxTrials) {
                lo = hi;
                loScore = hiScore;
                hi = hi * 2;
                hiScore = pass.score(hi, trials);
            }
        }
        double chosen;
        if (Double.isFinite(loScore)) {
            chosen = lo;
        } else if (Double.isFinite(hiScore)) {
            chosen = hi;
        } else {
            throw new IllegalStateException("step calibration found no step with a finite score in " + trials.size()
                    + " trials down to stepSize " + lo + ": the loss is not finite at the starting parameters, or"
                    + " the features are so large that every trial step overflows (standardize them, or give a"
                    + " step size)");
        }
        return new Calibration(chosen, trials, m, pass.batch);
    }

    /** The smaller step wins when its score is lower, or when both scores are non-finite (both lose). */
    private static boolean smallerWins(double smallerScore, double largerScore) {
        return key(smallerScore) < key(largerScore)
                || (!Double.isFinite(smallerScore) && !Double.isFinite(largerScore));
    }

    private static double key(double score) {
        return Double.isFinite(score) ? score : Double.POSITIVE_INFINITY;
    }

    /** One trial pass's work arrays. */
    private static final class Pass {
        final Objective objective;
        final double[] start;
        final int[] order;
        final int count;
        final int batch;
        final double[] w;
        final double[] g;

        Pass(Objective objective, double[] start, int[] order, int count, int batch) {
            this.objective = objective;
            this.start = start;
            this.order = order;
            this.count = count;
            this.batch = batch;
            this.w = new double[start.length];
            this.g = new double[start.length];
        }

        double score(double step, List<Calibration.Trial> trials) {
            double score = run(step);
            trials.add(new Calibration.Trial(step, score));
            return score;
        }

        private double run(double step) {
            System.arraycopy(start, 0, w, 0, w.length);
            for (int from = 0; from < count; from += batch) {
                int length = Math.min(batch, count - from);
                double batchLoss = objective.batchGradient(w, order, null, from, length, g);
                if (!Double.isFinite(batchLoss)) {
                    return batchLoss; // diverged: later batches cannot recover a finite score
                }
                for (int j = 0; j < w.length; j++) {
                    w[j] -= step * g[j];
                }
                objective.proximalStep(w, step);
            }
            double sum = 0;
            for (int k = 0; k < count; k++) {
                sum += objective.sampleLoss(w, order[k]);
            }
            return sum / count + objective.penaltyValue(w);
        }
    }
}
