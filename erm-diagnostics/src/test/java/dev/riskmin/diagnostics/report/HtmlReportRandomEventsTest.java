package dev.riskmin.diagnostics.report;

import dev.riskmin.diagnostics.AngleEvent;
import dev.riskmin.diagnostics.Decision;
import dev.riskmin.diagnostics.DiagnosticEvent;
import dev.riskmin.diagnostics.LossEvent;
import dev.riskmin.diagnostics.NoiseEvent;
import dev.riskmin.diagnostics.StoppingEvent;
import dev.riskmin.diagnostics.VerdictEvent;
import dev.riskmin.diagnostics.verdict.Condition;
import dev.riskmin.diagnostics.verdict.HealthVerdict;
import dev.riskmin.testing.Cases;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Whatever a trace holds — extreme, infinite or NaN values, steps out of order, null or hostile text —
 * the report is well-formed, self-contained, bounded and the same every time.
 */
class HtmlReportRandomEventsTest {
    private static final double[] EXTREMES = {Double.NaN, Double.POSITIVE_INFINITY, Double.NEGATIVE_INFINITY,
            Double.MAX_VALUE, -Double.MAX_VALUE, Double.MIN_VALUE, 0.0, -0.0, 1e-300, 1e300};

    static double value(RandomGenerator rng) {
        return switch (rng.nextInt(6)) {
            case 0 -> EXTREMES[rng.nextInt(EXTREMES.length)];
            case 1 -> Double.longBitsToDouble(rng.nextLong());
            default -> rng.nextGaussian() * Math.pow(10, rng.nextInt(-5, 6));
        };
    }

    static String text(RandomGenerator rng) {
        if (rng.nextInt(8) == 0) {
            return null;
        }
        String palette = "<>&\"'/ab\u0000\u0008\u001b\u007f\u0085é漢\u2028\uFEFF\uFFFE]]>--";
        StringBuilder b = new StringBuilder();
        for (int k = rng.nextInt(0, 15); k > 0; k--) {
            int pick = rng.nextInt(palette.length() + 2);
            if (pick < palette.length()) {
                b.append(palette.charAt(pick));
            } else {
                b.append(pick == palette.length() ? "\uD83D\uDE00" : "\uD800"); // a pair, or a lone surrogate
            }
        }
        return b.toString();
    }

    static List<DiagnosticEvent> events(long seed) {
        RandomGenerator rng = Cases.rng(seed);
        List<DiagnosticEvent> events = new ArrayList<>();
        int count = rng.nextInt(0, 400);
        for (int i = 0; i < count; i++) {
            long step = rng.nextInt(10) == 0 ? rng.nextLong() : i * 3L + rng.nextInt(3);
            int epoch = rng.nextInt(10) == 0 ? rng.nextInt() : i / 40;
            switch (rng.nextInt(5)) {
                case 0 -> events.add(new LossEvent(step, epoch, value(rng), value(rng), value(rng), value(rng),
                        value(rng), value(rng), rng.nextInt()));
                case 1 -> events.add(new NoiseEvent(step, epoch, rng.nextInt(), value(rng), value(rng), value(rng),
                        value(rng), rng.nextInt()));
                case 2 -> events.add(new AngleEvent(step, epoch, value(rng), value(rng), value(rng), value(rng),
                        value(rng)));
                case 3 -> events.add(new StoppingEvent(step, epoch, rng.nextBoolean() ? "t" + rng.nextInt(3) : text(rng),
                        value(rng), value(rng), rng.nextInt(5) == 0 ? null
                        : Decision.values()[rng.nextInt(Decision.values().length)], text(rng)));
                default -> {
                    Map<String, Double> figures = new HashMap<>();
                    for (int k = rng.nextInt(4); k > 0; k--) {
                        String name = text(rng);
                        figures.put(name == null ? "x" : name, value(rng));
                    }
                    events.add(new VerdictEvent(step, epoch, new HealthVerdict(rng.nextInt(6) == 0 ? null
                            : Condition.values()[rng.nextInt(Condition.values().length)], text(rng), text(rng), figures)));
                }
            }
        }
        return events;
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds50")
    void anyTraceGivesAWellFormedSelfContainedDeterministicReport(long seed) {
        List<DiagnosticEvent> events = events(seed);
        String html = HtmlReport.of(events).withTitle(String.valueOf(text(Cases.rng(seed + 1)))).render();
        ReportDocument doc = ReportDocument.parse(html);
        assertEquals(html, HtmlReport.of(new ArrayList<>(events)).withTitle(String.valueOf(text(Cases.rng(seed + 1))))
                .render());
        for (String outside : List.of("http", "<script", "<link", "src=", "href=", "url(")) {
            assertFalse(html.contains(outside), outside);
        }
        assertTrue(html.length() < 2_000_000, "size " + html.length());
        assertTrue(doc.all("figure").size() >= 9);
        // Every coordinate drawn is a finite number (NaN and infinities are skipped or clamped).
        for (org.w3c.dom.Element svg : doc.all("svg")) {
            for (org.w3c.dom.Element e : ReportDocument.all(svg, "*")) {
                for (String a : List.of("x", "y", "x1", "y1", "x2", "y2", "cx", "cy", "r", "width", "height")) {
                    if (e.hasAttribute(a)) {
                        assertTrue(Double.isFinite(Double.parseDouble(e.getAttribute(a))), a + "=" + e.getAttribute(a));
                    }
                }
                for (String point : e.getAttribute("points").split("[ ,]")) {
                    assertTrue(point.isEmpty() || Double.isFinite(Double.parseDouble(point)), "point " + point);
                }
            }
        }
    }
}
