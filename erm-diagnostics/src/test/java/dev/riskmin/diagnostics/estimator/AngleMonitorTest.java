package dev.riskmin.diagnostics.estimator;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.data.Standardizer;
import dev.riskmin.diagnostics.AngleEvent;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.diagnostics.EventFilter;
import dev.riskmin.diagnostics.EventKind;
import dev.riskmin.hook.FitControl;
import dev.riskmin.hook.FitListener;
import dev.riskmin.hook.StepView;
import dev.riskmin.objective.LinearObjective;
import dev.riskmin.loss.Losses;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.sampling.Sampling;
import dev.riskmin.testing.LeastSquaresProblem;
import org.junit.jupiter.api.Test;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** The {@link AngleMonitor} on real fits: descent statistics, their distribution, and certified mode. */
class AngleMonitorTest {
    private static final LeastSquaresProblem EASY = LeastSquaresProblem.gaussian(21, 500, 5, 0.1);

    @Test
    void easyProblemWithSmallStepAndLargeBatchDescendsAlmostAlways() {
        // METHODS §3: cos φ ≈ (1 + B_simple/B)^(-1/2); far from the optimum B_simple is about p, so a
        // batch of 64 gives cos φ near 0.95 and virtually every step is a descent direction.
        AngleMonitor monitor = AngleMonitor.every(1);
        List<AngleEvent> events = new ArrayList<>();
        Diagnostics diagnostics = Diagnostics.builder().monitor(monitor)
                .subscribe(e -> events.add((AngleEvent) e), EventFilter.of(EventKind.ANGLE)).build();
        Minimizer.builder().sampling(Sampling.withReplacement()).batchSize(64).stepSize(0.01).maxSteps(300).seed(3)
                .build().fit(EASY.data, FitOptions.listeners(diagnostics));
        System.out.println(String.format(Locale.ROOT, "angle, easy problem: descent share %.3f, mean cos %.3f,"
                + " 5%% quantile %.3f (%d probes)", monitor.descentShare(), monitor.meanCosine(),
                monitor.cosineQuantile(0.05), monitor.probes()));
        assertEquals(300, monitor.probes());
        assertTrue(monitor.descentShare() >= 0.99, "descent share " + monitor.descentShare());
        assertTrue(monitor.meanCosine() > 0.8, "mean cos " + monitor.meanCosine());
        assertEquals(monitor.descentShare(), diagnostics.summary().descentShare);
        assertEquals(monitor.meanCosine(), diagnostics.summary().meanCosine);
        assertEquals(300, diagnostics.summary().angleProbes);
        // The running figures in the events are the running mean and share of the events' own cosines.
        double sum = 0;
        int descents = 0;
        for (int k = 0; k < events.size(); k++) {
            AngleEvent e = events.get(k);
            sum += e.cosine();
            descents += e.cosine() > 0 ? 1 : 0;
            assertEquals(sum / (k + 1), e.meanCosine(), 1e-12);
            assertEquals((double) descents / (k + 1), e.descentShare(), 0.0);
            assertTrue(Double.isNaN(e.angleToOptimum()) && Double.isNaN(e.suboptimality()));
        }
    }

    @Test
    void histogramQuantilesAreWithinOneBinOfTheEmpiricalQuantiles() {
        AngleMonitor monitor = AngleMonitor.every(1);
        List<AngleEvent> events = new ArrayList<>();
        Diagnostics diagnostics = Diagnostics.builder().monitor(monitor)
                .subscribe(e -> events.add((AngleEvent) e), EventFilter.of(EventKind.ANGLE)).build();
        // A small batch near the optimum: cosines spread over [-1, 1].
        Minimizer.builder().batchSize(2).stepSize(0.02).epochs(4).seed(5).build()
                .fit(EASY.data, FitOptions.listeners(diagnostics));
        double[] cosines = events.stream().mapToDouble(AngleEvent::cosine).sorted().toArray();
        assertEquals(cosines.length, Arrays.stream(monitor.histogram()).sum());
        for (double q : new double[] {0.1, 0.25, 0.5, 0.75, 0.9}) {
            double empirical = cosines[(int) Math.ceil(q * cosines.length) - 1];
            assertEquals(empirical, monitor.cosineQuantile(q), 2.0 / AngleMonitor.BINS + 1e-12, "quantile " + q);
        }
        assertTrue(monitor.cosineQuantile(0.1) < 0, "a small batch near the optimum often points uphill");
    }

    @Test
    void certifiedModeWithTheExactGradientStaysWithinNinetyDegrees() {
        // Full batch (B = n, without replacement) makes g_B the exact gradient G; convexity then bounds
        // the angle between -G and h* - h by 90 degrees (METHODS §3). The optimum is commons-math3's QR.
        LeastSquaresProblem problem = LeastSquaresProblem.gaussian(8, 60, 3, 0.3);
        AngleMonitor monitor = AngleMonitor.certified(problem.optimum, problem.optimalObjective)
                .withCadence(Cadence.every(1));
        List<AngleEvent> events = new ArrayList<>();
        ParameterRecorder recorder = new ParameterRecorder();
        Diagnostics diagnostics = Diagnostics.builder().monitor(monitor)
                .subscribe(e -> events.add((AngleEvent) e), EventFilter.of(EventKind.ANGLE)).build();
        Minimizer.builder().batchSize(60).stepSize(0.1).maxSteps(80).build()
                .fit(problem.data, FitOptions.builder().listener(diagnostics).listener(recorder).build());
        assertEquals(80, events.size());
        LinearObjective objective = problem.objective();
        for (int k = 0; k < events.size(); k++) {
            AngleEvent e = events.get(k);
            assertTrue(e.angleToOptimum() >= 0 && e.angleToOptimum() <= 90, "angle " + e.angleToOptimum());
            double independent = objective.value(recorder.parameters.get(k)) - problem.optimalObjective;
            assertEquals(independent, e.suboptimality(), 1e-12 * Math.max(1, Math.abs(independent)));
            assertEquals(1.0, e.cosine(), 1e-12); // g_B = G
        }
        assertTrue(events.get(79).suboptimality() < events.get(0).suboptimality());
        assertEquals(events.get(79).angleToOptimum(), monitor.latestAngleToOptimum());
    }

