package dev.riskmin.diagnostics.estimator;

import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.diagnostics.EventFilter;
import dev.riskmin.diagnostics.EventKind;
import dev.riskmin.diagnostics.NoiseEvent;
import dev.riskmin.diagnostics.verdict.RunSummary;
import dev.riskmin.sampling.Sampling;
import dev.riskmin.testing.LeastSquaresProblem;
import org.junit.jupiter.api.Test;

import java.util.ArrayList;
import java.util.List;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** What the {@link NoiseMonitor} publishes and writes into the run summary, and its edge cases. */
class NoiseMonitorTest {
    private static final LeastSquaresProblem PROBLEM = LeastSquaresProblem.gaussian(12, 40, 2, 0.5);

    @Test
    void summaryCarriesTheLatestSmoothedFigures() {
        NoiseMonitor monitor = NoiseMonitor.every(3);
        List<NoiseEvent> events = new ArrayList<>();
        Diagnostics diagnostics = host(monitor, events);
        Minimizer.builder().batchSize(5).stepSize(0.01).maxSteps(90).build()
                .fit(PROBLEM.data, FitOptions.listeners(diagnostics));
        assertEquals(30, events.size());
        assertEquals(30, monitor.probes());
        RunSummary summary = diagnostics.summary();
        NoiseEvent last = events.get(29);
        assertEquals(87, last.step());
        assertEquals(monitor.traceCovariance(), summary.traceCovariance);
        assertEquals(monitor.gradientNormSquared(), summary.gradientNormSquared);
        assertEquals(monitor.noiseScale(), summary.noiseScale);
        assertEquals(monitor.batchMeanVariance(), summary.batchMeanVariance);
        assertEquals(last.noiseScale(), summary.noiseScale);
        assertEquals(last.gradientNormSquared(), summary.gradientNormSquared);
        assertEquals(last.batchMeanVariance(), summary.batchMeanVariance);
        for (NoiseEvent e : events) {
            assertEquals(5, e.batchSize());
            // Without replacement the suggestion is ⌈B_simple⌉, capped at n (McCandlish et al. 2018).
            assertEquals(Math.min(40, Math.max(1, (int) Math.ceil(e.noiseScale()))), e.suggestedBatchSize());
        }
    }

    @Test
    void wholePopulationBatchHasNoVarianceAndAnExactNorm() {
        // Without replacement and B = n the batch mean is G: Cochran's correction gives 0.
        List<NoiseEvent> events = new ArrayList<>();
        NoiseMonitor monitor = NoiseMonitor.every(1).withReferenceCadence(Cadence.never());
        Minimizer.builder().batchSize(40).stepSize(0.01).maxSteps(5).build()
                .fit(PROBLEM.data, FitOptions.listeners(host(monitor, events)));
        assertEquals(5, events.size());
        Gradients exact = Gradients.of(PROBLEM.objective(), new double[3]);
        NoiseEvent first = events.get(0);
        assertEquals(0.0, first.batchMeanVariance());
        assertEquals(exact.traceS2(), first.traceCovariance(), 1e-12 * exact.traceS2());
        assertEquals(exact.normSquaredOfMean(), first.gradientNormSquared(), 1e-12 * exact.normSquaredOfMean());
    }

    @Test
    void strataOfTheWrongLengthDetachTheMonitorNamingBoth() {
        Diagnostics diagnostics = Diagnostics.builder().monitor(NoiseMonitor.every(1).withStrata(new int[] {0, 1, 0}))
                .build();
        ch.qos.logback.classic.Logger log = (ch.qos.logback.classic.Logger) org.slf4j.LoggerFactory.getLogger(
                Diagnostics.class);
        ch.qos.logback.classic.Level level = log.getLevel();
        log.setLevel(ch.qos.logback.classic.Level.ERROR); // the host's WARN line stays off the test output
        try {
            Minimizer.builder().sampling(Sampling.withReplacement()).batchSize(4).maxSteps(5).build()
                    .fit(PROBLEM.data, FitOptions.listeners(diagnostics));
        } finally {
            log.setLevel(level);
        }
        assertEquals(1, diagnostics.failures().size());
        String failure = diagnostics.failures().get(0);
        assertTrue(failure.contains("3 entries") && failure.contains("n = 40"), failure);
    }

    private static Diagnostics host(NoiseMonitor monitor, List<NoiseEvent> events) {
        return Diagnostics.builder().monitor(monitor)
                .subscribe(e -> events.add((NoiseEvent) e), EventFilter.of(EventKind.NOISE)).build();
    }
}
