package dev.riskmin.diagnostics.estimator;

import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.data.Dataset;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.diagnostics.EventFilter;
import dev.riskmin.diagnostics.EventKind;
import dev.riskmin.diagnostics.NoiseEvent;
import dev.riskmin.objective.LinearObjective;
import dev.riskmin.sampling.Sampling;
import dev.riskmin.testing.LeastSquaresProblem;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;
import java.util.function.ToDoubleFunction;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The {@link NoiseMonitor} inside real fits: a step size of 1e-300 leaves the parameters exactly at
 * their start h<sub>0</sub> (the update rounds away), so every probe sees the same per-sample
 * gradients and the exact noise figures at h<sub>0</sub> are the targets. Over thousands of seeded
 * probes (smoothing off, so each event carries its own estimate) the mean of each estimate lies
 * within 4 standard errors of the exact value (central limit theorem; the standard error treats
 * probes as independent, which is conservative for batches without replacement, disjoint within an
 * epoch). Exact values: Cochran, Sampling Techniques, 3rd ed., Wiley 1977, ch. 2 (finite-population
 * correction) and ch. 5 (stratified sampling), chapters from memory; McCandlish et al.,
 * arXiv:1812.06162, 2018 (two-batch estimates); METHODS §9 (importance sampling).
 */
class NoiseMonitorMonteCarloTest {
    private static final LeastSquaresProblem PROBLEM = LeastSquaresProblem.gaussian(11, 40, 2, 0.5);
    private static final double[] START = {3.0, -2.0, 1.0};
    private static final Gradients EXACT = Gradients.of(PROBLEM.objective(), START);
    private static final int STEPS = 1500;
    private static final long[] SEEDS = {1, 2};
    private static final double BOUND = 4.0;

    private final List<String> figures = new ArrayList<>();

    @Test
    void withReplacementEstimatesAreUnbiased() {
        double traceSigma = EXACT.traceSigma();
        List<NoiseEvent> withReference = run(Minimizer.builder().sampling(Sampling.withReplacement()).batchSize(8),
                PROBLEM.data, NoiseMonitor.every(1).withSmoothing(1.0), false);
        assertWithinClt("WR T", withReference, NoiseEvent::traceCovariance, traceSigma);
        assertWithinClt("WR V", withReference, NoiseEvent::batchMeanVariance, traceSigma / 8);
        for (NoiseEvent e : withReference) {
            assertEquals(EXACT.normSquaredOfMean(), e.gradientNormSquared(), 1e-12 * EXACT.normSquaredOfMean());
        }
        List<NoiseEvent> batchOnly = run(Minimizer.builder().sampling(Sampling.withReplacement()).batchSize(8),
                PROBLEM.data, NoiseMonitor.every(1).withSmoothing(1.0).withReferenceCadence(Cadence.never()), false);
        assertWithinClt("WR in-batch |G|^2", batchOnly, NoiseEvent::gradientNormSquared, EXACT.normSquaredOfMean());
    }

    @Test
    void withoutReplacementEstimatesCarryTheFinitePopulationCorrection() {
        double traceS2 = EXACT.traceS2();
        List<NoiseEvent> events = run(Minimizer.builder().sampling(Sampling.withoutReplacement()).batchSize(8),
                PROBLEM.data, NoiseMonitor.every(1).withSmoothing(1.0).withReferenceCadence(Cadence.never()), false);
        assertWithinClt("WOR T", events, NoiseEvent::traceCovariance, traceS2);
        // Cochran ch. 2: (1 − B/n) tr S²/B; without the correction the mean would be 25 % higher here.
        assertWithinClt("WOR V", events, NoiseEvent::batchMeanVariance, (1 - 8 / 40.0) * traceS2 / 8);
        assertWithinClt("WOR in-batch |G|^2", events, NoiseEvent::gradientNormSquared, EXACT.normSquaredOfMean());
    }

    @Test
    void stratifiedVarianceMatchesCochransFormulaWhenTheStrataAreGiven() {
        // Strata by target: the 10 largest y form one stratum, so strata differ and stratification pays.
        int[] strata = topTenStrata();
        Dataset data = PROBLEM.data.withStrata(strata);
        int[] high = members(strata, 1);
        int[] low = members(strata, 0);
        double[] weights = {low.length / 40.0, high.length / 40.0};
        int[] sizes = {low.length, high.length};
        int[] drawn = {6, 2}; // B W_h for B = 8: proportional allocation with whole counts
        double exact = NoiseStatistics.stratifiedVariance(weights, drawn, sizes,
                new double[] {EXACT.traceS2(low), EXACT.traceS2(high)}, 2);
        Minimizer.Builder stratified = Minimizer.builder().sampling(Sampling.stratified()).batchSize(8);
        List<NoiseEvent> events = run(stratified, data,
                NoiseMonitor.every(1).withSmoothing(1.0).withReferenceCadence(Cadence.never()).withStrata(strata),
                false);
        assertWithinClt("stratified V", events, NoiseEvent::batchMeanVariance, exact);
        assertWithinClt("stratified in-batch |G|^2", events, NoiseEvent::gradientNormSquared,
                EXACT.normSquaredOfMean());
        // Without the strata the monitor falls back on the unstratified form, which is conservative.
        List<NoiseEvent> plain = run(stratified, data,
                NoiseMonitor.every(1).withSmoothing(1.0).withReferenceCadence(Cadence.never()), false);
        double plainMean = mean(plain, NoiseEvent::batchMeanVariance);
        assertTrue(plainMean > exact, "unstratified form " + plainMean + " should exceed the stratified " + exact);
    }

