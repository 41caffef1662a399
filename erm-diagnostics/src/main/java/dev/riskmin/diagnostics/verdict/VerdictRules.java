package dev.riskmin.diagnostics.verdict;

import dev.riskmin.StopReason;

import java.util.LinkedHashMap;
import java.util.Locale;
import java.util.Map;

/**
 * Forms a {@link HealthVerdict} from a {@link RunSummary}. The rules are checked in order; the first
 * that holds decides:
 * <ol>
 * <li>DIVERGED — the fit stopped with {@link StopReason#DIVERGED}. Advice: a step ten times smaller.</li>
 * <li>STEP_TOO_LARGE — fewer than {@value #MIN_DESCENT_SHARE} of the probed steps were descent
 * directions (cos φ &gt; 0) while the batch was at least the noise scale (so noise does not explain
 * it). Advice: halve the step.</li>
 * <li>NOISE_DOMINATED — the noise scale B<sub>simple</sub> = tr Σ/‖G‖² exceeds
 * {@value #NOISE_FACTOR} × the batch size and the objective no longer falls. Advice: a batch of about
 * B<sub>simple</sub> (McCandlish et al. 2018: the useful batch size is about B<sub>noise</sub>), or a
 * proportionally smaller step.</li>
 * <li>STILL_DESCENDING — the objective fell by more than {@value #STILL_FALLING} (relative) over the
 * last measurement window. Advice: a larger budget.</li>
 * <li>CONVERGED — otherwise. Advice: nothing; validate on held-out data.</li>
 * </ol>
 * The thresholds are this library's choices (common practice, no source).
 */
public final class VerdictRules {
    static final double MIN_DESCENT_SHARE = 0.6;
    static final double NOISE_FACTOR = 4.0;
    static final double STILL_FALLING = 1e-3;

    private VerdictRules() {
    }

    /** @return the verdict on the summarized run */
    public static HealthVerdict judge(RunSummary s) {
        Map<String, Double> figures = new LinkedHashMap<>();
        figures.put("steps", (double) s.steps);
        figures.put("epochs", s.epochs);
        figures.put("stepSize", s.stepSize);
        figures.put("batchSize", (double) s.batchSize);
        figures.put("latestObjective", s.latestObjective);
        figures.put("recentRelativeDecrease", s.recentRelativeDecrease);
        figures.put("noiseScale", s.noiseScale);
        figures.put("descentShare", s.descentShare);
        figures.put("meanCosine", s.meanCosine);
        figures.put("gradientNorm", s.gradientNorm);
        if (s.stopReason == StopReason.DIVERGED) {
            return new HealthVerdict(Condition.DIVERGED,
                    "the run diverged: " + s.stopDetail + ".",
                    Double.isFinite(s.stepSize)
                            ? fmt("cut the step size to about %.3g (a tenth of %.3g)", s.stepSize / 10, s.stepSize)
                            : "cut the step size by a factor of ten",
                    figures);
        }
        boolean noiseKnown = Double.isFinite(s.noiseScale);
        if (Double.isFinite(s.descentShare) && s.angleProbes >= 5 && s.descentShare < MIN_DESCENT_SHARE
                && (!noiseKnown || s.noiseScale <= s.batchSize)) {
            return new HealthVerdict(Condition.STEP_TOO_LARGE,
                    fmt("only %.0f%% of probed steps pointed downhill (mean cos %.2f) although the batch of %d covers"
                            + " the noise scale %.3g.", 100 * s.descentShare, s.meanCosine, s.batchSize, s.noiseScale),
                    fmt("halve the step size to about %.3g", s.stepSize / 2), figures);
        }
        boolean stalled = !(s.recentRelativeDecrease > STILL_FALLING);
        if (noiseKnown && s.noiseScale > NOISE_FACTOR * s.batchSize && stalled) {
            int suggested = (int) Math.min(Integer.MAX_VALUE, Math.ceil(s.noiseScale));
            return new HealthVerdict(Condition.NOISE_DOMINATED,
                    fmt("gradient noise dominates: the noise scale %.3g is %.1f times the batch size %d, and the"
                            + " objective no longer falls.", s.noiseScale, s.noiseScale / s.batchSize, s.batchSize),
                    fmt("raise the batch size to about %d, or cut the step size to about %.3g", suggested,
                            s.stepSize * s.batchSize / s.noiseScale), figures);
        }
        if (!stalled) {
            return new HealthVerdict(Condition.STILL_DESCENDING,
                    fmt("the objective was still falling: %.3g%% over the last measurement window.",
                            100 * s.recentRelativeDecrease),
                    fmt("raise the budget beyond %.1f epochs", s.epochs), figures);
        }
        return new HealthVerdict(Condition.CONVERGED,
                fmt("the objective no longer falls (%.2g relative over the last window)%s.",
                        s.recentRelativeDecrease,
                        Double.isFinite(s.gradientNorm) ? fmt(", gradient norm %.3g", s.gradientNorm) : ""),
                "nothing for the optimizer; validate the model on held-out data", figures);
    }

    private static String fmt(String pattern, Object... args) {
        return String.format(Locale.ROOT, pattern, args);
    }
}
