package dev.riskmin.diagnostics.stopping;

import dev.riskmin.StopReason;
import dev.riskmin.diagnostics.Decision;
import dev.riskmin.diagnostics.Monitor;
import dev.riskmin.diagnostics.StepContext;
import dev.riskmin.hook.RunInfo;
import dev.riskmin.hook.StepView;
import dev.riskmin.util.Arguments;

/**
 * Pflug's stationarity test on the inner products of successive stochastic gradients (Pflug, IIASA
 * CP-83-025, 1983, and Monatsh. Math. 110:297–314, 1990 — report number and 1990 details from
 * memory), in the form of Chee &amp; Toulis, "Convergence diagnostics for stochastic gradient descent
 * with constant learning rate", AISTATS 2018, PMLR 84 (METHODS §4):
 * <pre>
 *   S = Σ<sub>k in phase</sub> ⟨g<sub>k</sub>, g<sub>k−1</sub>⟩,
 * </pre>
 * summed from the start of the current phase over the batch gradients g<sub>k</sub> = g<sub>B</sub>(h<sub>k</sub>)
 * (which include the smooth penalty). While the iterates drift toward the optimum successive
 * gradients point alike and S grows; once they fluctuate around it, successive gradients are
 * negatively correlated — on f = (a/2)w² with gradient noise of variance s² and step γ the stationary
 * E[g<sub>k</sub> g<sub>k+1</sub>] = −γ a s²/(2 − γ a) (derived, METHODS §4) — and S falls. After a burn-in,
 * the first step with S &lt; 0 declares stationarity: the test cuts the step size by its factor
 * (default ½, Chee &amp; Toulis's halving), sets S = 0 and starts a new phase with a new burn-in; or,
 * after a chosen number of cuts, halts with {@link StopReason#CONVERGED}.
 *
 * <p>Default burn-in: at least 1,000 steps and at least one epoch of draws since the phase start. The
 * 1,000 follows the baseline of the research code of arXiv:2412.11341 (1,000–2,000; METHODS §4), the
 * paper's own default being unconfirmed; the epoch is this library's choice, so that sampling without
 * replacement has completed a pass before the sign is read.
 *
 * <p>Cost: every step copies g<sub>B</sub> into a buffer allocated once per fit and forms one inner
 * product, O(p) per step — about the cost of the update itself; nothing is allocated. With
 * {@link #pairStride(int)} m the test uses only every m-th pair (g<sub>k</sub>, g<sub>k−1</sub>) with
 * k ≡ 0 (mod m), costing O(p) on two of every m steps. The check S &lt; 0 runs at every counted pair
 * but publishes only when it acts; an event with the running S (threshold 0) is published at the end
 * of every epoch.
 *
 * <p>Caveat: Pesme, Dieuleveut &amp; Flammarion ("On convergence-diagnostic based step sizes for
 * stochastic gradient descent", ICML 2020, arXiv:2007.00534) show that this statistic is an inadequate
 * convergence diagnostic even on quadratic objectives, and propose a distance-based test instead
 * (confirmed: their abstract; the details of their argument are not restated here). Our own reading
 * of a quadratic with Hessian H, noise covariance Σ and step ε (derived): given e<sub>k−1</sub>, the
 * error h<sub>k−1</sub> − h*, the mean increment of S is
 * ⟨(I − εH) H e<sub>k−1</sub>, H e<sub>k−1</sub>⟩ − ε tr(HΣ), so after
 * the transient S must first lose the drift it accumulated (about Σ<sub>k</sub> ‖H e<sub>k</sub>‖²) at the
 * rate ε tr(HΣ) per step, while its own noise grows like √(k tr Σ²); the first crossing can therefore
 * come late after a long transient, or early by noise when ε is small.
 * Use it with the other tests, not alone. The argument assumes plain SGD; with momentum,
 * successive gradients are positively correlated for longer.
 */
public final class PflugCriterion implements Monitor {
    /** The default burn-in in steps (METHODS §4). */
    public static final long DEFAULT_BURN_IN_STEPS = 1000;
    /** The default burn-in in epochs of draws (this library's choice). */
    public static final double DEFAULT_BURN_IN_EPOCHS = 1.0;
    /** The default factor applied to the step size on detection (Chee &amp; Toulis: halving). */
    public static final double DEFAULT_CUT_FACTOR = 0.5;

    private final long burnInSteps;
    private final double burnInEpochs;
    private final double cutFactor;
    private final int haltAfterCuts;    // < 0: never halt
    private final int stride;

    private double[] previous = new double[0];
    private long previousStep;
    private double sum;
    private long pairs;
    private long phaseStep;
    private long phaseDraws;
    private long burnInDraws;
    private int cuts;

    private PflugCriterion(long burnInSteps, double burnInEpochs, double cutFactor, int haltAfterCuts, int stride) {
        this.burnInSteps = burnInSteps;
        this.burnInEpochs = burnInEpochs;
        this.cutFactor = cutFactor;
        this.haltAfterCuts = haltAfterCuts;
        this.stride = stride;
    }

