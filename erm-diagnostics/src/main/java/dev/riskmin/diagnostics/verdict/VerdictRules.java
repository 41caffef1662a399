package dev.riskmin.diagnostics.verdict;

import dev.riskmin.StopReason;

import java.math.BigDecimal;
import java.math.MathContext;
import java.math.RoundingMode;
import java.util.LinkedHashMap;
import java.util.Locale;
import java.util.Map;

/**
 * Forms a {@link HealthVerdict} from a {@link RunSummary}. The rules are checked in order and the
 * first that holds decides; NaN (unmeasured) figures never trigger a rule. Notation: ε the step
 * size, B the batch size, n the sample count, G the full gradient, tr Σ the gradient-noise variance,
 * B<sub>s</sub> = tr Σ/‖G‖² the noise scale (McCandlish, Kaplan, Amodei et al., "An Empirical Model
 * of Large-Batch Training", arXiv:1812.06162, 2018).
 * <ol>
 * <li><b>DIVERGED</b> — the fit stopped with {@link StopReason#DIVERGED}. Advice: 1/L<sub>max</sub> when the
 * run's largest per-sample smoothness constant is known and below a tenth of the step; otherwise a step size ten times
 * smaller, ε/10.</li>
 * <li><b>CONVERGED</b> (by the gradient) — ‖G‖ fell to at most {@value #CONVERGED_GRADIENT_RATIO} of its
 * first measured value.</li>
 * <li><b>STEP_TOO_LARGE</b> — either the mean cosine c between successive batch gradients is below
 * {@value #OSCILLATION_COSINE}, or more than {@value #MAX_ASCENT_SHARE} of the steps raised the loss by
 * more than its noise while the batch covers the noise scale (so noise does not explain the rises).
 * Why c: on a quadratic with curvature λ along a direction, a step multiplies the gradient's
 * component there by (1 − ελ); with noise of variance s² the stationary correlation of successive
 * gradients is −γ a s²/(2 − γ a) over 2s²/(2 − γ a), i.e. −ελ/2 (derived from the stationarity check
 * of METHODS §4 on the test of Chee &amp; Toulis, AISTATS 2018); without noise the component changes
 * sign at every step once ελ &gt; 1. The mean cosine tracks that correlation when gradient norms vary
 * little from step to step (many directions; in one dimension it is (2/π) arcsin of it instead), so
 * c &lt; −1/2 means roughly ελ &gt; 1 along the directions that carry the gradient: the steps
 * overshoot the minimum (derived). Advice: ε/max(2, −4c), which brings the
 * estimate ελ ≈ −2c down to about 1/2 and is at least a halving (derived; halving alone suffices on a
 * quadratic that did not diverge, where ελ &lt; 2). On the ascent evidence alone: halve the step.</li>
 * <li><b>NOISE_DOMINATED</b> — the objective's trend was measured and it does not demonstrably fall
 * (the decrease is within {@value #SIGNIFICANCE} standard errors of the tolerance), while the
 * batch the noise asks for, B<sub>*</sub>, exceeds {@value #NOISE_FACTOR} B. B<sub>*</sub> is the batch at
 * which the batch-mean gradient's variance equals ‖G‖²: B<sub>s</sub> with replacement, and
 * B<sub>s</sub> n/(n + B<sub>s</sub>) without (solving (1 − B/n) tr S²/B = ‖G‖², METHODS §1, derived).
 * When the noise scale was not measured but the descent cosine was (at least
 * {@value #MIN_ANGLE_PROBES} probes), B<sub>s</sub> ≈ B (1/c̄² − 1) from the heuristic
 * cos φ ≈ (1 + B<sub>s</sub>/B)<sup>−1/2</sup> (METHODS §3; derived, not exact). Advice: a batch of about
 * B<sub>*</sub> (McCandlish et al.: the useful batch is about the noise scale), or a step of about
 * ε B/B<sub>*</sub>, since the noise floor of constant-step SGD grows as ε M/B (Bottou, Curtis &amp;
 * Nocedal, SIAM Review 60(2), 2018, Thm 4.6 with M divided by B), or a variance-reduced rule. Never
 * for a variance-reduced rule (SVRG, SAGA): its steps' variance vanishes at the optimum, so a large
 * noise scale there only says that ‖G‖ is small.</li>
 * <li><b>STILL_DESCENDING</b> — over the last measurement window the objective fell by more than
 * {@value #STILL_FALLING} (relative) plus {@value #SIGNIFICANCE} standard errors of the decrease (when
 * the error is known). Advice: double the budget (epochs and steps given).</li>
 * <li><b>CONVERGED</b> — the decrease plus {@value #SIGNIFICANCE} standard errors stays within
 * {@value #STILL_FALLING}: the objective is measured and demonstrably flat.</li>
 * <li><b>UNDETERMINED</b> — nothing was measured that could show convergence, or the trend is too
 * noisy to tell falling from flat; the advice is to measure the objective more often.</li>
 * </ol>
 * The thresholds are this library's choices (common practice, no source). Numbers in the texts have
 * three significant digits and use {@link Locale#ROOT}.
 */