    @Test
    void importanceSamplingEstimatesTheScaledNoise() {
        // METHODS §9: draws with p_i = 1/(2n) + L_i/(2 Σ L) and scale 1/(n p_i); the scaled terms have
        // covariance trace Σ_i p_i ‖g_i/(n p_i) − G‖².
        LinearObjective objective = PROBLEM.objective();
        double total = 0;
        for (int i = 0; i < 40; i++) {
            total += objective.sampleSmoothness(i);
        }
        double expected = 0;
        for (int i = 0; i < 40; i++) {
            double p = 0.5 / 40 + 0.5 * objective.sampleSmoothness(i) / total;
            double s = 1.0 / (40 * p);
            for (int c = 0; c < EXACT.p; c++) {
                double d = s * EXACT.component(i, c) - EXACT.mean[c];
                expected += p * d * d;
            }
        }
        List<NoiseEvent> events = run(Minimizer.builder().sampling(Sampling.importance()).batchSize(4),
                PROBLEM.data, NoiseMonitor.every(1).withSmoothing(1.0), false);
        assertWithinClt("importance T", events, NoiseEvent::traceCovariance, expected);
        assertWithinClt("importance V", events, NoiseEvent::batchMeanVariance, expected / 4);
    }

    @Test
    void batchOfOnePairsTheDrawWithTheExactGradient() {
        List<NoiseEvent> wr = run(Minimizer.builder().sampling(Sampling.withReplacement()).batchSize(1),
                PROBLEM.data, NoiseMonitor.every(1).withSmoothing(1.0), false);
        assertEquals(STEPS * SEEDS.length, wr.size());
        assertWithinClt("B=1 WR tr", wr, NoiseEvent::traceCovariance, EXACT.traceSigma());
        assertWithinClt("B=1 WR V", wr, NoiseEvent::batchMeanVariance, EXACT.traceSigma());
        List<NoiseEvent> wor = run(Minimizer.builder().sampling(Sampling.withoutReplacement()).batchSize(1),
                PROBLEM.data, NoiseMonitor.every(1).withSmoothing(1.0), false);
        assertWithinClt("B=1 WOR tr S2", wor, NoiseEvent::traceCovariance, EXACT.traceS2());
        // Without the reference a batch of one gives nothing, so the monitor does not probe.
        List<NoiseEvent> none = run(Minimizer.builder().batchSize(1), PROBLEM.data,
                NoiseMonitor.every(1).withReferenceCadence(Cadence.never()), false);
        assertEquals(0, none.size());
    }

    @Test
    void independentReferenceBatchGivesUnbiasedTwoBatchEstimates() {
        // The host's reference is then a batch of 50 drawn with replacement (n = 40 > limit 10).
        List<NoiseEvent> single = run(Minimizer.builder().sampling(Sampling.withReplacement()).batchSize(1),
                PROBLEM.data, NoiseMonitor.every(1).withSmoothing(1.0), true);
        assertWithinClt("two-batch tr", single, NoiseEvent::traceCovariance, EXACT.traceSigma());
        assertWithinClt("two-batch |G|^2", single, NoiseEvent::gradientNormSquared, EXACT.normSquaredOfMean());
        List<NoiseEvent> batch = run(Minimizer.builder().sampling(Sampling.withReplacement()).batchSize(8),
                PROBLEM.data, NoiseMonitor.every(1).withSmoothing(1.0), true);
        assertWithinClt("|G_big|^2 - T/B_big", batch, NoiseEvent::gradientNormSquared, EXACT.normSquaredOfMean());
    }

