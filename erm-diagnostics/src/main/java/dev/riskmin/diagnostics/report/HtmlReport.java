package dev.riskmin.diagnostics.report;

import dev.riskmin.diagnostics.AngleEvent;
import dev.riskmin.diagnostics.Decision;
import dev.riskmin.diagnostics.DiagnosticEvent;
import dev.riskmin.diagnostics.EventKind;
import dev.riskmin.diagnostics.LossEvent;
import dev.riskmin.diagnostics.NoiseEvent;
import dev.riskmin.diagnostics.StoppingEvent;
import dev.riskmin.diagnostics.VerdictEvent;
import dev.riskmin.diagnostics.report.Chart.Style;
import dev.riskmin.diagnostics.sink.TraceRecorder;
import dev.riskmin.diagnostics.verdict.HealthVerdict;
import dev.riskmin.util.Arguments;

import java.io.IOException;
import java.io.Writer;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.TreeMap;
import java.util.function.ToDoubleFunction;

/**
 * A report of one fit as a single self-contained HTML file: inline CSS and inline SVG plots drawn by
 * this class, no script, no font, image or style sheet fetched from anywhere, so it opens offline in
 * any browser. It is built from the events of a {@link TraceRecorder} or from a list of events (for
 * instance a CSV or JSON-lines trace read back with {@code TraceReader}), with an optional title,
 * {@link RunFacts} and {@link HealthVerdict}.
 *
 * <h2>Contents</h2>
 * <ol>
 * <li>The run: its facts and how many events of each kind were recorded (and, from a bounded
 * recorder, how many arrived and which stride it kept).</li>
 * <li>The verdict: condition, summary, advice and its figures (the given verdict, else the latest
 * verdict event).</li>
 * <li>Objective: the batch loss, its exponential moving average, the exact objective L(h) and the
 * held-out loss (loss units); the full-gradient norm ‖∇L(h)‖ (gradient units: loss units per
 * parameter unit).</li>
 * <li>Schedule: the step size ε and the batch size B (samples), from the loss events.</li>
 * <li>Gradient noise: the estimates of tr Σ, of the variance of the batch mean E‖g<sub>B</sub> − G‖²
 * and of ‖G‖² (squared gradient units); the noise scale B<sub>simple</sub> = tr Σ/‖G‖² against the
 * batch size and the batch size it suggests (samples; McCandlish, Kaplan, Amodei et al.,
 * arXiv:1812.06162, 2018).</li>
 * <li>Descent angle: cos φ = ⟨g<sub>B</sub>, G⟩/(‖g<sub>B</sub>‖ ‖G‖) at each probe with its running mean,
 * the histogram of the recorded cos φ (20 equal bins over [−1, 1], the last one closed), the share
 * of probes with cos φ &gt; 0, and in certified mode the angle to the optimum (degrees) and
 * L(h) − L* (loss units).</li>
 * <li>Stopping tests: one panel per test (in the order of their first event) with the statistic and
 * the threshold at each evaluation and a vertical line at each evaluation that acted (any decision
 * but CONTINUE), and the list of those actions.</li>
 * </ol>
 *
 * <h2>Plots</h2>
 * The x axis is the step t, over the same range in every plot of the run (the first to the last
 * recorded step), with epoch ticks along the top at the first recorded step of each epoch. A y axis
 * is logarithmic when every plotted value is positive and the largest is at least 30 times the
 * smallest (about 1.5 decades), else linear; cos φ and shares have fixed axes. NaN values (not measured at
 * that step) and infinities are skipped. A plot with nothing to draw says "Not measured in this run"
 * and why; an empty series among others is marked so in the legend. Each plot holds at most
 * {@value #MAX_POINTS_PER_PLOT} points, shared among its series (short series keep all their points,
 * long ones are thinned evenly, first and last kept; the figure says when it thinned), and below it a
 * collapsed table of exactly the values drawn, written so that each parses back to the same double.
 *
 * <h2>Markup</h2>
 * The file is well-formed XML as well as HTML (polyglot markup with {@code <!DOCTYPE html>}), so both
 * a browser and an XML parser read it. All outside text (titles, facts, test names, details, the
 * verdict) is escaped; characters XML cannot carry become U+FFFD. The output is deterministic: the
 * same events, facts, title and verdict give the same bytes (no dates, no hash order; the verdict's
 * figures are sorted by name).
 *
 * <p>Immutable; the {@code with…} methods return new reports. Null is never a valid argument.
 */
