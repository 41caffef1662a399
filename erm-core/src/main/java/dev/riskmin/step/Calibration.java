package dev.riskmin.step;

import java.util.List;

/**
 * The outcome of a {@link StepCalibration}: the chosen initial step ε<sub>0</sub> (the smaller step
 * of the final pair in Bottou's halving/doubling search, Bottou 2012, LNCS 7700; METHODS §5) and
 * every trial that led to it, in the order tried.
 *
 * @param stepSize     ε<sub>0</sub>, finite and &gt; 0
 * @param trials       the (ε, score) pairs tried, in order (copied; unmodifiable)
 * @param trialSamples the number of samples of the trial pass
 * @param batchSize    the batch size of the trial pass
 */
public record Calibration(double stepSize, List<Trial> trials, int trialSamples, int batchSize) {

    /**
     * One trial: a fixed-step pass with step ε scored by the mean data loss on the trial samples
     * plus the penalty, afterwards. A non-finite score is kept as computed and counts as losing.
     *
     * @param stepSize ε
     * @param score    mean trial loss + R(h) after the pass
     */
    public record Trial(double stepSize, double score) {
    }

    /** @throws IllegalArgumentException if stepSize is not finite and &gt; 0 or no trial is given */
    public Calibration {
        if (!(stepSize > 0) || Double.isInfinite(stepSize)) {
            throw new IllegalArgumentException("stepSize (" + stepSize + ") must be finite and > 0");
        }
        trials = List.copyOf(trials);
        if (trials.isEmpty()) {
            throw new IllegalArgumentException("a calibration needs at least one trial");
        }
    }

    /** @return e.g. "stepSize=0.25 (1000 samples, batch 1; trials: 1 -> 0.53, 2 -> 0.91, 0.5 -> 0.49, ...)" */
    @Override
    public String toString() {
        StringBuilder s = new StringBuilder("stepSize=").append(stepSize).append(" (").append(trialSamples)
                .append(" samples, batch ").append(batchSize).append("; trials: ");
        for (int k = 0; k < trials.size(); k++) {
            Trial trial = trials.get(k);
            if (k > 0) {
                s.append(", ");
            }
            s.append(trial.stepSize()).append(" -> ").append(trial.score());
        }
        return s.append(')').toString();
    }
}
