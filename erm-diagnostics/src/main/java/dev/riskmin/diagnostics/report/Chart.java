package dev.riskmin.diagnostics.report;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;

/**
 * One plot of the report: its series, axes and notes, rendered as a {@code <figure>} holding an
 * inline SVG, a legend, and a collapsed table of the plotted numbers (the same numbers the SVG draws,
 * written exactly, so that the plot can be checked and read without the picture).
 *
 * <p>Each series keeps its points whose values are finite (NaN marks "not measured at this step";
 * infinities cannot be drawn); the decision marks of a stopping test keep every point and draw a
 * vertical line at its step. A plot whose series are all empty shows a "not measured in this run"
 * note instead of axes; an empty series among others is listed as such in the legend.
 *
 * <p>Thinning (bounded size): the series of one plot together keep at most
 * {@link #POINT_BUDGET} points. The budget is shared by water-filling: series taken from the
 * shortest up, each keeps min(its length, ⌊remaining budget / series left⌋) points, so short series
 * keep everything. A series of N points keeping M &lt; N keeps the indices
 * ⌊(k (N − 1) + ⌊(M − 1)/2⌋) / (M − 1)⌋ for k = 0, …, M − 1 — evenly spaced, first and last included.
 * The figure says which series were thinned. Histogram bars are not thinned.
 */
final class Chart {
    /** The most points one plot draws (and tabulates). */
    static final int POINT_BUDGET = 2000;

    static final int WIDTH = 640;
    static final int HEIGHT = 320;
    private static final double TOP = 30;
    private static final double BOTTOM = 46;
    private static final double RIGHT = 16;
    private static final double CHAR_WIDTH = 6.6; // 11 px sans-serif digits, measured on the rendered page
    private static final int MAX_MARKERS = 80;
    private static final double TITLE_CHAR_WIDTH = 7.2; // 12 px axis titles, generous

    /** How a series is drawn. */
    enum Style {
        /** A solid line. */
        LINE,
        /** A thin, light line behind the others (raw, noisy values). */
        FAINT,
        /** A dashed line (thresholds, reference values). */
        DASHED,
        /** A line with a marker at each point (sparse measurements). */
        POINTS_LINE,
        /** Markers only (scatter). */
        POINTS,
        /** A vertical line at each point's x (decisions), with a marker at y when y is finite. */
        MARKS,
        /** Bars from x to x2 of height y. */
        BARS
    }

    /** One series: finite points (or all points for marks), in the order given. */
    static final class Series {
        final String name;
        final String color;
        final Style style;
        final double[] x;
        final double[] x2;
        final double[] y;

        Series(String name, String color, Style style, double[] x, double[] x2, double[] y) {
            this.name = name;
            this.color = color;
            this.style = style;
            this.x = x;
            this.x2 = x2;
            this.y = y;
        }

        int size() {
            return x.length;
        }
    }

    private final String id;
    private final String title;
    private final List<Series> series = new ArrayList<>();
    private String xTitle = "step";
    private String yTitle = "";
    private boolean stepAxis = true;
    private double xMin = Double.NaN;
    private double xMax = Double.NaN;
    private String xStep;
    private double yMin = Double.NaN;
    private double yMax = Double.NaN;
    private String yStep;
    private boolean allowLog = true;
    private String emptyNote = "nothing was recorded";
    private long[] epochSteps = new long[0];
    private int[] epochNumbers = new int[0];
    private String[] columns = {"series", "step", "value"};
    private double zeroLine = Double.NaN;

    Chart(String id, String title) {
        this.id = id;
        this.title = title;
    }

    Chart axes(String x, String y) {
        this.xTitle = x;
        this.yTitle = y;
        return this;
    }

    /** The x axis is the step, over this common range of the run. */
    Chart stepRange(double min, double max) {
        this.xMin = min;
        this.xMax = max;
        this.stepAxis = true;
        return this;
    }

    /** The x axis is a fixed range (not steps), with ticks every {@code step}. */
    Chart fixedX(double min, double max, String step) {
        this.xStep = step;
        this.xMin = min;
        this.xMax = max;
        this.stepAxis = false;
        return this;
    }

