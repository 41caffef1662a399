package dev.riskmin.diagnostics.report;

import dev.riskmin.diagnostics.AngleEvent;
import dev.riskmin.diagnostics.Decision;
import dev.riskmin.diagnostics.DiagnosticEvent;
import dev.riskmin.diagnostics.LossEvent;
import dev.riskmin.diagnostics.NoiseEvent;
import dev.riskmin.diagnostics.StoppingEvent;
import dev.riskmin.diagnostics.VerdictEvent;
import dev.riskmin.diagnostics.sink.CsvTraceWriter;
import dev.riskmin.diagnostics.sink.JsonLinesTraceWriter;
import dev.riskmin.diagnostics.sink.TraceReader;
import dev.riskmin.diagnostics.sink.TraceRecorder;
import dev.riskmin.diagnostics.verdict.Condition;
import dev.riskmin.diagnostics.verdict.HealthVerdict;
import org.junit.jupiter.api.Test;
import org.w3c.dom.Element;

import java.io.IOException;
import java.io.StringReader;
import java.io.StringWriter;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

import static dev.riskmin.diagnostics.report.ReportFixtures.finite;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** The report's structure, its data tables, its escaping, determinism and bounded size, on invented events. */
class HtmlReportTest {
    private static final List<String> STEP_PLOTS = List.of("objective", "gradient-norm", "step-size", "batch-size",
            "noise-variance", "noise-scale", "cosine", "descent-share");

    static void assertRows(List<double[]> expected, List<double[]> actual, String what) {
        assertEquals(expected.size(), actual.size(), what + ": rows");
        for (int i = 0; i < expected.size(); i++) {
            assertTrue(Arrays.equals(expected.get(i), actual.get(i)),
                    what + " row " + i + ": " + Arrays.toString(expected.get(i)) + " vs " + Arrays.toString(actual.get(i)));
        }
    }

    static List<String> axisTitles(Element plot) {
        List<String> titles = new ArrayList<>();
        for (Element t : ReportDocument.all(plot, "text")) {
            if (t.getAttribute("class").equals("axis-title")) {
                titles.add(t.getTextContent());
            }
        }
        return titles;
    }

    /** The listed actions of a stopping-test panel. */
    static List<String> actions(Element test) {
        return ReportDocument.all(test, "ol").stream().flatMap(ol -> ReportDocument.texts(ol, "li").stream()).toList();
    }

    static long tickLabels(Element plot, String axis) {
        return ReportDocument.all(plot, "text").stream().filter(t -> t.getAttribute("class").equals(axis)).count();
    }