    @Test
    void certifiedSuboptimalityUsesTheFullObjectiveWhenTheReferenceIsABatch() {
        // n = 60 above a full-gradient limit of 10: the reference is an independent batch, and the
        // suboptimality comes from the probe's full objective instead; it must still be exact.
        LeastSquaresProblem problem = LeastSquaresProblem.gaussian(9, 60, 3, 0.3);
        AngleMonitor monitor = AngleMonitor.certified(problem.optimum, problem.optimalObjective)
                .withCadence(Cadence.every(5));
        List<AngleEvent> events = new ArrayList<>();
        ParameterRecorder recorder = new ParameterRecorder();
        Diagnostics diagnostics = Diagnostics.builder().monitor(monitor).fullGradientLimit(10).referenceBatch(200)
                .subscribe(e -> events.add((AngleEvent) e), EventFilter.of(EventKind.ANGLE)).build();
        Minimizer.builder().batchSize(4).stepSize(0.05).maxSteps(100).build()
                .fit(problem.data, FitOptions.builder().listener(diagnostics).listener(recorder).build());
        assertEquals(20, events.size());
        LinearObjective objective = problem.objective();
        for (int k = 0; k < events.size(); k++) {
            double independent = objective.value(recorder.parameters.get(5 * k)) - problem.optimalObjective;
            assertEquals(independent, events.get(k).suboptimality(), 1e-12 * Math.max(1, Math.abs(independent)));
            assertTrue(events.get(k).angleToOptimum() >= 0 && events.get(k).angleToOptimum() <= 180);
        }
    }

    @Test
    void certifiedModeOnAStandardizedFitTakesTheOptimumOnTheFittedScale() {
        // The fit works on standardized features; the original-scale optimum is mapped with the same
        // standardizer, and L* is that of the standardized (unpenalized, so equal) problem.
        LeastSquaresProblem problem = LeastSquaresProblem.gaussian(10, 60, 3, 0.3);
        Standardizer standardizer = Standardizer.fit(problem.data);
        double[] optimum = standardizer.fromOriginalScale(problem.optimum, 1, true);
        LinearObjective standardized = LinearObjective.of(standardizer.apply(problem.data), Losses.squared(),
                Penalty.none(), true);
        AngleMonitor monitor =
                AngleMonitor.certified(optimum, standardized.value(optimum)).withCadence(Cadence.every(1));
        List<AngleEvent> events = new ArrayList<>();
        Diagnostics diagnostics = Diagnostics.builder().monitor(monitor)
                .subscribe(e -> events.add((AngleEvent) e), EventFilter.of(EventKind.ANGLE)).build();
        Minimizer.builder().standardize(true).batchSize(60).stepSize(0.1).maxSteps(40).build()
                .fit(problem.data, FitOptions.listeners(diagnostics));
        assertEquals(40, events.size());
        for (AngleEvent e : events) {
            assertTrue(e.angleToOptimum() >= 0 && e.angleToOptimum() <= 90, "angle " + e.angleToOptimum());
            assertTrue(e.suboptimality() >= -1e-12, "suboptimality " + e.suboptimality());
        }
        assertTrue(events.get(39).suboptimality() < 1e-3 * events.get(0).suboptimality(),
                "suboptimality " + events.get(0).suboptimality() + " -> " + events.get(39).suboptimality());
    }

    @Test
    void optimumOfTheWrongLengthDetachesTheMonitorWithAMessageNamingBoth() {
        LeastSquaresProblem problem = LeastSquaresProblem.gaussian(8, 60, 3, 0.3);
        Diagnostics diagnostics = Diagnostics.builder()
                .monitor(AngleMonitor.certified(new double[] {1, 2}, 0.0).withCadence(Cadence.every(1))).build();
        // The host reports the detachment once at WARN; keep it off the test output.
        ch.qos.logback.classic.Logger log = (ch.qos.logback.classic.Logger) org.slf4j.LoggerFactory.getLogger(
                Diagnostics.class);
        ch.qos.logback.classic.Level level = log.getLevel();
        log.setLevel(ch.qos.logback.classic.Level.ERROR);
        Fit fit;
        try {
            fit = Minimizer.builder().maxSteps(10).build().fit(problem.data, FitOptions.listeners(diagnostics));
        } finally {
            log.setLevel(level);
        }
        assertEquals(10, fit.steps());
        assertEquals(1, diagnostics.failures().size());
        String failure = diagnostics.failures().get(0);
        assertTrue(failure.contains("2 entries") && failure.contains("p = 4"), failure);
    }

    /** Records h_t at every step (listeners see the same h_t as the diagnostics host). */
    static final class ParameterRecorder implements FitListener {
        final List<double[]> parameters = new ArrayList<>();

        @Override
        public void step(StepView view, FitControl control) {
            double[] h = new double[view.dimension()];
            view.copyParameters(h);
            parameters.add(h);
        }
    }
}
