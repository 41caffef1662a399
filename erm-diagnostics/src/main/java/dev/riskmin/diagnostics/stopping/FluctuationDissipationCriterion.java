package dev.riskmin.diagnostics.stopping;

import dev.riskmin.StopReason;
import dev.riskmin.diagnostics.Decision;
import dev.riskmin.diagnostics.Monitor;
import dev.riskmin.diagnostics.StepContext;
import dev.riskmin.hook.RunInfo;
import dev.riskmin.hook.StepView;
import dev.riskmin.util.Arguments;

/**
 * The statistical test of the fluctuation–dissipation relation: cuts the step size when the
 * iterates are statistically stationary. Yaida (arXiv:1810.00004, ICLR 2019) shows that at
 * stationarity of SGD with step ε,
 * <pre>
 *   E⟨h, ∇L(h)⟩ = (ε/2) E‖g‖²                         (FDR1, plain SGD)
 *   E⟨h, ∇L(h)⟩ = ((1 + μ)/(2ε)) E‖v‖²                 (heavy ball v ← μv − εg, h ← h + v)
 * </pre>
 * (the momentum form derived in METHODS §4 and confirmed there against the SASA authors' code). Lang,
 * Zhang &amp; Xiao ("SASA", NeurIPS 2019, arXiv:1909.09785) turn it into a test: every step records
 * z<sub>k</sub> = ⟨h<sub>k</sub>, g<sub>k</sub>⟩ − v<sub>k</sub> and v<sub>k</sub> = (ε/2)‖g<sub>k</sub>‖² (plain SGD) or
 * ((1 + μ)/(2ε))‖h<sub>k</sub> − h<sub>k−1</sub>‖² (heavy ball: the velocity before g<sub>k</sub> is mixed in),
 * with g<sub>k</sub> = g<sub>B</sub> including the smooth (L2) penalty. At its cadence (default once per
 * epoch) and once at least {@value #DEFAULT_MIN_SAMPLES} values have been recorded since the last cut,
 * it takes the newest half of them and applies {@link BatchMeansEquivalence} (batch-means variance,
 * t interval z̄ ± h at confidence 1 − γ, equivalence −δv̄ &lt; z̄ − h, z̄ + h &lt; δv̄, and the guards).
 * When the test fires: ε ← ζ ε, the windows and the count are cleared (momentum is kept), and a
 * {@link Decision#CUT_STEP} event is published; with {@link #haltingAfterCuts(int)} the fit halts
 * with {@link StopReason#CONVERGED} instead once that many cuts were made.
 *
 * <p>Defaults (METHODS §4, confirmed against the authors' research code): δ = 0.02, γ = 0.2,
 * ζ = 0.1, one test per epoch, at least 1,000 values (one per step) since the last cut. The window is
 * kept in two ring buffers allocated once per fit, of at most {@value #DEFAULT_WINDOW_CAPACITY}
 * values each by default (fewer when the step budget is smaller): beyond 2 × capacity values since
 * the last cut the window is the newest capacity values, not half (the research code keeps all;
 * the cap bounds memory). Per step: O(p) for the two inner products (plus an O(p) copy of h for heavy
 * ball), no allocation; per test: O(window) and a t quantile.
 *
 * <p>The update rule is identified from {@link RunInfo#updateRule()}: "sgd" and "heavy-ball(μ)" are
 * recognised. Any other rule (Nesterov, adaptive, variance-reduced) is treated as plain SGD, which
 * the relation does not cover: the test then assumes plain SGD, and says so in every event. A
 * non-smooth penalty (L1) moves h by its proximal step, which the relation does not cover either.
 * The relation is origin-independent in expectation (stationary E ∇L = 0), but the variance of z
 * grows with ‖h*‖, so far from the origin the test needs more values to fire.
 */
public final class FluctuationDissipationCriterion implements Monitor {
    /** Default relative half-width δ of the equivalence band. */
    public static final double DEFAULT_DELTA = 0.02;
    /** Default significance γ of the interval. */
    public static final double DEFAULT_GAMMA = 0.2;
    /** Default factor ζ applied to the step size when the test fires. */
    public static final double DEFAULT_CUT_FACTOR = 0.1;
    /** Default minimum number of values recorded since the last cut before a test. */
    public static final int DEFAULT_MIN_SAMPLES = 1000;
    /** Default capacity of each ring buffer. */
    public static final int DEFAULT_WINDOW_CAPACITY = 1 << 16;

    private final BatchMeansEquivalence equivalence;
    private final double cutFactor;
    private final int minSamples;
    private final int capacity;
    private final int epochCadence;     // > 0: every k epochs
    private final long stepCadence;     // > 0: every k steps
    private final int haltAfterCuts;    // < 0: never halt