public final class HtmlReport {
    /** The most points one plot draws. */
    public static final int MAX_POINTS_PER_PLOT = Chart.POINT_BUDGET;
    /** The number of histogram bins of cos φ over [−1, 1]. */
    public static final int COSINE_BINS = 20;
    /** The most actions of one stopping test listed in words (all are in its plot and table). */
    public static final int LISTED_ACTIONS = 20;

    private static final String BLUE = "#0072B2";
    private static final String VERMILLION = "#D55E00";
    private static final String GREEN = "#009E73";
    private static final String PURPLE = "#CC79A7";
    private static final String ORANGE = "#E69F00";
    private static final String SKY = "#56B4E9";
    private static final String GREY = "#555555";
    private static final Map<Decision, String> DECISION_COLORS = Map.of(
            Decision.CONTINUE, GREY, Decision.STOP, "#C0392B", Decision.STOP_AND_RESTORE, PURPLE,
            Decision.CUT_STEP, ORANGE, Decision.GROW_BATCH, GREEN);
    /** Y-axis titles of the library's own stopping tests, by name. */
    private static final Map<String, String> TEST_AXES = Map.of(
            "pflug", "S (squared gradient units)",
            "gradient-norm", "‖∇L(h)‖ (gradient units)",
            "stalled-objective", "relative improvement r",
            "held-out-worsening", "held-out loss (loss units)",
            "norm-test", "statistic (squared gradient units)",
            "fluctuation-dissipation", "|z̄| + h and δ v̄ (loss units)");
    /** What the statistic and threshold of the library's own stopping tests are, by name. */
    private static final Map<String, String> TEST_FORMS = Map.of(
            "pflug", "S = Σ⟨g_k, g_k−1⟩ since the phase start, against 0",
            "gradient-norm", "‖∇L(h)‖ against its tolerance",
            "stalled-objective", "relative improvement of the best objective over the window, against τ",
            "held-out-worsening", "held-out loss against the best so far",
            "norm-test", "‖Var g_i‖₁/B against θ²‖g_B‖²",
            "fluctuation-dissipation", "|z̄| + h against the band δ v̄");

    private final List<DiagnosticEvent> events;
    private final long[] arrived;   // per kind; null when the source was a list
    private final long[] strides;
    private final VerdictEvent latestVerdict;
    private final String title;
    private final RunFacts facts;
    private final HealthVerdict verdict;

    private HtmlReport(List<DiagnosticEvent> events, long[] arrived, long[] strides, VerdictEvent latestVerdict,
                       String title, RunFacts facts, HealthVerdict verdict) {
        this.events = events;
        this.arrived = arrived;
        this.strides = strides;
        this.latestVerdict = latestVerdict;
        this.title = title;
        this.facts = facts;
        this.verdict = verdict;
    }

    /**
     * A report of the events the recorder holds now (a snapshot), with its counts of arrived events
     * and its thinning strides, and its latest verdict.
     */
    public static HtmlReport of(TraceRecorder recorder) {
        Arguments.notNull("recorder", recorder);
        int kinds = EventKind.values().length;
        long[] arrived = new long[kinds];
        long[] strides = new long[kinds];
        for (EventKind k : EventKind.values()) {
            arrived[k.ordinal()] = recorder.arrived(k);
            strides[k.ordinal()] = recorder.stride(k);
        }
        return new HtmlReport(List.copyOf(recorder.events()), arrived, strides,
                recorder.latestVerdict().orElse(null), "Fit diagnostics", RunFacts.none(), null);
    }