    /**
     * Burn-in of {@value #DEFAULT_BURN_IN_STEPS} steps and {@value #DEFAULT_BURN_IN_EPOCHS} epoch, halving
     * on detection, never halting, every pair.
     */
    public static PflugCriterion defaults() {
        return new PflugCriterion(DEFAULT_BURN_IN_STEPS, DEFAULT_BURN_IN_EPOCHS, DEFAULT_CUT_FACTOR, -1, 1);
    }

    /**
     * @param steps  the minimum number of steps of a phase before S is read (≥ 0)
     * @param epochs the minimum number of epochs of draws (n each) of a phase before S is read (≥ 0)
     * @return this test with that burn-in (both minimums apply)
     * @throws IllegalArgumentException naming the option if steps &lt; 0 or epochs is not finite and ≥ 0
     */
    public PflugCriterion withBurnIn(long steps, double epochs) {
        if (steps < 0) {
            throw new IllegalArgumentException("burnInSteps (" + steps + ") must be >= 0");
        }
        Arguments.nonNegative("burnInEpochs", epochs);
        return new PflugCriterion(steps, epochs, cutFactor, haltAfterCuts, stride);
    }

    /**
     * @return this test multiplying the step size by {@code factor} on each detection
     * @throws IllegalArgumentException if factor is not in (0, 1)
     */
    public PflugCriterion withCutFactor(double factor) {
        Arguments.inOpenRange("cutFactor", factor, 0.0, 1.0);
        return new PflugCriterion(burnInSteps, burnInEpochs, factor, haltAfterCuts, stride);
    }

    /**
     * @param cuts the number of step-size cuts after which the next detection halts the fit with
     *             {@link StopReason#CONVERGED} (0: halt at the first detection)
     * @throws IllegalArgumentException if cuts &lt; 0
     */
    public PflugCriterion haltingAfterCuts(int cuts) {
        Arguments.nonNegative("haltAfterCuts", cuts);
        return new PflugCriterion(burnInSteps, burnInEpochs, cutFactor, cuts, stride);
    }

    /**
     * @param m use only every m-th pair of successive gradients (m = 1: all)
     * @throws IllegalArgumentException if m &lt; 1
     */
    public PflugCriterion pairStride(int m) {
        Arguments.positive("pairStride", m);
        return new PflugCriterion(burnInSteps, burnInEpochs, cutFactor, haltAfterCuts, m);
    }

    @Override
    public String name() {
        return "pflug";
    }

    @Override
    public void started(RunInfo run, StepContext context) {
        previous = new double[run.dimension()];
        previousStep = Long.MIN_VALUE;
        sum = 0;
        pairs = 0;
        phaseStep = 0;
        phaseDraws = 0;
        burnInDraws = (long) Math.ceil(burnInEpochs * run.sampleCount());
        cuts = 0;
    }

    @Override
    public void step(StepContext context) {
        StepView view = context.view();
        long k = view.step();
        if (k % stride == 0 && previousStep == k - 1) {
            double product = 0;
            double[] prev = previous;
            for (int j = 0, p = prev.length; j < p; j++) {
                product += view.batchGradient(j) * prev[j];
            }
            sum += product;
            pairs++;
            if (sum < 0 && k - phaseStep >= burnInSteps && view.draws() - phaseDraws >= burnInDraws) {
                detected(context, view, k);
            }
        }
        if ((k + 1) % stride == 0) {
            view.copyBatchGradient(previous);
            previousStep = k;
        }
    }

    private void detected(StepContext context, StepView view, long k) {
        String detail = Stops.fmt("sum of %d successive-gradient inner products %.4g < 0 after %d steps of the phase",
                pairs, sum, k - phaseStep);
        if (haltAfterCuts >= 0 && cuts >= haltAfterCuts) {
            detail += Stops.fmt(" (after %d step-size cuts): stationary", cuts);
            Stops.publish(context, name(), sum, 0.0, Decision.STOP, detail);
            Stops.halt(context, name(), StopReason.CONVERGED, detail);
            return;
        }
        detail += Stops.fmt("; step size %.4g cut by %.3g", view.stepSize(), cutFactor);
        Stops.publish(context, name(), sum, 0.0, Decision.CUT_STEP, detail);
        context.control().scaleStepSize(cutFactor);
        context.summary().stepCuts++;
        cuts++;
        sum = 0;
        pairs = 0;
        phaseStep = k;
        phaseDraws = view.draws();
    }

    @Override
    public void epochEnded(StepContext context) {
        StepView view = context.view();
        long steps = view.step() - phaseStep;
        long draws = view.draws() - phaseDraws;
        boolean burning = steps < burnInSteps || draws < burnInDraws;
        Stops.publish(context, name(), sum, 0.0, Decision.CONTINUE,
                Stops.fmt("sum of %d successive-gradient inner products %.4g over %d steps of phase %d%s", pairs, sum,
                        steps, cuts + 1, burning ? " (burn-in)" : ""));
    }

    @Override
    public String toString() {
        return "PflugCriterion[burn-in " + burnInSteps + " steps and " + burnInEpochs + " epochs, cut " + cutFactor
                + (haltAfterCuts >= 0 ? ", halt after " + haltAfterCuts + " cuts" : "") + ", pair stride " + stride
                + "]";
    }
}