    private double[] zs = new double[0];
    private double[] vs = new double[0];
    private double[] previous = new double[0];
    private boolean havePrevious;
    private double momentum;
    private String form = "";
    private int head;
    private long count;
    private int cuts;
    private int epochsSeen;

    private FluctuationDissipationCriterion(BatchMeansEquivalence equivalence, double cutFactor, int minSamples,
                                            int capacity, int epochCadence, long stepCadence, int haltAfterCuts) {
        this.equivalence = equivalence;
        this.cutFactor = cutFactor;
        this.minSamples = minSamples;
        this.capacity = capacity;
        this.epochCadence = epochCadence;
        this.stepCadence = stepCadence;
        this.haltAfterCuts = haltAfterCuts;
    }

    /** δ = 0.02, γ = 0.2, ζ = 0.1, once per epoch, ≥ 1,000 values since the last cut, never halting. */
    public static FluctuationDissipationCriterion defaults() {
        return new FluctuationDissipationCriterion(BatchMeansEquivalence.of(DEFAULT_DELTA, DEFAULT_GAMMA),
                DEFAULT_CUT_FACTOR, DEFAULT_MIN_SAMPLES, DEFAULT_WINDOW_CAPACITY, 1, 0, -1);
    }

    /**
     * @return this test with equivalence band ±δ v̄ and interval significance γ
     * @throws IllegalArgumentException naming the option if delta or gamma is outside (0, 1)
     */
    public FluctuationDissipationCriterion withBand(double delta, double gamma) {
        return new FluctuationDissipationCriterion(BatchMeansEquivalence.of(delta, gamma), cutFactor, minSamples,
                capacity, epochCadence, stepCadence, haltAfterCuts);
    }

    /**
     * @return this test multiplying the step size by ζ = {@code factor} when it fires
     * @throws IllegalArgumentException if factor is not in (0, 1)
     */
    public FluctuationDissipationCriterion withCutFactor(double factor) {
        Arguments.inOpenRange("cutFactor", factor, 0.0, 1.0);
        return new FluctuationDissipationCriterion(equivalence, factor, minSamples, capacity, epochCadence,
                stepCadence, haltAfterCuts);
    }

    /**
     * @return this test waiting for {@code values} recorded values (steps) since the last cut before testing
     * @throws IllegalArgumentException if values &lt; 8 (two batches of two in the newest half)
     */
    public FluctuationDissipationCriterion withMinSamples(int values) {
        if (values < 8) {
            throw new IllegalArgumentException("minSamples (" + values + ") must be >= 8");
        }
        return new FluctuationDissipationCriterion(equivalence, cutFactor, values, capacity, epochCadence,
                stepCadence, haltAfterCuts);
    }

    /**
     * @return this test keeping at most {@code values} values in each ring buffer
     * @throws IllegalArgumentException if values &lt; 4
     */
    public FluctuationDissipationCriterion withWindowCapacity(int values) {
        if (values < 4) {
            throw new IllegalArgumentException("windowCapacity (" + values + ") must be >= 4");
        }
        return new FluctuationDissipationCriterion(equivalence, cutFactor, minSamples, values, epochCadence,
                stepCadence, haltAfterCuts);
    }

    /**
     * @return this test testing at the end of every k-th epoch
     * @throws IllegalArgumentException if k &lt; 1
     */
    public FluctuationDissipationCriterion everyEpochs(int k) {
        Arguments.positive("epochCadence", k);
        return new FluctuationDissipationCriterion(equivalence, cutFactor, minSamples, capacity, k, 0,
                haltAfterCuts);
    }

    /**
     * @return this test testing after every k-th step instead of at epoch ends
     * @throws IllegalArgumentException if k &lt; 1
     */
    public FluctuationDissipationCriterion everySteps(long k) {
        Arguments.positive("stepCadence", k);
        return new FluctuationDissipationCriterion(equivalence, cutFactor, minSamples, capacity, 0, k,
                haltAfterCuts);
    }

    /**
     * @param cuts the number of cuts after which the next firing halts the fit with
     *             {@link StopReason#CONVERGED} (0: halt at the first firing)
     * @throws IllegalArgumentException if cuts &lt; 0
     */
    public FluctuationDissipationCriterion haltingAfterCuts(int cuts) {
        Arguments.nonNegative("haltAfterCuts", cuts);
        return new FluctuationDissipationCriterion(equivalence, cutFactor, minSamples, capacity, epochCadence,
                stepCadence, cuts);
    }

    @Override
    public String name() {
        return "fluctuation-dissipation";
    }