    /**
     * A report of the given events (in the order given; plots expect each kind's steps to increase).
     *
     * @throws IllegalArgumentException if the list or one of its events is null, naming its index
     */
    public static HtmlReport of(List<? extends DiagnosticEvent> events) {
        Arguments.notNull("events", events);
        List<DiagnosticEvent> copy = new ArrayList<>(events.size());
        VerdictEvent latest = null;
        for (int i = 0; i < events.size(); i++) {
            DiagnosticEvent e = events.get(i);
            if (e == null) {
                throw new IllegalArgumentException("events[" + i + "] is null");
            }
            if (e instanceof VerdictEvent v) {
                latest = v;
            }
            copy.add(e);
        }
        return new HtmlReport(List.copyOf(copy), null, null, latest, "Fit diagnostics", RunFacts.none(), null);
    }

    /** @return this report with the given title (default "Fit diagnostics") */
    public HtmlReport withTitle(String value) {
        return new HtmlReport(events, arrived, strides, latestVerdict, Arguments.notNull("title", value), facts,
                verdict);
    }

    /** @return this report with the given facts of the run */
    public HtmlReport withFacts(RunFacts value) {
        return new HtmlReport(events, arrived, strides, latestVerdict, title, Arguments.notNull("facts", value),
                verdict);
    }

    /** @return this report showing the given verdict instead of the latest verdict event */
    public HtmlReport withVerdict(HealthVerdict value) {
        return new HtmlReport(events, arrived, strides, latestVerdict, title, facts,
                Arguments.notNull("verdict", value));
    }

    /** Writes the report to a file in UTF-8 (replacing it). */
    public void write(Path file) throws IOException {
        Files.writeString(Arguments.notNull("file", file), render(), StandardCharsets.UTF_8);
    }

    /** Writes the report to the writer (not closed). */
    public void write(Writer out) throws IOException {
        Arguments.notNull("out", out).write(render());
        out.flush();
    }

