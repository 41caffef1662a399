package dev.riskmin.diagnostics.sink;

import ch.qos.logback.classic.Level;
import ch.qos.logback.classic.Logger;
import ch.qos.logback.classic.LoggerContext;
import ch.qos.logback.classic.spi.ILoggingEvent;
import ch.qos.logback.core.read.ListAppender;
import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.StopReason;
import dev.riskmin.diagnostics.DiagnosticEvent;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.diagnostics.EventKind;
import dev.riskmin.diagnostics.verdict.ProbeSummaryMonitor;
import dev.riskmin.sampling.Sampling;
import dev.riskmin.testing.LeastSquaresProblem;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.EnumSource;
import org.slf4j.LoggerFactory;

import java.io.IOException;
import java.io.StringWriter;
import java.io.Writer;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertSame;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * A trace writer whose stream fails does not throw into the fit: it records the first failure,
 * reports it once at WARN, closes the stream and drops the rest; the fit ends as it would have.
 */
class TraceWriterFailureTest {
    private static final LeastSquaresProblem PROBLEM = LeastSquaresProblem.gaussian(21, 500, 4, 0.5);
    private final ListAppender<ILoggingEvent> warnings = new ListAppender<>();
    private final Logger[] loggers = new Logger[2];

    /** A stream that accepts {@code limit} characters, then throws; it remembers being closed. */
    static final class FailingWriter extends Writer {
        final int limit;
        final StringBuilder accepted = new StringBuilder();
        boolean closed;
        int failures;
        boolean failOnClose;

        FailingWriter(int limit) {
            this.limit = limit;
        }

        @Override
        public void write(char[] buffer, int offset, int length) throws IOException {
            if (closed) {
                throw new IOException("write after close");
            }
            if (accepted.length() + length > limit) {
                failures++;
                throw new IOException("device full after " + accepted.length() + " characters (test)");
            }
            accepted.append(buffer, offset, length);
        }

        @Override
        public void flush() throws IOException {
            if (failOnClose && closed) {
                throw new IOException("flush after close");
            }
        }

        @Override
        public void close() throws IOException {
            closed = true;
            if (failOnClose) {
                failures++;
                throw new IOException("close failed (test)");
            }
        }
    }

    @BeforeEach
    void captureWarnings() {
        LoggerContext context = (LoggerContext) LoggerFactory.getILoggerFactory();
        warnings.setContext(context);
        warnings.start();
        loggers[0] = context.getLogger(CsvTraceWriter.class);
        loggers[1] = context.getLogger(JsonLinesTraceWriter.class);
        for (Logger l : loggers) {
            l.addAppender(warnings);
            l.setAdditive(false); // keep the expected warning off the console
        }
    }

    @AfterEach
    void releaseWarnings() {
        for (Logger l : loggers) {
            l.detachAppender(warnings);
            l.setAdditive(true);
        }
        warnings.stop();
    }

    static TraceWriter writer(TraceRoundTripTest.Format format, Writer out) {
        return format.writer(out);
    }

    static Minimizer minimizer() {
        return Minimizer.builder().sampling(Sampling.withReplacement()).batchSize(8).epochs(5).seed(4).build();
    }

    @ParameterizedTest
    @EnumSource(TraceRoundTripTest.Format.class)
    void streamFailingMidFitIsRecordedOnceAndTheFitEndsNormally(TraceRoundTripTest.Format format) {
        FailingWriter stream = new FailingWriter(20_000);
        TraceWriter writer = writer(format, stream);
        TraceRecorder recorder = TraceRecorder.unbounded();
        Diagnostics diagnostics = Diagnostics.builder().monitor(new ProbeSummaryMonitor(2)).subscribe(writer)
                .subscribe(recorder).build();
        Fit fit = minimizer().fit(PROBLEM.data, FitOptions.listeners(diagnostics));
        Fit reference = minimizer().fit(PROBLEM.data);

        assertEquals(StopReason.EPOCH_BUDGET, fit.stopReason(), fit.toString());
        assertEquals(reference.steps(), fit.steps());
        assertEquals(reference.finalObjective(), fit.finalObjective()); // the trace changed nothing
        assertTrue(fit.listenerFailures().isEmpty(), fit.listenerFailures().toString());
        assertTrue(diagnostics.failures().isEmpty(), diagnostics.failures().toString()); // never detached

        IOException failure = writer.failure().orElseThrow();
        assertTrue(failure.getMessage().startsWith("device full"), failure.getMessage());
        assertTrue(stream.closed, "the stream is closed as soon as it fails");
        assertEquals(1, stream.failures);
        long delivered = recorder.events().size();
        assertTrue(writer.droppedEvents() > 0 && writer.eventsWritten() > 0);
        assertEquals(delivered, writer.eventsWritten() + writer.droppedEvents());

        writer.close(); // no throw, no second report
        writer.onEvent(recorder.events().get(0));
        assertSame(failure, writer.failure().orElseThrow());
        assertEquals(1, warnings.list.size(), warnings.list.toString());
        ILoggingEvent warning = warnings.list.get(0);
        assertEquals(Level.WARN, warning.getLevel());
        assertTrue(warning.getFormattedMessage().contains("later events are dropped"), warning.getFormattedMessage());
        assertEquals(delivered + 1, writer.eventsWritten() + writer.droppedEvents());
    }