    @Override
    public void started(RunInfo run, StepContext context) {
        int size = capacity;
        if (run.plannedSteps() >= 0) {
            size = (int) Math.max(4, Math.min(capacity, run.plannedSteps() / 2 + 1));
        }
        zs = new double[size];
        vs = new double[size];
        momentum = momentumOf(run.updateRule());
        form = Double.isNaN(momentum) ? "assumes plain SGD (update rule " + run.updateRule() + " not identified)"
                : momentum == 0 ? "plain SGD" : "heavy ball, momentum " + momentum;
        if (Double.isNaN(momentum)) {
            momentum = 0;
        }
        previous = momentum > 0 ? new double[run.dimension()] : new double[0];
        havePrevious = false;
        head = 0;
        count = 0;
        cuts = 0;
        epochsSeen = 0;
    }

    /** @return μ for "sgd" (0) and "heavy-ball(μ)", NaN for any other rule */
    static double momentumOf(String rule) {
        if ("sgd".equals(rule)) {
            return 0.0;
        }
        String prefix = "heavy-ball(";
        if (rule != null && rule.startsWith(prefix) && rule.endsWith(")")) {
            try {
                double mu = Double.parseDouble(rule.substring(prefix.length(), rule.length() - 1));
                return mu >= 0 && mu < 1 ? mu : Double.NaN;
            } catch (NumberFormatException e) {
                return Double.NaN;
            }
        }
        return Double.NaN;
    }

    @Override
    public void step(StepContext context) {
        StepView view = context.view();
        double eps = view.stepSize();
        int p = view.dimension();
        double hg = 0;
        double gg = 0;
        double vv = 0;
        if (momentum > 0) {
            double[] prev = previous;
            for (int j = 0; j < p; j++) {
                double h = view.parameter(j);
                hg += h * view.batchGradient(j);
                double d = h - prev[j];
                vv += d * d;
                prev[j] = h;
            }
            boolean first = !havePrevious;
            havePrevious = true;
            if (first || !(eps > 0)) {
                return;
            }
        } else {
            for (int j = 0; j < p; j++) {
                double g = view.batchGradient(j);
                hg += view.parameter(j) * g;
                gg += g * g;
            }
        }
        double v = momentum > 0 ? (1 + momentum) / (2 * eps) * vv : 0.5 * eps * gg;
        zs[head] = hg - v;
        vs[head] = v;
        head = head + 1 == zs.length ? 0 : head + 1;
        count++;
        if (stepCadence > 0 && (view.step() + 1) % stepCadence == 0) {
            test(context, view);
        }
    }

    @Override
    public void epochEnded(StepContext context) {
        if (epochCadence > 0 && ++epochsSeen % epochCadence == 0) {
            test(context, context.view());
        }
    }

    private void test(StepContext context, StepView view) {
        if (count < minSamples) {
            Stops.publish(context, name(), Double.NaN, Double.NaN, Decision.CONTINUE,
                    Stops.fmt("%d of %d values since the last cut; %s", count, minSamples, form));
            return;
        }
        int size = zs.length;
        int w = (int) Math.min(count / 2, size);
        int start = Math.floorMod(head - w, size);
        BatchMeansEquivalence.Outcome o = equivalence.evaluate(zs, vs, start, w, cuts == 0);
        String figures = Stops.fmt("z mean %.4g +/- %.4g (t interval, %d batches of %d, df %d) against band +/-%.4g"
                        + " (delta %.3g x v mean %.4g); half-window means %.4g, %.4g; %d values since the last cut; %s",
                o.zMean(), o.halfWidth(), o.batches(), o.batchSize(), o.degreesOfFreedom(), o.band(),
                equivalence.delta(), o.vMean(), o.firstHalfMean(), o.secondHalfMean(), count, form);
        if (!o.fires()) {
            String why = o.equivalent() ? "interval inside the band but the guards fail: " : "not stationary: ";
            Stops.publish(context, name(), o.statistic(), o.band(), Decision.CONTINUE, why + figures);
            return;
        }
        if (haltAfterCuts >= 0 && cuts >= haltAfterCuts) {
            String detail = Stops.fmt("stationary after %d step-size cuts: ", cuts) + figures;
            Stops.publish(context, name(), o.statistic(), o.band(), Decision.STOP, detail);
            Stops.halt(context, name(), StopReason.CONVERGED, detail);
            return;
        }
        Stops.publish(context, name(), o.statistic(), o.band(), Decision.CUT_STEP,
                Stops.fmt("stationary: step size %.4g cut by %.3g; ", view.stepSize(), cutFactor) + figures);
        context.control().scaleStepSize(cutFactor);
        context.summary().stepCuts++;
        cuts++;
        count = 0;
        head = 0;
    }

    @Override
    public String toString() {
        return "FluctuationDissipationCriterion[delta " + equivalence.delta() + ", gamma " + equivalence.gamma()
                + ", cut " + cutFactor + ", min samples " + minSamples + ", "
                + (stepCadence > 0 ? "every " + stepCadence + " steps" : "every " + epochCadence + " epochs")
                + (haltAfterCuts >= 0 ? ", halt after " + haltAfterCuts + " cuts" : "") + "]";
    }
}