    /** @return the whole HTML document */
    public String render() {
        Markup out = new Markup(1 << 16);
        out.raw("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\"/>\n<title>").text(title)
                .raw("</title>\n<style>\n").raw(Css.STYLE).raw("</style>\n</head>\n<body>\n");
        out.raw("<header><h1>").text(title).raw("</h1>\n<p class=\"lead\">Diagnostics of one fit: what the monitors"
                + " measured over the run, what the stopping tests decided, and the verdict on the run.</p></header>\n");

        List<LossEvent> losses = new ArrayList<>();
        List<NoiseEvent> noise = new ArrayList<>();
        List<AngleEvent> angles = new ArrayList<>();
        Map<String, List<StoppingEvent>> tests = new LinkedHashMap<>();
        long minStep = Long.MAX_VALUE;
        long maxStep = Long.MIN_VALUE;
        TreeMap<Integer, Long> epochStart = new TreeMap<>();
        for (DiagnosticEvent e : events) {
            minStep = Math.min(minStep, e.step());
            maxStep = Math.max(maxStep, e.step());
            epochStart.merge(e.epoch(), e.step(), Math::min);
            if (e instanceof LossEvent l) {
                losses.add(l);
            } else if (e instanceof NoiseEvent n) {
                noise.add(n);
            } else if (e instanceof AngleEvent a) {
                angles.add(a);
            } else if (e instanceof StoppingEvent s) {
                tests.computeIfAbsent(testName(s), k -> new ArrayList<>()).add(s);
            }
        }
        if (minStep > maxStep) {
            minStep = 0;
            maxStep = 1;
        }
        Steps steps = new Steps(minStep, maxStep, epochStart);

        runSection(out);
        verdictSection(out);

        section(out, "objective", "Objective",
                "The batch loss is noisy by nature; its moving average shows the trend. The exact objective"
                        + " L(h) and the held-out loss are measured at the loss monitor's cadence.");
        chart(out, steps, new Chart("objective", "Objective over the run").axes("step", "objective (loss units)")
                .whenEmpty("no loss events were recorded (add a LossMonitor)")
                .series("batch loss", SKY, Style.FAINT, x(losses), y(losses, LossEvent::batchLoss))
                .series("smoothed batch loss", BLUE, Style.LINE, x(losses), y(losses, LossEvent::smoothedBatchLoss))
                .series("objective L(h)", VERMILLION, Style.POINTS_LINE, x(losses), y(losses, LossEvent::objective))
                .series("held-out loss", GREEN, Style.POINTS_LINE, x(losses), y(losses, LossEvent::heldOutLoss)));
        chart(out, steps, new Chart("gradient-norm", "Full-gradient norm").axes("step", "‖∇L(h)‖ (gradient units)")
                .whenEmpty("no full gradient was computed (the loss monitor measures it with the exact objective"
                        + " when n is at most the host's full-gradient limit; set its objective cadence)")
                .series("‖∇L(h)‖", BLUE, Style.POINTS_LINE, x(losses), y(losses, LossEvent::gradientNorm)));
        out.raw("</div></section>\n");

        section(out, "schedule", "Step size and batch size",
                "The step size ε and the batch size B in force at each loss event: schedules, and the cuts and"
                        + " batch increases the stopping tests asked for, show here.");
        chart(out, steps, new Chart("step-size", "Step size").axes("step", "step size ε")
                .whenEmpty("no loss events were recorded (add a LossMonitor)")
                .series("step size ε", BLUE, Style.LINE, x(losses), y(losses, LossEvent::stepSize)));
        chart(out, steps, new Chart("batch-size", "Batch size").axes("step", "batch size B (samples)")
                .whenEmpty("no loss events were recorded (add a LossMonitor)")
                .series("batch size B", ORANGE, Style.LINE, x(losses), y(losses, l -> l.batchSize())));
        out.raw("</div></section>\n");

        section(out, "noise", "Gradient noise",
                "tr Σ is the variance of one sample's gradient, E‖g_B − G‖² that of the batch mean. When the"
                        + " noise scale B_simple = tr Σ/‖G‖² lies far above the batch size, the batch gradient is"
                        + " mostly noise; a batch near the noise scale makes the steps useful again (McCandlish,"
                        + " Kaplan, Amodei et al., 2018).");
        chart(out, steps, new Chart("noise-variance", "Gradient-noise variance")
                .axes("step", "variance (squared gradient units)")
                .whenEmpty("no noise events were recorded (add a NoiseMonitor)")
                .series("tr Σ estimate", VERMILLION, Style.POINTS_LINE, x(noise), y(noise, NoiseEvent::traceCovariance))
                .series("variance of the batch mean E‖g_B − G‖²", BLUE, Style.POINTS_LINE, x(noise),
                        y(noise, NoiseEvent::batchMeanVariance))
                .series("‖G‖² estimate", GREEN, Style.DASHED, x(noise), y(noise, NoiseEvent::gradientNormSquared)));
        chart(out, steps, new Chart("noise-scale", "Noise scale and batch size").axes("step", "batch size (samples)")
                .whenEmpty("no noise events were recorded (add a NoiseMonitor)")
                .series("noise scale B_simple = tr Σ/‖G‖²", PURPLE, Style.POINTS_LINE, x(noise),
                        y(noise, NoiseEvent::noiseScale))
                .series("batch size B", ORANGE, Style.LINE, x(noise), y(noise, n -> n.batchSize()))
                .series("suggested batch size", GREY, Style.DASHED, x(noise), y(noise, n -> n.suggestedBatchSize())));
        out.raw("</div></section>\n");

        angleSection(out, steps, angles);
        stoppingSection(out, steps, tests);

        out.raw("<footer><p>How the plots are drawn: the x axis is the step, over the same range in every plot;"
                + " ticks along the top mark the first recorded step of each epoch. A y axis is logarithmic when all"
                + " its values are positive and the largest is at least 30 times the smallest. Values not measured at a step (NaN) are"
                + " skipped. A plot draws at most ").raw(Integer.toString(MAX_POINTS_PER_PLOT))
                .raw(" points (long series thinned evenly); the table under each plot lists exactly the values"
                        + " drawn.</p></footer>\n</body>\n</html>\n");
        return out.toString();
    }