    @Test
    void everySectionAndPlotIsPresentWithTitlesAxisUnitsAndTicks() {
        ReportDocument doc = ReportDocument.parse(HtmlReport.of(ReportFixtures.run()).withTitle("Invented run").render());
        assertEquals("Invented run", doc.all("title").get(0).getTextContent());
        assertEquals("Invented run", doc.all("h1").get(0).getTextContent());
        for (String section : List.of("run", "verdict", "objective", "schedule", "noise", "angle", "stopping")) {
            assertEquals(1, ReportDocument.all(doc.section(section), "h2").size(), section);
        }
        Map<String, String> yUnits = Map.of("objective", "(loss units)", "gradient-norm", "(gradient units)",
                "step-size", "step size ε", "batch-size", "(samples)", "noise-variance", "(squared gradient units)",
                "noise-scale", "(samples)", "cosine", "cos φ", "descent-share", "(0 to 1)");
        for (String id : STEP_PLOTS) {
            Element plot = doc.plot(id);
            assertFalse(ReportDocument.texts(plot, "figcaption").get(0).isBlank(), id + " has a title");
            assertEquals(1, ReportDocument.all(plot, "svg").stream().filter(s -> s.getAttribute("class").equals("chart")).count());
            List<String> titles = axisTitles(plot);
            assertEquals("step", titles.get(0), id);
            assertTrue(titles.get(1).contains(yUnits.get(id)), id + " y axis: " + titles.get(1));
            assertTrue(tickLabels(plot, "x") >= 3, id + " x ticks");
            assertTrue(tickLabels(plot, "y") >= 2, id + " y ticks");
            assertTrue(tickLabels(plot, "epoch") >= 3, id + " epoch ticks");
        }
        Element histogram = doc.plot("cosine-histogram");
        assertEquals(List.of("cos φ (no unit)", "probes (count)"), axisTitles(histogram));
        // Several series get a legend; one series does not need one.
        assertEquals(4, ReportDocument.all(ReportDocument.all(doc.plot("objective"), "ul").get(0), "li").size());
        assertTrue(ReportDocument.all(doc.plot("gradient-norm"), "ul").isEmpty());
        // One panel per stopping test, in the order of their first event, with the test's statistic on the y axis.
        List<Element> tests = ReportDocument.all(doc.section("stopping"), "div").stream()
                .filter(d -> d.getAttribute("class").equals("test")).toList();
        assertEquals(List.of("pflug", "held-out-worsening"), tests.stream().map(d -> d.getAttribute("data-test")).toList());
        assertEquals("S (squared gradient units)", axisTitles(doc.plot("stopping-1")).get(1));
        // The verdict with its figures, sorted by name.
        Element verdict = doc.find("div", "class", "verdict");
        assertEquals("STILL_DESCENDING", verdict.getAttribute("data-condition"));
        List<String> names = ReportDocument.all(verdict, "dt").stream().map(Element::getTextContent).toList();
        assertEquals(List.of("gradientNorm", "noiseScale", "recentDecreaseError", "steps"), names);
        assertEquals("0.001", ReportDocument.texts(verdict, "dd").get(0));
        assertEquals("NaN", doc.find("div", "data-figure", "recentDecreaseError").getElementsByTagName("dd").item(0)
                .getAttributes().getNamedItem("data-value").getNodeValue());
    }

    @Test
    void theReportReferencesNothingOutsideItself() {
        String html = HtmlReport.of(ReportFixtures.run()).withFacts(RunFacts.none().with("loss", "squared")).render();
        ReportDocument.parse(html); // well-formed
        assertTrue(html.startsWith("<!DOCTYPE html>\n<html lang=\"en\">"));
        for (String outside : List.of("http", "<link", "src=", "href=", "url(", "@import", "<script", "<img",
                "<iframe", "<object", "@font-face", "xmlns")) {
            assertFalse(html.contains(outside), "the report contains " + outside);
        }
    }