    @Test
    void smoothingNumeratorAndDenominatorSeparatelyShrinksTheRatioBias() {
        // METHODS §2: the ratio of two noisy unbiased estimates is biased; smoothing each first (EMA,
        // α = 0.1) before dividing brings the published B_simple close to tr Σ/|G|². Batch-only
        // estimates (no reference) make the denominator noisy, which is where the bias shows.
        Minimizer.Builder fit = Minimizer.builder().sampling(Sampling.withReplacement()).batchSize(8);
        NoiseMonitor batchOnly = NoiseMonitor.every(1).withReferenceCadence(Cadence.never());
        List<NoiseEvent> raw = run(fit, PROBLEM.data, batchOnly.withSmoothing(1.0), false);
        List<NoiseEvent> smoothed = run(fit, PROBLEM.data, batchOnly, false);
        double exact = EXACT.traceSigma() / EXACT.normSquaredOfMean();
        double rawBias = mean(raw, NoiseEvent::noiseScale) / exact - 1;
        double smoothedBias = mean(smoothed.subList(100, smoothed.size()), NoiseEvent::noiseScale) / exact - 1;
        figures.add(String.format(Locale.ROOT,
                "B_simple exact %.4g, relative bias of per-probe ratios %+.3g, of the smoothed ratio %+.3f",
                exact, rawBias, smoothedBias));
        assertTrue(Math.abs(smoothedBias) < 0.08, "smoothed bias " + smoothedBias);
        assertTrue(Math.abs(smoothedBias) < Math.abs(rawBias) / 3, "smoothed " + smoothedBias + " vs raw " + rawBias);
        NoiseEvent last = smoothed.get(smoothed.size() - 1);
        double trace = smoothedTrace(smoothed.subList(smoothed.size() - STEPS, smoothed.size()));
        assertEquals(last.noiseScale(), NoiseStatistics.noiseScale(trace, last.gradientNormSquared()),
                1e-12 * last.noiseScale());
    }

    /** The EMA of the per-probe tr Σ over one fit's events, recomputed from their T (with replacement T is tr Σ). */
    private static double smoothedTrace(List<NoiseEvent> events) {
        double m = Double.NaN;
        for (NoiseEvent e : events) {
            m = Double.isNaN(m) ? e.traceCovariance() : m + NoiseMonitor.DEFAULT_SMOOTHING * (e.traceCovariance() - m);
        }
        return m;
    }

    // ---- helpers --------------------------------------------------------------------------------

    private static List<NoiseEvent> run(Minimizer.Builder builder, Dataset data, NoiseMonitor monitor,
                                        boolean independentReference) {
        List<NoiseEvent> events = new ArrayList<>();
        for (long seed : SEEDS) {
            Diagnostics.Builder host = Diagnostics.builder().monitor(monitor)
                    .subscribe(e -> events.add((NoiseEvent) e), EventFilter.of(EventKind.NOISE));
            if (independentReference) {
                host.fullGradientLimit(10).referenceBatch(50);
            }
            Diagnostics diagnostics = host.build();
            Minimizer m = builder.stepSize(1e-300).maxSteps(STEPS).seed(seed).build();
            m.fit(data, FitOptions.builder().listener(diagnostics).initialParameters(START).build());
            assertTrue(diagnostics.failures().isEmpty(), diagnostics.failures().toString());
        }
        return events;
    }

    /** Asserts the CLT bound and notes the figure; {@link #report()} prints one line per test. */
    private void assertWithinClt(String what, List<NoiseEvent> events, ToDoubleFunction<NoiseEvent> figure,
                                 double exact) {
        double[] x = events.stream().mapToDouble(figure).toArray();
        assertTrue(x.length >= 1000, what + ": only " + x.length + " probes");
        double m = Arrays.stream(x).average().orElseThrow();
        double ss = 0;
        for (double v : x) {
            ss += (v - m) * (v - m);
        }
        double se = Math.sqrt(ss / (x.length - 1) / x.length);
        double z = (m - exact) / se;
        figures.add(String.format(Locale.ROOT, "%s %.5g vs %.5g (z %.2f)", what, m, exact, z));
        assertTrue(Math.abs(z) <= BOUND,
                what + ": mean " + m + " vs exact " + exact + " is " + z + " standard errors off");
    }

    @AfterEach
    void report() {
        if (!figures.isEmpty()) {
            System.out.println("noise monte carlo (" + STEPS * SEEDS.length + " probes each): "
                    + String.join("; ", figures));
        }
    }

    private static double mean(List<NoiseEvent> events, ToDoubleFunction<NoiseEvent> figure) {
        return events.stream().mapToDouble(figure).average().orElseThrow();
    }

    private static int[] topTenStrata() {
        Integer[] order = new Integer[40];
        for (int i = 0; i < 40; i++) {
            order[i] = i;
        }
        Arrays.sort(order, (a, b) -> Double.compare(PROBLEM.y[b], PROBLEM.y[a]));
        int[] strata = new int[40];
        for (int k = 0; k < 10; k++) {
            strata[order[k]] = 1;
        }
        return strata;
    }

    private static int[] members(int[] strata, int label) {
        return java.util.stream.IntStream.range(0, strata.length).filter(i -> strata[i] == label).toArray();
    }
}