    private void runSection(Markup out) {
        out.raw("<section id=\"run\"><h2>Run</h2>\n<div class=\"run\">");
        if (facts.entries().isEmpty()) {
            out.raw("<p class=\"empty\">No facts of the run were given.</p>");
        } else {
            out.raw("<table class=\"facts\"><tbody>\n");
            for (Map.Entry<String, String> f : facts.entries()) {
                out.raw("<tr><th>").text(f.getKey()).raw("</th><td>").text(f.getValue()).raw("</td></tr>\n");
            }
            out.raw("</tbody></table>\n");
        }
        out.raw("<table class=\"counts\"><thead><tr><th>events</th><th>in this report</th>");
        if (arrived != null) {
            out.raw("<th>arrived</th><th>kept</th>");
        }
        out.raw("</tr></thead><tbody>\n");
        long[] kept = new long[EventKind.values().length];
        for (DiagnosticEvent e : events) {
            kept[e.kind().ordinal()]++;
        }
        for (EventKind k : EventKind.values()) {
            out.raw("<tr").attr("data-kind", k.name().toLowerCase(Locale.ROOT)).raw("><th>")
                    .text(k.name().toLowerCase(Locale.ROOT)).raw("</th><td>").raw(Long.toString(kept[k.ordinal()]))
                    .raw("</td>");
            if (arrived != null) {
                long s = strides[k.ordinal()];
                out.raw("<td>").raw(Long.toString(arrived[k.ordinal()])).raw("</td><td>")
                        .raw(s == 1 ? "all" : "1 in " + s).raw("</td>");
            }
            out.raw("</tr>\n");
        }
        out.raw("</tbody></table></div></section>\n");
    }

    private void verdictSection(Markup out) {
        out.raw("<section id=\"verdict\"><h2>Verdict</h2>\n");
        HealthVerdict v = verdict != null ? verdict : latestVerdict != null ? latestVerdict.verdict() : null;
        if (v == null) {
            out.raw("<p class=\"empty\">Not measured in this run: no verdict was recorded (the diagnostics host"
                    + " publishes one when the fit ends).</p></section>\n");
            return;
        }
        String condition = v.condition() == null ? "(no condition)" : v.condition().name();
        out.raw("<div class=\"verdict\"").attr("data-condition", condition).raw(">\n<p class=\"condition c-")
                .raw(v.condition() == null ? "none" : v.condition().name().toLowerCase(Locale.ROOT)).raw("\">")
                .text(condition).raw("</p>");
        if (verdict == null) {
            out.raw("<p class=\"when\">at step ").raw(Long.toString(latestVerdict.step())).raw(" (epoch ")
                    .raw(Integer.toString(latestVerdict.epoch())).raw(")</p>");
        }
        out.raw("\n<p class=\"summary\">").text(v.summary() == null ? "(no summary)" : v.summary()).raw("</p>\n");
        out.raw("<p class=\"advice\"><strong>Advice:</strong> <span class=\"advice-text\">")
                .text(v.advice() == null ? "(none)" : v.advice()).raw("</span></p>\n");
        Map<String, Double> figures = v.figures() == null ? Map.of() : new TreeMap<>(v.figures());
        if (!figures.isEmpty()) {
            out.raw("<p class=\"figures-title\">Figures behind the verdict</p>\n<dl class=\"figures\">\n");
            for (Map.Entry<String, Double> f : figures.entrySet()) {
                double value = f.getValue() == null ? Double.NaN : f.getValue();
                out.raw("<div").attr("data-figure", f.getKey()).raw("><dt>").text(f.getKey()).raw("</dt><dd")
                        .attr("data-value", Markup.exact(value)).raw(">").text(Markup.readable(value))
                        .raw("</dd></div>\n");
            }
            out.raw("</dl>\n");
        }
        out.raw("</div></section>\n");
    }