    @Test
    void eachPlotHoldsExactlyTheFiniteRecordedValues() {
        List<DiagnosticEvent> events = ReportFixtures.run();
        ReportDocument doc = ReportDocument.parse(HtmlReport.of(events).render());
        record Check(String plot, String series, List<double[]> expected) {
        }
        List<Check> checks = List.of(
                new Check("objective", "batch loss", finite(events, LossEvent.class, LossEvent::batchLoss)),
                new Check("objective", "smoothed batch loss", finite(events, LossEvent.class, LossEvent::smoothedBatchLoss)),
                new Check("objective", "objective L(h)", finite(events, LossEvent.class, LossEvent::objective)),
                new Check("objective", "held-out loss", finite(events, LossEvent.class, LossEvent::heldOutLoss)),
                new Check("gradient-norm", "‖∇L(h)‖", finite(events, LossEvent.class, LossEvent::gradientNorm)),
                new Check("step-size", "step size ε", finite(events, LossEvent.class, LossEvent::stepSize)),
                new Check("batch-size", "batch size B", finite(events, LossEvent.class, LossEvent::batchSize)),
                new Check("noise-variance", "tr Σ estimate", finite(events, NoiseEvent.class, NoiseEvent::traceCovariance)),
                new Check("noise-variance", "variance of the batch mean E‖g_B − G‖²",
                        finite(events, NoiseEvent.class, NoiseEvent::batchMeanVariance)),
                new Check("noise-variance", "‖G‖² estimate", finite(events, NoiseEvent.class, NoiseEvent::gradientNormSquared)),
                new Check("noise-scale", "noise scale B_simple = tr Σ/‖G‖²", finite(events, NoiseEvent.class, NoiseEvent::noiseScale)),
                new Check("noise-scale", "batch size B", finite(events, NoiseEvent.class, NoiseEvent::batchSize)),
                new Check("noise-scale", "suggested batch size", finite(events, NoiseEvent.class, NoiseEvent::suggestedBatchSize)),
                new Check("cosine", "cos φ at a probe", finite(events, AngleEvent.class, AngleEvent::cosine)),
                new Check("cosine", "running mean of cos φ", finite(events, AngleEvent.class, AngleEvent::meanCosine)),
                new Check("descent-share", "share with cos φ > 0", finite(events, AngleEvent.class, AngleEvent::descentShare)));
        for (Check c : checks) {
            assertTrue(c.expected().size() >= 3, c.series());
            assertRows(c.expected(), doc.rows(c.plot(), c.series()), c.plot() + "/" + c.series());
            Element group = doc.seriesGroup(c.plot(), c.series());
            assertEquals(c.expected().size(), Integer.parseInt(group.getAttribute("data-count")), c.series());
            int drawn = ReportDocument.all(group, "polyline").isEmpty() ? ReportDocument.all(group, "circle").size()
                    : doc.polylinePoints(c.plot(), c.series());
            assertEquals(c.expected().size(), drawn, c.series() + ": vertices drawn");
        }
        // The NaN noise scale at step 0 is skipped, not drawn as 0.
        assertEquals(50.0, doc.rows("noise-scale", "noise scale B_simple = tr Σ/‖G‖²").get(0)[0]);

        // Histogram: 20 bins of width 0.1 over [-1, 1], the last one closed (HtmlReport's documented rule),
        // counted here by comparing with the edges rather than by the report's bin formula.
        List<double[]> bins = doc.rows("cosine-histogram", "probes");
        assertEquals(HtmlReport.COSINE_BINS, bins.size());
        double total = 0;
        for (int b = 0; b < bins.size(); b++) {
            double lo = -1 + 0.1 * b;
            double hi = lo + 0.1;
            assertEquals(lo, bins.get(b)[0], 1e-12);
            assertEquals(hi, bins.get(b)[1], 1e-12);
            long count = 0;
            for (double[] c : finite(events, AngleEvent.class, AngleEvent::cosine)) {
                boolean last = b == bins.size() - 1;
                if (c[1] >= bins.get(b)[0] && (c[1] < bins.get(b)[1] || last && c[1] <= 1)) {
                    count++;
                }
            }
            assertEquals(count, bins.get(b)[2], "bin " + b);
            total += bins.get(b)[2];
        }
        assertEquals(finite(events, AngleEvent.class, AngleEvent::cosine).size(), total, 0.0);
        assertTrue(bins.get(0)[2] >= 1, "cos φ = -1 falls in the first bin");
        assertTrue(bins.get(bins.size() - 1)[2] >= 1, "cos φ = 1 falls in the last bin");
    }

    @Test
    void stoppingPanelsHoldStatisticFiniteThresholdAndActions() {
        List<DiagnosticEvent> events = ReportFixtures.run();
        ReportDocument doc = ReportDocument.parse(HtmlReport.of(events).render());
        List<DiagnosticEvent> heldOut = events.stream()
                .filter(e -> e instanceof StoppingEvent s && s.test().equals("held-out-worsening")).toList();
        assertRows(finite(heldOut, StoppingEvent.class, StoppingEvent::statistic), doc.rows("stopping-2", "statistic"), "stat");
        List<double[]> thresholds = doc.rows("stopping-2", "threshold");
        assertEquals(heldOut.size() - 1, thresholds.size(), "the infinite threshold before the first measurement is skipped");
        assertEquals(200.0, thresholds.get(0)[0]);
        assertEquals(List.of(1000.0), doc.rows("stopping-2", "STOP_AND_RESTORE").stream().map(r -> r[0]).toList());
        assertEquals(List.of(500.0), doc.rows("stopping-1", "CUT_STEP").stream().map(r -> r[0]).toList());
        assertEquals(1, ReportDocument.all(doc.seriesGroup("stopping-1", "CUT_STEP"), "line").size());
        assertNull(doc.seriesGroup("stopping-1", "STOP"), "no STOP decision, no STOP series");
        Element pflug = doc.find("div", "data-test", "pflug");
        List<String> actions = actions(pflug);
        assertEquals(1, actions.size());
        assertEquals("step 500 (epoch 5): CUT_STEP — sum at step 500", actions.get(0));
    }