    /** The y axis is exactly [min, max] with ticks every {@code step} (no log scale). */
    Chart fixedY(double min, double max, String step) {
        this.yMin = min;
        this.yMax = max;
        this.yStep = step;
        return this;
    }

    Chart linearOnly() {
        this.allowLog = false;
        return this;
    }

    /** Why the plot may be empty, completing "Not measured in this run: …". */
    Chart whenEmpty(String note) {
        this.emptyNote = note;
        return this;
    }

    /** Ticks of the epochs along the top: the first recorded step of each epoch. */
    Chart epochs(long[] steps, int[] numbers) {
        this.epochSteps = steps;
        this.epochNumbers = numbers;
        return this;
    }

    Chart columns(String... names) {
        this.columns = names;
        return this;
    }

    /** A light reference line at x = value (e.g. cos φ = 0). */
    Chart verticalLine(double value) {
        this.zeroLine = value;
        return this;
    }

    /** Adds a series; points with a non-finite x or y are skipped (for marks, only a non-finite x). */
    Chart series(String name, String color, Style style, double[] x, double[] y) {
        int n = 0;
        double[] kx = new double[x.length];
        double[] ky = new double[x.length];
        for (int i = 0; i < x.length; i++) {
            if (Double.isFinite(x[i]) && (style == Style.MARKS || Double.isFinite(y[i]))) {
                kx[n] = x[i];
                ky[n] = y[i];
                n++;
            }
        }
        series.add(new Series(name, color, style, Arrays.copyOf(kx, n), null, Arrays.copyOf(ky, n)));
        return this;
    }

    /** Adds histogram bars [from<sub>i</sub>, to<sub>i</sub>) of height count<sub>i</sub>. */
    Chart bars(String name, String color, double[] from, double[] to, double[] count) {
        series.add(new Series(name, color, Style.BARS, from.clone(), to.clone(), count.clone()));
        return this;
    }

    /** @return whether some series has a point */
    boolean hasData() {
        for (Series s : series) {
            if (s.size() > 0 && (s.style != Style.BARS || Arrays.stream(s.y).anyMatch(v -> v > 0))) {
                return true;
            }
        }
        return false;
    }

    /** The indices each series keeps under the shared budget (see the class documentation). */
    static int[] allotments(int[] sizes, int budget) {
        Integer[] order = new Integer[sizes.length];
        for (int i = 0; i < order.length; i++) {
            order[i] = i;
        }
        Arrays.sort(order, (a, b) -> sizes[a] != sizes[b] ? Integer.compare(sizes[a], sizes[b]) : Integer.compare(a, b));
        int[] kept = new int[sizes.length];
        int remaining = budget;
        int left = sizes.length;
        for (int i : order) {
            kept[i] = Math.min(sizes[i], remaining / left);
            remaining -= kept[i];
            left--;
        }
        return kept;
    }

    /** The M evenly spaced indices of N (all of them when M ≥ N). */
    static int[] evenlySpaced(int n, int m) {
        if (m >= n) {
            int[] all = new int[n];
            for (int i = 0; i < n; i++) {
                all[i] = i;
            }
            return all;
        }
        if (m <= 0) {
            return new int[0];
        }
        if (m == 1) {
            return new int[] {0};
        }
        int[] idx = new int[m];
        for (int k = 0; k < m; k++) {
            idx[k] = (int) (((long) k * (n - 1) + (m - 1) / 2) / (m - 1));
        }
        return idx;
    }