    @ParameterizedTest
    @EnumSource(TraceRoundTripTest.Format.class)
    void failureWhileFlushingAVerdictCountsTheVerdictOnceAsDropped(TraceRoundTripTest.Format format) {
        FailingWriter stream = new FailingWriter(10); // the buffered record fails at the verdict's flush
        TraceWriter writer = writer(format, stream);
        writer.onEvent(TraceFixtures.allKinds().get(0));
        writer.onEvent(TraceFixtures.allKinds().get(10));
        assertTrue(writer.failure().isPresent());
        assertEquals(1, writer.eventsWritten());
        assertEquals(1, writer.droppedEvents());
        assertEquals(1, warnings.list.size());
    }

    @ParameterizedTest
    @EnumSource(TraceRoundTripTest.Format.class)
    void failureWhileClosingIsRecordedNotThrown(TraceRoundTripTest.Format format) {
        FailingWriter stream = new FailingWriter(Integer.MAX_VALUE);
        stream.failOnClose = true;
        TraceWriter writer = writer(format, stream);
        writer.onEvent(TraceFixtures.allKinds().get(0));
        writer.close();
        assertTrue(writer.failure().orElseThrow().getMessage().startsWith("close failed"));
        assertTrue(stream.closed);
        assertEquals(1, warnings.list.size());
        writer.close();
        assertEquals(1, stream.failures);
    }

    @ParameterizedTest
    @EnumSource(TraceRoundTripTest.Format.class)
    void realFitTraceOnDiskEqualsTheRecordedEventsAndTheFileIsReleased(TraceRoundTripTest.Format format,
                                                                     @TempDir Path dir) throws IOException {
        Path file = dir.resolve("fit-trace");
        TraceWriter writer = format.open(file);
        TraceRecorder recorder = TraceRecorder.unbounded();
        Diagnostics diagnostics = Diagnostics.builder().monitor(new ProbeSummaryMonitor(5)).subscribe(writer)
                .subscribe(recorder).build();
        Fit fit = minimizer().fit(PROBLEM.data, FitOptions.listeners(diagnostics));
        assertEquals(StopReason.EPOCH_BUDGET, fit.stopReason());
        writer.close();
        assertTrue(writer.failure().isEmpty());
        List<DiagnosticEvent> read = format.read(file);
        assertEquals(recorder.events(), read);
        assertEquals(1, recorder.events(EventKind.VERDICT).size());
        assertTrue(read.size() > 100, "events " + read.size());
        Files.delete(file);
        assertFalse(Files.exists(file));
    }

    @ParameterizedTest
    @EnumSource(TraceRoundTripTest.Format.class)
    void verdictFlushesTheBufferAndEventsAfterCloseAreDropped(TraceRoundTripTest.Format format) {
        StringWriter stream = new StringWriter();
        TraceWriter writer = writer(format, stream);
        List<DiagnosticEvent> events = TraceFixtures.allKinds();
        writer.onEvent(events.get(0));
        assertEquals("", stream.toString()); // buffered
        writer.onEvent(events.get(10)); // a verdict
        int flushed = stream.toString().length();
        assertTrue(flushed > 0 && stream.toString().contains("converged"), stream.toString());
        writer.close();
        writer.onEvent(events.get(0));
        writer.flush();
        assertEquals(flushed, stream.toString().length());
        assertEquals(2, writer.eventsWritten());
        assertEquals(1, writer.droppedEvents());
        assertTrue(writer.failure().isEmpty());
        assertTrue(warnings.list.isEmpty());
    }
}