    @Test
    void theSameEventsGiveTheSameBytesWhateverTheFiguresMapOrder() {
        List<DiagnosticEvent> events = new ArrayList<>(ReportFixtures.run());
        Map<String, Double> forward = new LinkedHashMap<>();
        Map<String, Double> backward = new LinkedHashMap<>();
        String[] names = {"a", "zeta", "middle", "Upper", "b2", "b10"};
        for (int i = 0; i < names.length; i++) {
            forward.put(names[i], (double) i);
            backward.put(names[names.length - 1 - i], (double) (names.length - 1 - i));
        }
        HtmlReport one = HtmlReport.of(events).withVerdict(new HealthVerdict(Condition.CONVERGED, "s", "a", forward));
        HtmlReport two = HtmlReport.of(List.copyOf(events)).withVerdict(new HealthVerdict(Condition.CONVERGED, "s", "a",
                new HashMap<>(backward)));
        String first = one.render();
        assertEquals(first, one.render());
        assertEquals(first, two.render());
        events.set(3, new LossEvent(30, 0, 9.0, Double.NaN, Double.NaN, Double.NaN, Double.NaN, 0.1, 16));
        assertFalse(first.equals(HtmlReport.of(events).withVerdict(
                new HealthVerdict(Condition.CONVERGED, "s", "a", forward)).render()), "a changed value changes the report");
    }

    @Test
    void hostileTextIsEscapedAndReadsBackUnchanged() {
        String hostile = ReportFixtures.HOSTILE;
        List<DiagnosticEvent> events = new ArrayList<>(ReportFixtures.run());
        events.add(new StoppingEvent(1000, 10, hostile, 1, 2, Decision.STOP, hostile));
        Map<String, Double> figures = Map.of(hostile, 1.0);
        String html = HtmlReport.of(events).withTitle(hostile).withFacts(RunFacts.none().with(hostile, hostile))
                .withVerdict(new HealthVerdict(Condition.DIVERGED, hostile, hostile, figures)).render();
        assertFalse(html.contains("<script"), "no script element");
        assertFalse(html.contains("<b>"), "no markup from the text");
        ReportDocument doc = ReportDocument.parse(html);
        assertEquals(hostile, doc.all("title").get(0).getTextContent());
        assertEquals(hostile, doc.all("h1").get(0).getTextContent());
        Element verdict = doc.find("div", "class", "verdict");
        assertEquals(hostile, doc.find("p", "class", "summary").getTextContent());
        assertEquals(hostile, ReportDocument.texts(verdict, "span").get(0));
        assertEquals(hostile, doc.find("div", "data-figure", hostile).getElementsByTagName("dt").item(0).getTextContent());
        assertNotNull(doc.find("div", "data-test", hostile), "the test name survives as an attribute");
        assertTrue(actions(doc.find("div", "data-test", hostile)).get(0).endsWith(hostile));
        assertTrue(ReportDocument.texts(doc.section("run"), "th").contains(hostile));
        assertTrue(ReportDocument.texts(doc.section("run"), "td").contains(hostile));

        // Characters XML cannot carry become U+FFFD and the document still parses.
        String broken = "a\u0000b\u0001c\u001bd\uD800e\uDC00f\uFFFEg\r\n😀";
        String page = HtmlReport.of(List.of()).withTitle(broken).render();
        assertEquals("a\uFFFDb\uFFFDc\uFFFDd\uFFFDe\uFFFDf\uFFFDg\uFFFD\n😀",
                ReportDocument.parse(page).all("h1").get(0).getTextContent());
    }

