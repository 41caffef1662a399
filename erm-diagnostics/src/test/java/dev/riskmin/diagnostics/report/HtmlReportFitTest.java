package dev.riskmin.diagnostics.report;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.data.Dataset;
import dev.riskmin.diagnostics.Decision;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.diagnostics.LossEvent;
import dev.riskmin.diagnostics.StoppingEvent;
import dev.riskmin.diagnostics.estimator.AngleMonitor;
import dev.riskmin.diagnostics.estimator.Cadence;
import dev.riskmin.diagnostics.estimator.LossMonitor;
import dev.riskmin.diagnostics.estimator.NoiseMonitor;
import dev.riskmin.diagnostics.estimator.OscillationMonitor;
import dev.riskmin.diagnostics.sink.TraceRecorder;
import dev.riskmin.diagnostics.stopping.GradientNormCriterion;
import dev.riskmin.diagnostics.stopping.PflugCriterion;
import dev.riskmin.diagnostics.verdict.HealthVerdict;
import dev.riskmin.hook.FitListener;
import dev.riskmin.hook.RunInfo;
import dev.riskmin.sampling.Sampling;
import dev.riskmin.testing.LeastSquaresProblem;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.w3c.dom.Element;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.function.ToDoubleFunction;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * A real fit rendered end to end: Minimizer + Diagnostics with the noise, angle, loss and oscillation
 * monitors, two stopping tests and a bounded recorder, written to a file and read back.
 *
 * <p>Set the system property {@code riskmin.report.dir} to keep a copy of the report there (for
 * {@code scripts/render-report.sh}); by default it goes to a temporary directory removed afterwards.
 */
class HtmlReportFitTest {

    record RealFit(Fit fit, RunInfo run, Diagnostics diagnostics, TraceRecorder recorder) {
    }

    /** Least squares, n = 2,000 (500 held out), p = 9, B = 16, 30 epochs; the Pflug test halves the step. */
    static RealFit realFit() {
        LeastSquaresProblem problem = LeastSquaresProblem.gaussian(21, 2500, 8, 2.0);
        Dataset train = Dataset.of(Arrays.copyOfRange(problem.x, 0, 2000), Arrays.copyOfRange(problem.y, 0, 2000));
        Dataset heldOut = Dataset.of(Arrays.copyOfRange(problem.x, 2000, 2500),
                Arrays.copyOfRange(problem.y, 2000, 2500));
        TraceRecorder recorder = TraceRecorder.bounded(4096);
        Diagnostics diagnostics = Diagnostics.builder()
                .monitor(NoiseMonitor.every(25))
                .monitor(AngleMonitor.every(25))
                .monitor(LossMonitor.defaults().withObjectiveCadence(Cadence.every(125))
                        .withHeldOutCadence(Cadence.every(125)))
                .monitor(OscillationMonitor.defaults())
                .monitor(PflugCriterion.defaults())
                .monitor(GradientNormCriterion.defaults())
                .subscribe(recorder)
                .build();
        RunInfo[] run = new RunInfo[1];
        FitListener capture = new FitListener() {
            @Override
            public void started(RunInfo info) {
                run[0] = info;
            }
        };
        Fit fit = Minimizer.builder().sampling(Sampling.withReplacement()).batchSize(16).stepSize(0.1).epochs(30)
                .seed(4).build()
                .fit(train, FitOptions.builder().listener(diagnostics).listener(capture).heldOut(heldOut).build());
        assertTrue(diagnostics.failures().isEmpty(), diagnostics.failures().toString());
        return new RealFit(fit, run[0], diagnostics, recorder);
    }

    static HtmlReport report(RealFit f) {
        return HtmlReport.of(f.recorder()).withTitle("Least squares, n = 2000, B = 16")
                .withFacts(RunFacts.of(f.run()).withFit(f.fit())).withVerdict(f.diagnostics().verdict());
    }

    static <E> List<double[]> finite(List<E> events, ToDoubleFunction<E> step, ToDoubleFunction<E> value) {
        List<double[]> rows = new ArrayList<>();
        for (E e : events) {
            double v = value.applyAsDouble(e);
            if (Double.isFinite(v)) {
                rows.add(new double[] {step.applyAsDouble(e), v});
            }
        }
        return rows;
    }

    static void assertRows(List<double[]> expected, List<double[]> actual, String what) {
        assertEquals(expected.size(), actual.size(), what + ": rows");
        for (int i = 0; i < expected.size(); i++) {
            assertTrue(Arrays.equals(expected.get(i), actual.get(i)),
                    what + " row " + i + ": " + Arrays.toString(expected.get(i)) + " vs " + Arrays.toString(actual.get(i)));
        }
    }

