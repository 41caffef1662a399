package dev.riskmin.diagnostics.sink;

import ch.qos.logback.classic.Level;
import ch.qos.logback.classic.Logger;
import ch.qos.logback.classic.LoggerContext;
import ch.qos.logback.classic.spi.ILoggingEvent;
import ch.qos.logback.core.read.ListAppender;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.diagnostics.AngleEvent;
import dev.riskmin.diagnostics.Decision;
import dev.riskmin.diagnostics.DiagnosticEvent;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.diagnostics.EventFilter;
import dev.riskmin.diagnostics.EventKind;
import dev.riskmin.diagnostics.LossEvent;
import dev.riskmin.diagnostics.NoiseEvent;
import dev.riskmin.diagnostics.StoppingEvent;
import dev.riskmin.diagnostics.VerdictEvent;
import dev.riskmin.diagnostics.verdict.Condition;
import dev.riskmin.diagnostics.verdict.HealthVerdict;
import dev.riskmin.diagnostics.verdict.ProbeSummaryMonitor;
import dev.riskmin.testing.LeastSquaresProblem;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.slf4j.LoggerFactory;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** The SLF4J reporter's lines, captured by a logback list appender attached to the logger in the test. */
class Slf4jReporterTest {
    private static final String NAME = "dev.riskmin.diagnostics.test.reporter";
    private final ListAppender<ILoggingEvent> appender = new ListAppender<>();
    private Logger logger;

    @BeforeEach
    void attach() {
        LoggerContext context = (LoggerContext) LoggerFactory.getILoggerFactory();
        logger = context.getLogger(NAME);
        logger.setLevel(Level.TRACE);
        logger.setAdditive(false); // the captured lines stay off the console
        appender.setContext(context);
        appender.start();
        logger.addAppender(appender);
    }

    @AfterEach
    void detach() {
        logger.detachAppender(appender);
        logger.setLevel(null);
        logger.setAdditive(true);
        appender.stop();
    }

    List<String> lines() {
        List<String> lines = new ArrayList<>();
        appender.list.forEach(e -> lines.add(e.getFormattedMessage()));
        return lines;
    }

    @Test
    void everyKindGivesOneKeyValueLine() {
        Slf4jReporter reporter = Slf4jReporter.builder().logger(NAME).build();
        List<DiagnosticEvent> events = List.of(
                new NoiseEvent(1200, 3, 16, 0.231, 0.0144375, 0.0163, 14.2, 15),
                new AngleEvent(41, 0, 0.27, 0.3125, 0.83, 37.5, 1.5e-7),
                new AngleEvent(42, 0, 0.27, 0.3125, 0.83, Double.NaN, Double.NaN),
                new LossEvent(7, 1, 0.5234567891, Double.NaN, 0.47, Double.NaN, 0.128, 0.05, 16),
                new StoppingEvent(300, 2, "norm test", 3.1, 1.0, Decision.GROW_BATCH, "3.1 > 1"),
                new VerdictEvent(4000, 10, new HealthVerdict(Condition.NOISE_DOMINATED, "noise swamps the signal.",
                        "raise the batch size to about 38", Map.of())));
        events.forEach(reporter::onEvent);
        assertEquals(List.of(
                "kind=noise step=1200 epoch=3 batch=16 trace=0.231 meanVariance=0.0144375 gradNormSq=0.0163"
                        + " noiseScale=14.2 suggestedBatch=15",
                "kind=angle step=41 epoch=0 cos=0.27 meanCos=0.3125 descentShare=0.83 angleToOptimum=37.5"
                        + " suboptimality=1.5e-07",
                "kind=angle step=42 epoch=0 cos=0.27 meanCos=0.3125 descentShare=0.83",
                "kind=loss step=7 epoch=1 batchLoss=0.523457 objective=0.47 gradNorm=0.128 stepSize=0.05 batch=16",
                "kind=stopping step=300 epoch=2 test=\"norm test\" statistic=3.1 threshold=1 decision=grow_batch"
                        + " detail=\"3.1 > 1\"",
                "kind=verdict step=4000 epoch=10 condition=noise_dominated summary=\"noise swamps the signal.\""
                        + " advice=\"raise the batch size to about 38\""), lines());
        appender.list.forEach(e -> assertEquals(Level.INFO, e.getLevel()));
    }

    @Test
    void levelIsRespectedForMeasurementsAndVerdicts() {
        logger.setLevel(Level.INFO);
        Slf4jReporter debug = Slf4jReporter.builder().logger(NAME).level(org.slf4j.event.Level.DEBUG)
                .verdictLevel(org.slf4j.event.Level.WARN).build();
        List<DiagnosticEvent> events = TraceFixtures.allKinds();
        events.forEach(debug::onEvent);
        // Only the two verdicts pass the logger's INFO threshold, at WARN.
        assertEquals(2, appender.list.size());
        appender.list.forEach(e -> assertEquals(Level.WARN, e.getLevel()));
        assertTrue(appender.list.get(0).getFormattedMessage().startsWith("kind=verdict step=4000"));

        appender.list.clear();
        Slf4jReporter trace = Slf4jReporter.builder().logger(LoggerFactory.getLogger(NAME))
                .level(org.slf4j.event.Level.TRACE).build();
        logger.setLevel(Level.TRACE);
        events.forEach(trace::onEvent);
        assertEquals(events.size(), appender.list.size());
        appender.list.forEach(e -> assertEquals(Level.TRACE, e.getLevel())); // verdicts follow level by default
    }