    @Test
    void missingDataShowNotMeasuredNotesInsteadOfEmptyPlots() {
        ReportDocument empty = ReportDocument.parse(HtmlReport.of(List.of()).render());
        List<Element> figures = empty.all("figure");
        assertEquals(STEP_PLOTS.size() + 1, figures.size(), "every plot is still there, with its note");
        for (Element f : figures) {
            assertTrue(ReportDocument.all(f, "svg").isEmpty(), f.getAttribute("data-plot") + " draws nothing");
            assertTrue(ReportDocument.texts(f, "p").get(0).startsWith("Not measured in this run: "),
                    f.getAttribute("data-plot"));
        }
        assertTrue(ReportDocument.texts(empty.section("verdict"), "p").get(0).startsWith("Not measured in this run"));
        assertTrue(ReportDocument.texts(empty.section("stopping"), "p").get(1).startsWith("Not measured in this run"));

        // Loss events without an objective, held-out loss or gradient norm: those series are marked missing.
        List<DiagnosticEvent> losses = new ArrayList<>();
        for (int t = 0; t < 50; t++) {
            losses.add(new LossEvent(t, 0, 1.0 / (t + 1), 1.0 / (t + 1), Double.NaN, Double.NaN, Double.NaN, 0.1, 8));
        }
        ReportDocument doc = ReportDocument.parse(HtmlReport.of(losses).render());
        List<String> missing = ReportDocument.all(doc.plot("objective"), "li").stream()
                .filter(li -> li.getAttribute("class").equals("missing")).map(Element::getTextContent).toList();
        assertEquals(List.of("objective L(h) — not measured in this run", "held-out loss — not measured in this run"),
                missing);
        assertTrue(ReportDocument.all(doc.plot("gradient-norm"), "svg").isEmpty());
        assertTrue(ReportDocument.texts(doc.plot("gradient-norm"), "p").get(0).contains("no full gradient was computed"));
        assertEquals(1, ReportDocument.all(doc.plot("step-size"), "svg").size());
    }

    @Test
    void longSeriesAreThinnedEvenlyWithinThePlotBudget() {
        int n = 10_000;
        List<DiagnosticEvent> events = new ArrayList<>();
        for (int t = 0; t < n; t++) {
            events.add(new LossEvent(t, t / 1000, 1 + (t % 7), 2 + t * 1e-4, t % 100 == 0 ? 3.0 : Double.NaN,
                    Double.NaN, Double.NaN, 0.1, 8));
        }
        String html = HtmlReport.of(events).render();
        ReportDocument doc = ReportDocument.parse(html);
        // Sizes 10,000, 10,000, 100 and 0 share 2,000 points: the short ones keep all (100), the long ones
        // split the remaining 1,900 (the water-filling rule documented in Chart).
        assertEquals(100, doc.rows("objective", "objective L(h)").size());
        List<double[]> batch = doc.rows("objective", "batch loss");
        assertEquals(950, batch.size());
        assertEquals(950, doc.rows("objective", "smoothed batch loss").size());
        for (int k = 0; k < batch.size(); k++) {
            long index = ((long) k * (n - 1) + 949 / 2) / 949; // ⌊(k(N − 1) + ⌊(M − 1)/2⌋)/(M − 1)⌋
            assertEquals((double) index, batch.get(k)[0], "kept step " + k);
            assertEquals(1 + (index % 7), batch.get(k)[1]);
        }
        assertEquals(0.0, batch.get(0)[0]);
        assertEquals(n - 1.0, batch.get(batch.size() - 1)[0], "the last point is kept");
        assertEquals(950, doc.polylinePoints("objective", "batch loss"));
        assertTrue(ReportDocument.texts(doc.plot("objective"), "p").stream()
                .anyMatch(p -> p.contains("batch loss: 950 of 10000 values drawn")), "the figure says it thinned");
        for (Element f : doc.all("figure")) {
            int rows = ReportDocument.all(f, "tr").size() - 1;
            assertTrue(rows <= HtmlReport.MAX_POINTS_PER_PLOT, f.getAttribute("data-plot") + ": " + rows);
        }
        assertTrue(html.length() < 1_000_000, "size " + html.length());
    }