    private void angleSection(Markup out, Steps steps, List<AngleEvent> angles) {
        section(out, "angle", "Descent angle",
                "cos φ is the cosine between the batch gradient g_B and the reference gradient G. A stochastic"
                        + " gradient points downhill on average (E⟨g_B, G⟩ = ‖G‖²), a single one need not; a share"
                        + " of descent probes near one half means the steps are mostly noise.");
        String none = "no angle events were recorded (add an AngleMonitor)";
        chart(out, steps, new Chart("cosine", "Descent cosine cos φ").axes("step", "cos φ (no unit)")
                .fixedY(-1, 1, "0.5").whenEmpty(none)
                .series("cos φ at a probe", BLUE, Style.POINTS, x(angles), y(angles, AngleEvent::cosine))
                .series("running mean of cos φ", VERMILLION, Style.LINE, x(angles), y(angles, AngleEvent::meanCosine)));
        double[] from = new double[COSINE_BINS];
        double[] to = new double[COSINE_BINS];
        double[] counts = new double[COSINE_BINS];
        for (int b = 0; b < COSINE_BINS; b++) {
            from[b] = -1 + 2.0 * b / COSINE_BINS;
            to[b] = -1 + 2.0 * (b + 1) / COSINE_BINS;
        }
        for (AngleEvent a : angles) {
            double c = a.cosine();
            if (Double.isFinite(c)) {
                counts[cosineBin(c)]++;
            }
        }
        Chart histogram = new Chart("cosine-histogram", "Distribution of cos φ").axes("cos φ (no unit)",
                "probes (count)").fixedX(-1, 1, "0.5").columns("series", "bin from", "bin to", "probes")
                .verticalLine(0).linearOnly().whenEmpty(none).bars("probes", BLUE, from, to, counts);
        histogram.render(out);
        chart(out, steps, new Chart("descent-share", "Share of descent directions")
                .axes("step", "share with cos φ > 0 (0 to 1)").fixedY(0, 1, "0.25").whenEmpty(none)
                .series("share with cos φ > 0", GREEN, Style.LINE, x(angles), y(angles, AngleEvent::descentShare)));
        double[] angle = y(angles, AngleEvent::angleToOptimum);
        double[] gap = y(angles, AngleEvent::suboptimality);
        if (Arrays.stream(angle).anyMatch(Double::isFinite) || Arrays.stream(gap).anyMatch(Double::isFinite)) {
            chart(out, steps, new Chart("angle-to-optimum", "Angle to the optimum (certified mode)")
                    .axes("step", "angle of −g_B to h* − h (degrees)").linearOnly()
                    .series("angle to the optimum", PURPLE, Style.POINTS_LINE, x(angles), angle));
            chart(out, steps, new Chart("suboptimality", "Suboptimality (certified mode)")
                    .axes("step", "L(h) − L* (loss units)")
                    .series("L(h) − L*", VERMILLION, Style.POINTS_LINE, x(angles), gap));
        }
        out.raw("</div></section>\n");
    }

    /** The bin of cos φ among {@value #COSINE_BINS} equal bins over [−1, 1]; 1 goes to the last, outliers to the ends. */
    static int cosineBin(double c) {
        int b = (int) Math.floor((c + 1) / 2 * COSINE_BINS);
        return Math.max(0, Math.min(COSINE_BINS - 1, b));
    }

