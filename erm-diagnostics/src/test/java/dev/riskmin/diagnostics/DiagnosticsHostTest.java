package dev.riskmin.diagnostics;

import ch.qos.logback.classic.Level;
import ch.qos.logback.classic.Logger;
import ch.qos.logback.classic.LoggerContext;
import ch.qos.logback.classic.spi.ILoggingEvent;
import ch.qos.logback.core.read.ListAppender;
import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.StopReason;
import dev.riskmin.diagnostics.sink.TraceRecorder;
import dev.riskmin.diagnostics.verdict.Condition;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.testing.LeastSquaresProblem;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.slf4j.LoggerFactory;

import java.util.ArrayList;
import java.util.List;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** The host: one-call set-up that logs and judges, filters and cadences, and isolation of failures. */
class DiagnosticsHostTest {
    private static final LeastSquaresProblem PROBLEM = LeastSquaresProblem.gaussian(14, 2000, 6, 0.5);
    private final ListAppender<ILoggingEvent> appender = new ListAppender<>();
    private Logger logger;

    @BeforeEach
    void attach() {
        LoggerContext context = (LoggerContext) LoggerFactory.getILoggerFactory();
        logger = context.getLogger("dev.riskmin.diagnostics");
        logger.setLevel(Level.INFO);
        logger.setAdditive(false);
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

    private List<String> lines() {
        List<String> out = new ArrayList<>();
        appender.list.forEach(e -> out.add(e.getFormattedMessage()));
        return out;
    }

    @Test
    void oneCallAttachesMonitorsLogsAndJudges() {
        Diagnostics diagnostics = Diagnostics.standard().build();
        Fit fit = Minimizer.builder().updateRule(UpdateRule.svrg()).batchSize(8).epochs(30).build()
                .fit(PROBLEM.data, FitOptions.listeners(diagnostics));
        assertEquals(StopReason.EPOCH_BUDGET, fit.stopReason());
        List<String> lines = lines();
        assertTrue(lines.stream().anyMatch(l -> l.startsWith("kind=noise")), "noise lines: " + lines);
        assertTrue(lines.stream().anyMatch(l -> l.startsWith("kind=loss")), "loss lines");
        String verdict = lines.stream().filter(l -> l.startsWith("kind=verdict")).findFirst().orElse(null);
        assertNotNull(verdict, "a verdict line");
        assertEquals(Condition.CONVERGED, diagnostics.verdict().condition(), diagnostics.verdict().toString());
        assertTrue(diagnostics.failures().isEmpty(), diagnostics.failures().toString());
    }

    @Test
    void filterAndCadenceSelectEveryKthEventOfAKind() {
        TraceRecorder all = TraceRecorder.unbounded();
        TraceRecorder every3 = TraceRecorder.unbounded();
        Diagnostics diagnostics = Diagnostics.builder()
                .monitor(dev.riskmin.diagnostics.estimator.LossMonitor.defaults())
                .subscribe(all)
                .subscribe(every3, EventFilter.of(EventKind.LOSS).every(3))
                .build();
        Minimizer.builder().epochs(3).build().fit(PROBLEM.data, FitOptions.listeners(diagnostics));
        List<DiagnosticEvent> losses = new ArrayList<>();
        for (DiagnosticEvent e : all.events()) {
            if (e.kind() == EventKind.LOSS) {
                losses.add(e);
            }
        }
        List<DiagnosticEvent> expected = new ArrayList<>();
        for (int k = 0; k < losses.size(); k += 3) {
            expected.add(losses.get(k));
        }
        assertTrue(losses.size() > 10);
        assertEquals(expected, every3.events());
    }

    @Test
    void throwingMonitorAndSubscriberAreDetachedAndTheFitIsUnchanged() {
        Monitor bomb = new Monitor() {
            @Override
            public void step(StepContext context) {
                if (context.view().step() == 5) {
                    throw new IllegalStateException("monitor boom");
                }
            }

            @Override
            public String name() {
                return "bomb";
            }
        };
        EventListener badSink = event -> {
            throw new IllegalStateException("sink boom");
        };
        Diagnostics diagnostics = Diagnostics.builder().monitor(bomb)
                .monitor(dev.riskmin.diagnostics.estimator.LossMonitor.defaults()).subscribe(badSink).build();
        Minimizer m = Minimizer.builder().epochs(2).seed(3).build();
        Fit with = m.fit(PROBLEM.data, FitOptions.listeners(diagnostics));
        Fit without = m.fit(PROBLEM.data);
        assertEquals(StopReason.EPOCH_BUDGET, with.stopReason());
        assertArrayEquals(without.parameters(), with.parameters(), 0.0);
        assertEquals(2, diagnostics.failures().size(), diagnostics.failures().toString());
        String failures = diagnostics.failures().toString();
        assertTrue(failures.contains("monitor boom") && failures.contains("sink boom"), failures);
        assertTrue(with.listenerFailures().isEmpty(), "the host itself never failed");
    }
}