    @Test
    void logScaleOnlyWhenPositiveValuesSpanDecades() {
        ReportDocument doc = ReportDocument.parse(HtmlReport.of(ReportFixtures.run()).render());
        assertEquals("log", svg(doc, "gradient-norm").getAttribute("data-y-scale")); // 1 down to 1e-3
        assertEquals("linear", svg(doc, "step-size").getAttribute("data-y-scale"));  // 0.1 and 0.05
        assertEquals("linear", svg(doc, "stopping-1").getAttribute("data-y-scale")); // S crosses 0
        assertTrue(ReportDocument.texts(doc.plot("gradient-norm"), "text").containsAll(List.of("0.001", "0.01", "0.1", "1")));
    }

    static Element svg(ReportDocument doc, String plot) {
        return ReportDocument.all(doc.plot(plot), "svg").get(0);
    }

    @Test
    void aTraceReadBackRendersLikeTheEventsItHolds() throws IOException {
        List<DiagnosticEvent> events = ReportFixtures.run();
        StringWriter csv = new StringWriter();
        StringWriter json = new StringWriter();
        try (CsvTraceWriter c = CsvTraceWriter.to(csv); JsonLinesTraceWriter j = JsonLinesTraceWriter.to(json)) {
            events.forEach(c::onEvent);
            events.stream().filter(e -> !(e instanceof StoppingEvent s && Double.isInfinite(s.threshold())))
                    .forEach(j::onEvent); // JSON has no infinity
        }
        String expected = HtmlReport.of(events).render();
        assertEquals(expected, HtmlReport.of(TraceReader.csv(new StringReader(csv.toString()))).render());
        List<DiagnosticEvent> fromJson = TraceReader.jsonLines(new StringReader(json.toString()));
        assertEquals(HtmlReport.of(events.stream()
                        .filter(e -> !(e instanceof StoppingEvent s && Double.isInfinite(s.threshold()))).toList()).render(),
                HtmlReport.of(fromJson).render());
    }

    @Test
    void aRecorderReportShowsWhatArrivedAndWhatWasKept() {
        TraceRecorder recorder = TraceRecorder.bounded(16);
        List<DiagnosticEvent> events = ReportFixtures.run();
        events.forEach(recorder::onEvent);
        ReportDocument doc = ReportDocument.parse(HtmlReport.of(recorder).render());
        Element loss = doc.find("tr", "data-kind", "loss");
        List<String> cells = ReportDocument.texts(loss, "td");
        long arrived = events.stream().filter(e -> e instanceof LossEvent).count();
        assertEquals(List.of(Integer.toString(recorder.losses().size()), Long.toString(arrived), "1 in 8"), cells);
        // The verdict is the recorder's latest, with its step.
        VerdictEvent v = recorder.latestVerdict().orElseThrow();
        assertEquals(v.verdict().condition().name(), doc.find("div", "class", "verdict").getAttribute("data-condition"));
        assertEquals("at step 1000 (epoch 10)", doc.find("p", "class", "when").getTextContent());
    }

    @Test
    void nullEventsAndOptionsAreRefusedNamingThem() {
        List<DiagnosticEvent> withNull = new ArrayList<>(ReportFixtures.run().subList(0, 2));
        withNull.add(null);
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> HtmlReport.of(withNull));
        assertEquals("events[2] is null", e.getMessage());
        NullPointerException title = assertThrows(NullPointerException.class, () -> HtmlReport.of(List.of()).withTitle(null));
        assertEquals("title must not be null", title.getMessage());
        assertThrows(NullPointerException.class, () -> HtmlReport.of((TraceRecorder) null));
    }
}