    void render(Markup out) {
        out.raw("<figure class=\"plot\"").attr("id", "plot-" + id).attr("data-plot", id).raw(">\n");
        out.raw("<figcaption>").text(title).raw("</figcaption>\n");
        if (!hasData()) {
            out.raw("<p class=\"empty\">Not measured in this run: ").text(emptyNote).raw("</p>\n</figure>\n");
            return;
        }
        // Thin under the shared budget (bars are exempt).
        List<Series> drawn = new ArrayList<>();
        List<String> thinned = new ArrayList<>();
        List<Integer> thinnable = new ArrayList<>();
        for (int i = 0; i < series.size(); i++) {
            if (series.get(i).style != Style.BARS) {
                thinnable.add(i);
            }
        }
        int[] sizes = new int[thinnable.size()];
        for (int j = 0; j < sizes.length; j++) {
            sizes[j] = series.get(thinnable.get(j)).size();
        }
        int[] kept = allotments(sizes, POINT_BUDGET);
        for (int i = 0, j = 0; i < series.size(); i++) {
            Series s = series.get(i);
            if (s.style == Style.BARS) {
                drawn.add(s);
                continue;
            }
            int m = kept[j++];
            if (m < s.size()) {
                int[] idx = evenlySpaced(s.size(), m);
                double[] x = new double[idx.length];
                double[] y = new double[idx.length];
                for (int k = 0; k < idx.length; k++) {
                    x[k] = s.x[idx[k]];
                    y[k] = s.y[idx[k]];
                }
                thinned.add(s.name + ": " + m + " of " + s.size() + " values drawn (evenly spaced, first and last kept)");
                drawn.add(new Series(s.name, s.color, s.style, x, null, y));
            } else {
                drawn.add(s);
            }
        }

        double plotBottom = HEIGHT - BOTTOM;
        Scale y = yScale(drawn, plotBottom, TOP);
        double left = 24 + CHAR_WIDTH * Math.max(3, y.widestLabel()) + 8;
        Scale x = xStep != null ? Scale.fixed(xMin, xMax, xStep, left, WIDTH - RIGHT)
                : Scale.linear(xMin, xMax, left, WIDTH - RIGHT, 6);

        out.raw("<svg class=\"chart\"").attr("width", Integer.toString(WIDTH)).attr("height", Integer.toString(HEIGHT))
                .attr("viewBox", "0 0 " + WIDTH + " " + HEIGHT).attr("role", "img").attr("aria-label", title)
                .attr("data-plot", id).attr("data-x-scale", "linear").attr("data-y-scale", y.isLog() ? "log" : "linear")
                .raw(">\n");
        out.raw("<rect class=\"area\"").attr("x", left).attr("y", TOP).attr("width", WIDTH - RIGHT - left)
                .attr("height", plotBottom - TOP).raw("/>\n");
        // Grid and ticks.
        out.raw("<g class=\"grid\">");
        for (Scale.Tick t : y.ticks()) {
            double py = y.map(t.value());
            out.raw("<line").attr("class", t.major() ? "major" : "minor").attr("x1", left).attr("y1", py)
                    .attr("x2", WIDTH - RIGHT).attr("y2", py).raw("/>");
        }
        for (Scale.Tick t : x.ticks()) {
            double px = x.map(t.value());
            out.raw("<line class=\"major\"").attr("x1", px).attr("y1", TOP).attr("x2", px).attr("y2", plotBottom).raw("/>");
        }
        if (Double.isFinite(zeroLine)) {
            double px = x.map(zeroLine);
            out.raw("<line class=\"zero\"").attr("x1", px).attr("y1", TOP).attr("x2", px).attr("y2", plotBottom).raw("/>");
        }
        out.raw("</g>\n<g class=\"ticks\">");
        for (Scale.Tick t : y.ticks()) {
            if (t.major()) {
                double py = y.map(t.value());
                out.raw("<text class=\"y\"").attr("x", left - 5).attr("y", py + 4).raw(">").text(t.label()).raw("</text>");
            }
        }
        for (Scale.Tick t : x.ticks()) {
            double px = x.map(t.value());
            out.raw("<line class=\"tick\"").attr("x1", px).attr("y1", plotBottom).attr("x2", px)
                    .attr("y2", plotBottom + 4).raw("/>");
            out.raw("<text class=\"x\"").attr("x", px).attr("y", plotBottom + 16).raw(">").text(t.label()).raw("</text>");
        }
        if (stepAxis) {
            epochAxis(out, x, left);
        }
        out.raw("</g>\n");
        out.raw("<text class=\"axis-title\"").attr("x", (left + WIDTH - RIGHT) / 2).attr("y", HEIGHT - 8.0).raw(">")
                .text(xTitle).raw("</text>\n");
        out.raw("<text class=\"axis-title\"").attr("transform", "rotate(-90)").attr("x", -(TOP + plotBottom) / 2)
                .attr("y", 14.0);
        if (yTitle.length() * TITLE_CHAR_WIDTH > plotBottom - TOP) { // squeeze rather than run past the plot
            out.attr("textLength", plotBottom - TOP - 4).attr("lengthAdjust", "spacingAndGlyphs");
        }
        out.raw(">").text(yTitle).raw("</text>\n");
        for (Series s : drawn) {
            drawSeries(out, s, x, y, plotBottom);
        }
        out.raw("</svg>\n");
        legend(out);
        if (!thinned.isEmpty()) {
            out.raw("<p class=\"note\">");
            for (int i = 0; i < thinned.size(); i++) {
                out.raw(i == 0 ? "" : "; ").text(thinned.get(i));
            }
            out.raw(".</p>\n");
        }
        table(out, drawn);
        out.raw("</figure>\n");
    }