    @Test
    void realFitIsRenderedWithEveryPlotHoldingTheRecordedValues(@TempDir Path dir) throws IOException {
        RealFit f = realFit();
        Path file = dir.resolve("report.html");
        report(f).write(file);
        String keep = System.getProperty("riskmin.report.dir");
        if (keep != null && !keep.isBlank()) {
            Files.createDirectories(Path.of(keep));
            Files.copy(file, Path.of(keep).resolve("fit-report.html"), java.nio.file.StandardCopyOption.REPLACE_EXISTING);
        }
        String html = Files.readString(file, StandardCharsets.UTF_8);
        ReportDocument doc = ReportDocument.parse(html);
        assertEquals(html, report(f).render(), "the same fit's report renders to the same bytes");
        assertTrue(html.length() < 2_000_000, "bounded size: " + html.length() + " bytes");

        // The verdict shown is the fit's.
        HealthVerdict verdict = f.diagnostics().verdict();
        Element box = doc.find("div", "class", "verdict");
        assertNotNull(box);
        assertEquals(verdict.condition().name(), box.getAttribute("data-condition"));
        assertEquals(verdict.advice(), ReportDocument.texts(box, "span").get(0));
        for (var figure : verdict.figures().entrySet()) {
            Element row = doc.find("div", "data-figure", figure.getKey());
            assertNotNull(row, figure.getKey());
            assertEquals(figure.getValue(), Double.parseDouble(ReportDocument.all(row, "dd").get(0).getAttribute("data-value")));
        }

        // Every plot of the measured figures holds the recorder's values (within the 2,000-point budget, unthinned here).
        List<LossEvent> losses = f.recorder().losses();
        assertRows(finite(losses, LossEvent::step, LossEvent::smoothedBatchLoss), doc.rows("objective", "smoothed batch loss"), "smoothed");
        List<double[]> objective = finite(losses, LossEvent::step, LossEvent::objective);
        List<double[]> heldOut = finite(losses, LossEvent::step, LossEvent::heldOutLoss);
        assertTrue(objective.size() >= 5 && heldOut.size() >= 5, objective.size() + " objectives, " + heldOut.size() + " held-out");
        assertRows(objective, doc.rows("objective", "objective L(h)"), "objective");
        assertRows(heldOut, doc.rows("objective", "held-out loss"), "held-out");
        assertRows(finite(losses, LossEvent::step, LossEvent::gradientNorm), doc.rows("gradient-norm", "‖∇L(h)‖"), "norm");
        assertRows(finite(losses, LossEvent::step, LossEvent::stepSize), doc.rows("step-size", "step size ε"), "step");
        assertRows(finite(f.recorder().noise(), e -> e.step(), e -> e.noiseScale()),
                doc.rows("noise-scale", "noise scale B_simple = tr Σ/‖G‖²"), "noise scale");
        assertRows(finite(f.recorder().angles(), e -> e.step(), e -> e.cosine()), doc.rows("cosine", "cos φ at a probe"), "cosine");
        assertEquals(objective.size(), doc.polylinePoints("objective", "objective L(h)"));

        // One panel per stopping test, with the Pflug test's step cuts marked.
        List<StoppingEvent> pflug = f.recorder().stopping().stream().filter(s -> s.test().equals("pflug")).toList();
        long cuts = pflug.stream().filter(s -> s.decision() == Decision.CUT_STEP).count();
        assertTrue(cuts >= 1, "the Pflug test cut the step: " + cuts);
        Element panel = doc.find("div", "data-test", "pflug");
        assertNotNull(panel);
        String pflugPlot = ReportDocument.all(panel, "figure").get(0).getAttribute("data-plot");
        assertRows(finite(pflug, StoppingEvent::step, StoppingEvent::statistic), doc.rows(pflugPlot, "statistic"), "S");
        assertEquals(cuts, doc.rows(pflugPlot, "CUT_STEP").size());
        assertEquals(cuts, ReportDocument.all(doc.seriesGroup(pflugPlot, "CUT_STEP"), "line").size());
        assertNotNull(doc.find("div", "data-test", "gradient-norm"));

        // The run's facts, and no plot of this fit is empty.
        assertTrue(html.contains("<th>seed</th><td>4</td>"), "seed fact");
        for (Element figure : doc.all("figure")) {
            assertTrue(ReportDocument.all(figure, "svg").size() > 0, "plot " + figure.getAttribute("data-plot") + " is drawn");
        }
        assertFalse(html.contains("Not measured in this run"), "every figure of this fit was measured");
    }
}