public final class VerdictRules {
    static final double CONVERGED_GRADIENT_RATIO = 1e-3;
    static final double OSCILLATION_COSINE = -0.5;
    static final double MAX_ASCENT_SHARE = 0.3;
    static final double NOISE_FACTOR = 4.0;
    static final double STILL_FALLING = 1e-3;
    static final double SIGNIFICANCE = 2.0;
    static final int MIN_ANGLE_PROBES = 5;

    private VerdictRules() {
    }

    /** @return the verdict on the summarized run (the summary is only read) */
    public static HealthVerdict judge(RunSummary s) {
        Map<String, Double> figures = new LinkedHashMap<>();
        figures.put("steps", (double) s.steps);
        figures.put("epochs", s.epochs);
        figures.put("stepSize", s.stepSize);
        figures.put("batchSize", (double) s.batchSize);
        figures.put("latestObjective", s.latestObjective);
        figures.put("recentRelativeDecrease", s.recentRelativeDecrease);
        figures.put("recentDecreaseError", s.recentDecreaseError);
        figures.put("gradientNorm", s.gradientNorm);
        double gradientRatio = s.initialGradientNorm > 0 ? s.gradientNorm / s.initialGradientNorm : Double.NaN;
        figures.put("gradientRatio", gradientRatio);
        figures.put("noiseScale", s.noiseScale);
        figures.put("meanCosine", s.meanCosine);
        figures.put("descentShare", s.descentShare);
        figures.put("successiveCosine", s.successiveCosine);
        figures.put("ascentShare", s.ascentShare);
        figures.put("lossOscillation", s.lossOscillation);
        figures.put("stepCuts", (double) s.stepCuts);
        figures.put("batchIncreases", (double) s.batchIncreases);
        String stopped = s.stopReason == null ? "the fit still running" : "stop reason " + s.stopReason;
        double eps = s.stepSize;

        if (s.stopReason == StopReason.DIVERGED) {
            double safe = s.largestSmoothness > 0 && Double.isFinite(s.largestSmoothness)
                    ? 1.0 / s.largestSmoothness : Double.NaN;
            String advice;
            if (Double.isFinite(eps) && Double.isFinite(safe) && safe < eps / 10) {
                // A tenth of an absurd step is still absurd: 1/L_max is a step plain SGD cannot overshoot
                // with (each sample's gradient is L_max-Lipschitz; METHODS §9, §11).
                figures.put("suggestedStepSize", safe);
                advice = fmt("cut the step size to about %s = 1/L_max (the largest per-sample smoothness"
                        + " constant L_max is %s), not just tenfold", sig(safe), sig(s.largestSmoothness));
            } else {
                figures.put("suggestedStepSize", eps / 10);
                advice = Double.isFinite(eps)
                        ? fmt("cut the step size tenfold, to about %s", sig(eps / 10))
                        : "cut the step size tenfold";
            }
            return new HealthVerdict(Condition.DIVERGED,
                    fmt("the run diverged after %d steps (%s epochs) at step size %s: %s.", s.steps, sig(s.epochs),
                            sig(eps), s.stopDetail == null || s.stopDetail.isEmpty() ? "no detail" : s.stopDetail),
                    advice, figures);
        }

        if (s.gradientNorm == 0 || gradientRatio <= CONVERGED_GRADIENT_RATIO) {
            return new HealthVerdict(Condition.CONVERGED,
                    fmt("the full-gradient norm fell to %s, %s of its first measured value %s (%s or less counts"
                                    + " as converged); %s after %d steps.", sig(s.gradientNorm), sig(gradientRatio),
                            sig(s.initialGradientNorm), sig(CONVERGED_GRADIENT_RATIO), stopped, s.steps),
                    "nothing for the optimizer; validate the model on held-out data", figures);
        }

        if (s.successiveCosine < OSCILLATION_COSINE) {
            double c = s.successiveCosine;
            double divisor = Math.max(2, -4 * c);
            figures.put("suggestedStepSize", eps / divisor);
            return new HealthVerdict(Condition.STEP_TOO_LARGE,
                    fmt("successive batch gradients point against each other (mean cosine %s, below %s): the"
                                    + " steps overshoot the minimum, with step size × curvature ≈ %s > 1 along the"
                                    + " directions that carry the gradient (step size %s).", sig(c), sig(OSCILLATION_COSINE),
                            sig(-2 * c), sig(eps)),
                    Double.isFinite(eps)
                            ? fmt("cut the step size to about %s (a factor %s, which brings step size × curvature"
                                    + " to about 1/2)", sig(eps / divisor), sig(divisor))
                            : "cut the step size by half or more",
                    figures);
        }

        double noiseScale = s.noiseScale;
        boolean fromCosine = false;
        if (!Double.isFinite(noiseScale) && s.angleProbes >= MIN_ANGLE_PROBES && s.meanCosine > 0
                && s.meanCosine < 1 && s.batchSize > 0) {
            noiseScale = s.batchSize * (1 / (s.meanCosine * s.meanCosine) - 1);
            fromCosine = true;
            figures.put("noiseScaleFromCosine", noiseScale);
        }
        boolean noiseKnown = Double.isFinite(noiseScale) && noiseScale >= 0 && s.batchSize > 0;
        boolean withoutReplacement = !s.independentDraws && s.sampleCount > 0;
        double needed = !noiseKnown ? Double.NaN
                : withoutReplacement ? noiseScale * s.sampleCount / (s.sampleCount + noiseScale) : noiseScale;

        if (s.ascentShare > MAX_ASCENT_SHARE && noiseKnown && s.batchSize >= needed) {
            figures.put("suggestedStepSize", eps / 2);
            return new HealthVerdict(Condition.STEP_TOO_LARGE,
                    fmt("%s%% of the steps raised the loss by more than its noise (over %s%%), although the batch of"
                                    + " %d covers the noise scale %s: the steps overshoot (step size %s).",
                            sig(100 * s.ascentShare), sig(100 * MAX_ASCENT_SHARE), s.batchSize, sig(noiseScale),
                            sig(eps)),
                    Double.isFinite(eps) ? fmt("halve the step size, to about %s", sig(eps / 2))
                            : "halve the step size",
                    figures);
        }

        double r = s.recentRelativeDecrease;
        double error = Double.isFinite(s.recentDecreaseError) ? s.recentDecreaseError : 0.0;
        // Falling: the decrease exceeds the tolerance by more than its noise. Flat: even the decrease's
        // upper bound stays within the tolerance. Between the two the trend is too noisy to judge.
        boolean falling = Double.isFinite(r) && r - SIGNIFICANCE * error > STILL_FALLING;
        boolean stalled = Double.isFinite(r) && r + SIGNIFICANCE * error <= STILL_FALLING;
        boolean noisyTrend = Double.isFinite(r) && !falling && !stalled;
        String window = Double.isFinite(r)
                ? fmt("%s%%%s over the last window", sig(100 * r),
                Double.isFinite(s.recentDecreaseError) ? " ± " + sig(100 * s.recentDecreaseError) + "%" : "")
                : "not measured";

        // Noise makes a trend noisy itself: here "not demonstrably falling" is enough.
        boolean notFalling = Double.isFinite(r) && !falling;
        if (noiseKnown && notFalling && needed > NOISE_FACTOR * s.batchSize && !s.varianceReduced) {
            long batch = (long) Math.ceil(needed);
            figures.put("suggestedBatchSize", (double) batch);
            double noiseToSignal = noiseScale / s.batchSize
                    * (withoutReplacement ? Math.max(0, 1 - (double) s.batchSize / s.sampleCount) : 1);
            figures.put("noiseToSignal", noiseToSignal);
            String step = "";
            if (Double.isFinite(eps)) {
                figures.put("suggestedStepSize", eps * s.batchSize / needed);
                step = fmt(", or keep it and cut the step size to about %s", sig(eps * s.batchSize / needed));
            }
            String batchAdvice = withoutReplacement && batch >= s.sampleCount
                    ? fmt("use the full batch of about %d samples", s.sampleCount)
                    : fmt("raise the batch size to about %d", batch);
            return new HealthVerdict(Condition.NOISE_DOMINATED,
                    fmt("gradient noise swamps the signal: at batch size %d the batch-mean gradient's variance"
                                    + " is %s times ‖G‖² (noise scale %s%s), and the objective has stopped falling"
                                    + " (%s).",
                            s.batchSize, sig(noiseToSignal), sig(noiseScale),
                            fromCosine ? fmt(", estimated from the mean descent cosine %s", sig(s.meanCosine)) : "",
                            window),
                    batchAdvice + step + "; a variance-reduced update rule (SVRG, SAGA) also removes this noise floor",
                    figures);
        }

        if (falling) {
            double epochs = 2 * s.epochs;
            long steps = 2 * s.steps;
            figures.put("suggestedEpochs", epochs);
            figures.put("suggestedSteps", (double) steps);
            return new HealthVerdict(Condition.STILL_DESCENDING,
                    fmt("the objective was still falling when the fit stopped (%s): by %s, to %s.", stopped, window,
                            sig(s.latestObjective)),
                    s.epochs > 0
                            ? fmt("double the budget, to about %s epochs (%d steps)", sig(epochs), steps)
                            : fmt("double the budget, to about %d steps", steps),
                    figures);
        }

        String gradient = Double.isFinite(gradientRatio)
                ? fmt("; the full-gradient norm is %s, %s of its first measured value", sig(s.gradientNorm),
                sig(gradientRatio))
                : "";
        if (stalled) {
            return new HealthVerdict(Condition.CONVERGED,
                    fmt("the objective no longer falls (%s), latest objective %s%s; %s after %d steps.", window,
                            sig(s.latestObjective), gradient, stopped, s.steps),
                    "nothing for the optimizer; validate the model on held-out data", figures);
        }
        if (noisyTrend) {
            return new HealthVerdict(Condition.UNDETERMINED,
                    fmt("the objective's trend is too noisy to judge (%s): it neither clearly falls nor clearly"
                            + " stays within %s%%%s; %s after %d steps (%s epochs).", window,
                            sig(100 * STILL_FALLING), gradient, stopped, s.steps, sig(s.epochs)),
                    "measure the exact objective more often (a loss monitor with a cadence, e.g."
                            + " Cadence.every(k)) or run longer; validate the model on held-out data",
                    figures);
        }
        return new HealthVerdict(Condition.UNDETERMINED,
                fmt("no objective trend was measured, so convergence cannot be judged%s; %s after %d steps (%s"
                        + " epochs).", gradient, stopped, s.steps, sig(s.epochs)),
                "measure the objective's trend (a loss monitor) before trusting this fit; validate the model on"
                        + " held-out data",
                figures);
    }

    private static String fmt(String pattern, Object... args) {
        return String.format(Locale.ROOT, pattern, args);
    }

    /** Three significant digits, plain between 1e-4 and 1e7, else scientific: 0.005, 1230, 0.333, 1.5e-07. */
    static String sig(double v) {
        if (Double.isNaN(v) || Double.isInfinite(v)) {
            return Double.toString(v);
        }
        if (v == 0) {
            return "0";
        }
        double a = Math.abs(v);
        if (a >= 1e-4 && a < 1e7) {
            return new BigDecimal(v).round(new MathContext(3, RoundingMode.HALF_EVEN)).stripTrailingZeros()
                    .toPlainString();
        }
        String s = String.format(Locale.ROOT, "%.2e", v);
        int e = s.indexOf('e');
        String mantissa = s.substring(0, e);
        int end = mantissa.length();
        while (mantissa.charAt(end - 1) == '0') {
            end--;
        }
        if (mantissa.charAt(end - 1) == '.') {
            end--;
        }
        return mantissa.substring(0, end) + s.substring(e);
    }
}