    @Test
    void numbersUseRootLocaleWithSixSignificantDigits() {
        Locale saved = Locale.getDefault();
        try {
            Locale.setDefault(Locale.GERMANY); // a decimal comma would show here
            Slf4jReporter reporter = Slf4jReporter.builder().logger(NAME).build();
            reporter.onEvent(new LossEvent(1, 0, 0.231, -0.0, 1234567.89, 1e-300, Double.POSITIVE_INFINITY,
                    Math.PI, 4));
            assertEquals("kind=loss step=1 epoch=0 batchLoss=0.231 smoothedLoss=-0 objective=1.23457e+06"
                    + " heldOut=1e-300 gradNorm=Infinity stepSize=3.14159 batch=4", lines().get(0));
        } finally {
            Locale.setDefault(saved);
        }
        // Six digits read back to within half a unit in the sixth digit.
        String pi = Slf4jReporter.number(Math.PI);
        assertEquals(Math.PI, Double.parseDouble(pi), 5e-6);
    }

    @Test
    void textIsQuotedAndEscapedSoEveryLineParsesBack() {
        Slf4jReporter reporter = Slf4jReporter.builder().logger(NAME).build();
        List<DiagnosticEvent> events = TraceFixtures.allKinds();
        events.forEach(reporter::onEvent);
        List<String> lines = lines();
        assertEquals(events.size(), lines.size());
        for (String line : lines) {
            assertTrue(line.indexOf('\n') < 0 && line.indexOf('\r') < 0, line);
        }
        Map<String, String> stopping = parse(lines.get(6));
        assertEquals("norm test", stopping.get("test"));
        assertEquals(((StoppingEvent) events.get(6)).detail(), stopping.get("detail"));
        Map<String, String> empty = parse(lines.get(7));
        assertEquals("", empty.get("test"));
        assertTrue(!parse(lines.get(8)).containsKey("test"), "a null text is left out: " + lines.get(8));
        Map<String, String> verdict = parse(lines.get(9));
        assertEquals("noise_dominated", verdict.get("condition"));
        assertEquals(((VerdictEvent) events.get(9)).verdict().advice(), verdict.get("advice"));
    }

    /** Reads a line back: key=value pairs split on spaces outside quotes; the reporter's escapes undone. */
    static Map<String, String> parse(String line) {
        Map<String, String> pairs = new LinkedHashMap<>();
        int i = 0;
        while (i < line.length()) {
            int eq = line.indexOf('=', i);
            String key = line.substring(i, eq);
            StringBuilder value = new StringBuilder();
            i = eq + 1;
            if (i < line.length() && line.charAt(i) == '"') {
                i++;
                while (line.charAt(i) != '"') {
                    char ch = line.charAt(i++);
                    if (ch == '\\') {
                        char e = line.charAt(i++);
                        switch (e) {
                            case 'n' -> value.append('\n');
                            case 'r' -> value.append('\r');
                            case 't' -> value.append('\t');
                            case 'u' -> {
                                value.append((char) Integer.parseInt(line.substring(i, i + 4), 16));
                                i += 4;
                            }
                            default -> value.append(e);
                        }
                    } else {
                        value.append(ch);
                    }
                }
                i++;
            } else {
                while (i < line.length() && line.charAt(i) != ' ') {
                    value.append(line.charAt(i++));
                }
            }
            pairs.put(key, value.toString());
            i++; // the space
        }
        return pairs;
    }

    @Test
    void cadenceComesFromTheSubscriptionFilter() {
        Slf4jReporter reporter = Slf4jReporter.builder().logger(NAME).build();
        ProbeSummaryMonitor monitor = new ProbeSummaryMonitor(3);
        Diagnostics diagnostics = Diagnostics.builder().monitor(monitor)
                .subscribe(reporter, EventFilter.of(EventKind.NOISE, EventKind.VERDICT).every(4)).build();
        LeastSquaresProblem problem = LeastSquaresProblem.gaussian(3, 200, 3, 0.5);
        Minimizer.builder().batchSize(4).epochs(2).build().fit(problem.data, FitOptions.listeners(diagnostics));
        int noiseLines = (monitor.probes() + 3) / 4; // every 4th noise event, the first included
        List<String> lines = lines();
        assertEquals(noiseLines + 1, lines.size(), lines.toString());
        assertTrue(lines.get(0).startsWith("kind=noise step=0 "), lines.get(0));
        assertTrue(lines.get(1).startsWith("kind=noise step=12 "), lines.get(1)); // probe 4 of every 3 steps
        assertTrue(lines.get(lines.size() - 1).startsWith("kind=verdict "), lines.get(lines.size() - 1));
    }

    @Test
    void defaultsUseTheLibraryLoggerAtInfoAndTheBuilderRefusesNull() {
        Slf4jReporter reporter = Slf4jReporter.defaults();
        assertEquals("dev.riskmin.diagnostics", reporter.logger().getName());
        assertEquals(org.slf4j.event.Level.INFO, reporter.level());
        assertEquals(org.slf4j.event.Level.INFO, reporter.verdictLevel());
        NullPointerException e = assertThrows(NullPointerException.class, () -> Slf4jReporter.builder().level(null));
        assertEquals("level must not be null", e.getMessage()); // the project's null convention (Arguments.notNull)
    }
}