    private void stoppingSection(Markup out, Steps steps, Map<String, List<StoppingEvent>> tests) {
        section(out, "stopping", "Stopping tests",
                "Each panel shows a test's statistic and the threshold it was compared with at each evaluation;"
                        + " a vertical line marks each evaluation that acted (cut the step, grew the batch, stopped).");
        if (tests.isEmpty()) {
            out.raw("<p class=\"empty\">Not measured in this run: no stopping test ran (stopping tests are added"
                    + " with Diagnostics.Builder.monitor).</p>\n");
        }
        int index = 0;
        for (Map.Entry<String, List<StoppingEvent>> t : tests.entrySet()) {
            index++;
            List<StoppingEvent> list = t.getValue();
            String axis = TEST_AXES.getOrDefault(t.getKey(), "statistic and threshold (the test's units)");
            String form = TEST_FORMS.get(t.getKey());
            Chart chart = new Chart("stopping-" + index, "Stopping test: " + t.getKey() + (form == null ? ""
                    : " — " + form)).axes("step", axis)
                    .whenEmpty("the test published no finite statistic")
                    .columns("series", "step", "statistic")
                    .series("statistic", BLUE, Style.POINTS_LINE, x(list), y(list, StoppingEvent::statistic))
                    .series("threshold", GREY, Style.DASHED, x(list), y(list, StoppingEvent::threshold));
            List<StoppingEvent> actions = new ArrayList<>();
            for (Decision d : Decision.values()) {
                if (d == Decision.CONTINUE) {
                    continue;
                }
                List<StoppingEvent> acted = list.stream().filter(s -> s.decision() == d).toList();
                if (!acted.isEmpty()) {
                    chart.series(d.name(), DECISION_COLORS.get(d), Style.MARKS, x(acted),
                            y(acted, StoppingEvent::statistic));
                }
            }
            for (StoppingEvent s : list) {
                if (s.decision() != null && s.decision() != Decision.CONTINUE) {
                    actions.add(s);
                }
            }
            out.raw("<div class=\"test\"").attr("data-test", t.getKey()).raw(">\n");
            chart.stepRange(steps.min, steps.max).epochs(steps.epochSteps, steps.epochNumbers).render(out);
            out.raw("<div class=\"actions\"><p><strong>Evaluations:</strong> ").raw(Integer.toString(list.size()))
                    .raw(", acting: ").raw(Integer.toString(actions.size())).raw(".</p>\n");
            if (!actions.isEmpty()) {
                out.raw("<ol class=\"actions\">\n");
                for (int i = 0; i < Math.min(LISTED_ACTIONS, actions.size()); i++) {
                    StoppingEvent s = actions.get(i);
                    out.raw("<li>step ").raw(Long.toString(s.step())).raw(" (epoch ").raw(Integer.toString(s.epoch()))
                            .raw("): <strong>").text(s.decision().name()).raw("</strong> — ")
                            .text(s.detail() == null ? "" : s.detail()).raw("</li>\n");
                }
                out.raw("</ol>\n");
                if (actions.size() > LISTED_ACTIONS) {
                    out.raw("<p class=\"note\">and ").raw(Integer.toString(actions.size() - LISTED_ACTIONS))
                            .raw(" more (all are marked in the plot).</p>\n");
                }
            }
            StoppingEvent last = list.get(list.size() - 1);
            out.raw("<p class=\"latest\"><strong>Latest evaluation</strong> (step ").raw(Long.toString(last.step()))
                    .raw("): ").text(last.detail() == null ? "" : last.detail()).raw("</p></div></div>\n");
        }
        out.raw("</div></section>\n");
    }

    private static String testName(StoppingEvent s) {
        return s.test() == null || s.test().isEmpty() ? "(unnamed test)" : s.test();
    }

    private static void section(Markup out, String id, String heading, String howToRead) {
        out.raw("<section").attr("id", id).raw("><h2>").text(heading).raw("</h2>\n<p class=\"read\">").text(howToRead)
                .raw("</p>\n<div class=\"plots\">\n");
    }

    private static void chart(Markup out, Steps steps, Chart chart) {
        chart.stepRange(steps.min, steps.max).epochs(steps.epochSteps, steps.epochNumbers).render(out);
    }

    private static double[] x(List<? extends DiagnosticEvent> list) {
        double[] x = new double[list.size()];
        for (int i = 0; i < x.length; i++) {
            x[i] = list.get(i).step();
        }
        return x;
    }

    private static <E> double[] y(List<E> list, ToDoubleFunction<E> value) {
        double[] y = new double[list.size()];
        for (int i = 0; i < y.length; i++) {
            y[i] = value.applyAsDouble(list.get(i));
        }
        return y;
    }

    /** The common step range and the epoch ticks (first recorded step of each epoch, increasing). */
    private static final class Steps {
        final double min;
        final double max;
        final long[] epochSteps;
        final int[] epochNumbers;

        Steps(long min, long max, TreeMap<Integer, Long> epochStart) {
            this.min = min;
            this.max = max;
            List<long[]> ticks = new ArrayList<>();
            long last = Long.MIN_VALUE;
            for (Map.Entry<Integer, Long> e : epochStart.entrySet()) {
                if (e.getKey() >= 0 && e.getValue() > last) {
                    ticks.add(new long[] {e.getValue(), e.getKey()});
                    last = e.getValue();
                }
            }
            epochSteps = new long[ticks.size()];
            epochNumbers = new int[ticks.size()];
            for (int i = 0; i < ticks.size(); i++) {
                epochSteps[i] = ticks.get(i)[0];
                epochNumbers[i] = (int) ticks.get(i)[1];
            }
        }
    }
}