    private Scale yScale(List<Series> drawn, double from, double to) {
        if (yStep != null) {
            return Scale.fixed(yMin, yMax, yStep, from, to);
        }
        double min = Double.POSITIVE_INFINITY;
        double max = Double.NEGATIVE_INFINITY;
        boolean bars = false;
        for (Series s : drawn) {
            if (s.style == Style.BARS) {
                bars = true;
                min = Math.min(min, 0);
            }
            for (double v : s.y) {
                if (Double.isFinite(v)) {
                    min = Math.min(min, v);
                    max = Math.max(max, v);
                }
            }
        }
        if (min > max) { // only marks without values
            min = 0;
            max = 1;
        }
        if (bars) {
            max *= 1.05; // headroom, so that the tallest bar does not touch the frame
        }
        return Scale.auto(min, max, allowLog && !bars, from, to, 5);
    }

    private void epochAxis(Markup out, Scale x, double left) {
        if (epochSteps.length < 2) {
            return;
        }
        out.raw("<text class=\"epoch-title\"").attr("x", left - 9).attr("y", TOP - 7).raw(">epoch</text>");
        double lastLabel = Double.NEGATIVE_INFINITY;
        for (int i = 0; i < epochSteps.length; i++) {
            double px = x.map(epochSteps[i]);
            out.raw("<line class=\"epoch\"").attr("x1", px).attr("y1", TOP).attr("x2", px).attr("y2", TOP - 4).raw("/>");
            String label = Integer.toString(epochNumbers[i]);
            if (px - lastLabel >= 12 + CHAR_WIDTH * label.length() && px + CHAR_WIDTH * label.length() / 2 <= WIDTH) {
                out.raw("<text class=\"epoch\"").attr("x", px).attr("y", TOP - 7).raw(">").text(label).raw("</text>");
                lastLabel = px;
            }
        }
    }

    private static void drawSeries(Markup out, Series s, Scale x, Scale y, double plotBottom) {
        out.raw("<g class=\"series\"").attr("data-series", s.name).attr("data-count", Integer.toString(s.size()))
                .raw(">");
        int n = s.size();
        switch (s.style) {
            case BARS -> {
                for (int i = 0; i < n; i++) {
                    if (s.y[i] <= 0) {
                        continue;
                    }
                    double x0 = x.map(s.x[i]);
                    double x1 = x.map(s.x2[i]);
                    double top = y.map(s.y[i]);
                    out.raw("<rect").attr("x", x0 + 0.5).attr("y", top).attr("width", Math.max(0.5, x1 - x0 - 1))
                            .attr("height", plotBottom - top).attr("fill", s.color).raw("/>");
                }
            }
            case MARKS -> {
                double top = yTop(y);
                for (int i = 0; i < n; i++) {
                    double px = x.map(s.x[i]);
                    out.raw("<line class=\"mark\"").attr("x1", px).attr("y1", top)
                            .attr("x2", px).attr("y2", plotBottom).attr("stroke", s.color).raw("/>");
                    if (Double.isFinite(s.y[i])) {
                        circle(out, px, y.map(s.y[i]), 3.5, s.color);
                    }
                }
            }
            case POINTS -> {
                double r = n > 4 * MAX_MARKERS ? 1.5 : 2.2;
                for (int i = 0; i < n; i++) {
                    circle(out, x.map(s.x[i]), y.map(s.y[i]), r, s.color);
                }
            }
            default -> {
                out.raw("<polyline").attr("class", s.style.name().toLowerCase(java.util.Locale.ROOT))
                        .attr("stroke", s.color).raw(" points=\"");
                for (int i = 0; i < n; i++) {
                    out.raw(i == 0 ? "" : " ").raw(Markup.pixel(x.map(s.x[i]))).raw(',').raw(Markup.pixel(y.map(s.y[i])));
                }
                out.raw("\"/>");
                if (n == 1 || (s.style == Style.POINTS_LINE && n <= MAX_MARKERS)) {
                    for (int i = 0; i < n; i++) {
                        circle(out, x.map(s.x[i]), y.map(s.y[i]), 2.6, s.color);
                    }
                }
            }
        }
        out.raw("</g>\n");
    }

    private static double yTop(Scale y) {
        List<Scale.Tick> t = y.ticks();
        return Math.min(y.map(t.get(0).value()), y.map(t.get(t.size() - 1).value()));
    }

    private static void circle(Markup out, double cx, double cy, double r, String color) {
        out.raw("<circle").attr("cx", cx).attr("cy", cy).attr("r", r).attr("fill", color).raw("/>");
    }

    private void legend(Markup out) {
        boolean anyEmpty = series.stream().anyMatch(s -> s.size() == 0);
        if (series.size() < 2 && !anyEmpty) {
            return;
        }
        out.raw("<ul class=\"legend\">");
        for (Series s : series) {
            out.raw(s.size() == 0 ? "<li class=\"missing\">" : "<li>");
            out.raw("<svg class=\"swatch\" width=\"28\" height=\"12\" viewBox=\"0 0 28 12\">");
            switch (s.style) {
                case BARS -> out.raw("<rect x=\"6\" y=\"1\" width=\"16\" height=\"10\"").attr("fill", s.color).raw("/>");
                case POINTS -> circle(out, 14, 6, 3, s.color);
                case MARKS -> out.raw("<line class=\"mark\" x1=\"14\" y1=\"0\" x2=\"14\" y2=\"12\"")
                        .attr("stroke", s.color).raw("/>");
                default -> {
                    out.raw("<polyline").attr("class", s.style.name().toLowerCase(java.util.Locale.ROOT))
                            .attr("stroke", s.color).raw(" points=\"1,6 27,6\"/>");
                    if (s.style == Style.POINTS_LINE) {
                        circle(out, 14, 6, 2.6, s.color);
                    }
                }
            }
            out.raw("</svg>").text(s.name);
            if (s.size() == 0) {
                out.raw(" — not measured in this run");
            }
            out.raw("</li>");
        }
        out.raw("</ul>\n");
    }

    private void table(Markup out, List<Series> drawn) {
        int rows = 0;
        for (Series s : drawn) {
            rows += s.size();
        }
        out.raw("<details class=\"data\"><summary>Plotted values (").raw(Integer.toString(rows))
                .raw(rows == 1 ? " row" : " rows").raw(")</summary>\n<table class=\"values\"").attr("data-plot", id)
                .raw("><thead><tr>");
        for (String c : columns) {
            out.raw("<th>").text(c).raw("</th>");
        }
        out.raw("</tr></thead><tbody>\n");
        for (Series s : drawn) {
            for (int i = 0; i < s.size(); i++) {
                out.raw("<tr").attr("data-series", s.name).raw("><td>").text(s.name).raw("</td><td>")
                        .raw(stepAxis ? Long.toString((long) s.x[i]) : Markup.exact(s.x[i])).raw("</td>");
                if (s.x2 != null) {
                    out.raw("<td>").raw(Markup.exact(s.x2[i])).raw("</td>");
                }
                out.raw("<td>").raw(Markup.exact(s.y[i])).raw("</td></tr>\n");
            }
        }
        out.raw("</tbody></table></details>\n");
    }
}
