package dev.riskmin.diagnostics.reliability;

import ch.qos.logback.classic.Logger;
import ch.qos.logback.classic.LoggerContext;
import ch.qos.logback.classic.spi.ILoggingEvent;
import ch.qos.logback.core.read.ListAppender;
import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.StopReason;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.diagnostics.sink.CsvTraceWriter;
import dev.riskmin.diagnostics.sink.JsonLinesTraceWriter;
import dev.riskmin.diagnostics.sink.TraceRecorder;
import dev.riskmin.diagnostics.sink.TraceWriter;
import dev.riskmin.reliability.ResourceCheck;
import dev.riskmin.sampling.Sampling;
import dev.riskmin.testing.LeastSquaresProblem;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.EnumSource;
import org.slf4j.LoggerFactory;

import java.io.IOException;
import java.io.Writer;
import java.nio.file.Files;
import java.nio.file.NoSuchFileException;
import java.nio.file.Path;
import java.util.List;
import java.util.stream.Collectors;
import java.util.stream.Stream;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

/**
 * A trace sink whose stream fails mid-fit leaves the fit as it would have been, reports once, and
 * releases its file handle at once (counted in /proc/self/fd), leaving no thread and no stray file.
 * The failing device is real: Linux's {@code /dev/full} accepts the open and fails every write with
 * "No space left on device" (ENOSPC), as a full disk does. The stream-level cases with an
 * in-memory failing writer are in {@code TraceWriterFailureTest}.
 */
class TraceSinkFaultTest {
    private static final LeastSquaresProblem PROBLEM = LeastSquaresProblem.gaussian(51, 500, 4, 0.5);
    private static final Path FULL = Path.of("/dev/full");
    private final ListAppender<ILoggingEvent> warnings = new ListAppender<>();
    private Logger[] loggers;

    enum Format {
        CSV, JSON_LINES;

        TraceWriter open(Path file) throws IOException {
            return this == CSV ? CsvTraceWriter.open(file) : JsonLinesTraceWriter.open(file);
        }

        TraceWriter to(Writer out) {
            return this == CSV ? CsvTraceWriter.to(out) : JsonLinesTraceWriter.to(out);
        }
    }

    @BeforeEach
    void captureWarnings() {
        LoggerContext context = (LoggerContext) LoggerFactory.getILoggerFactory();
        warnings.setContext(context);
        warnings.start();
        loggers = new Logger[] {context.getLogger(CsvTraceWriter.class), context.getLogger(JsonLinesTraceWriter.class)};
        for (Logger l : loggers) {
            l.addAppender(warnings);
            l.setAdditive(false); // the expected warning stays off the console
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

    private static Minimizer minimizer() {
        return Minimizer.builder().sampling(Sampling.withReplacement()).batchSize(4).epochs(40).seed(9).build();
    }

    /** Fits with the standard monitors writing to {@code writer}; returns the fit. */
    private static Fit fitWith(TraceWriter writer, TraceRecorder recorder) {
        Diagnostics diagnostics = Monitors.standardWith(writer, recorder);
        Fit fit = minimizer().fit(PROBLEM.data, FitOptions.listeners(diagnostics));
        assertTrue(diagnostics.failures().isEmpty(), "the sink was never detached: " + diagnostics.failures());
        return fit;
    }

    @ParameterizedTest
    @EnumSource(Format.class)
    void fullDeviceFailsMidFitAndTheHandleIsReleasedAtOnce(Format format) throws Exception {
        assumeTrue(Files.isWritable(FULL) && ResourceCheck.canCountDescriptors(), "needs Linux /dev/full and /proc");
        Fit reference = minimizer().fit(PROBLEM.data);
        TraceWriter warmUp = format.open(FULL); // loads every class the scenario needs, before counting
        fitWith(warmUp, TraceRecorder.unbounded());
        warmUp.close();
        warnings.list.clear();

        ResourceCheck before = ResourceCheck.snapshot();
        TraceWriter writer = format.open(FULL);
        assertEquals(before.descriptors() + 1, ResourceCheck.openFileDescriptors(), "the trace holds one handle");
        TraceRecorder recorder = TraceRecorder.unbounded();
        Fit fit = fitWith(writer, recorder);
        before.assertNothingLeft("a trace that failed mid-fit (before close)");

        assertEquals(StopReason.EPOCH_BUDGET, fit.stopReason());
        assertArrayEquals(reference.parameters(), fit.parameters(), 0.0);
        IOException failure = writer.failure().orElseThrow();
        assertTrue(failure.getMessage().contains("No space left"), failure.getMessage());
        long delivered = recorder.events().size();
        assertEquals(delivered, writer.eventsWritten() + writer.droppedEvents());
        assertTrue(writer.droppedEvents() > 1, "failed before the verdict: " + writer.droppedEvents() + " dropped of "
                + delivered);
        writer.close(); // idempotent after the failure; does not throw
        assertEquals(1, warnings.list.size(), "reported once");
        before.assertNothingLeft("a trace that failed mid-fit (after close)");
    }

    @ParameterizedTest
    @EnumSource(Format.class)
    void traceFileIsTheOnlyFileLeftAndItsHandleIsClosed(Format format, @TempDir Path dir) throws Exception {
        assumeTrue(ResourceCheck.canCountDescriptors(), "needs /proc");
        TraceWriter warmUp = format.open(dir.resolve("warm-up"));
        fitWith(warmUp, TraceRecorder.unbounded());
        warmUp.close();
        Files.delete(dir.resolve("warm-up"));

        ResourceCheck before = ResourceCheck.snapshot();
        Path file = dir.resolve("trace");
        TraceWriter writer = format.open(file);
        fitWith(writer, TraceRecorder.unbounded());
        writer.close();
        assertTrue(writer.failure().isEmpty());
        assertEquals(List.of(file), list(dir), "no temporary or partial files beside the trace");
        assertTrue(Files.size(file) > 1000);
        before.assertNothingLeft("a trace written to a file");

        assertThrows(NoSuchFileException.class, () -> format.open(dir.resolve("missing").resolve("trace")),
                "a trace that cannot be opened fails at open, before any fit");
        assertEquals(List.of(file), list(dir));
        before.assertNothingLeft("a trace that could not be opened");
    }

    /** A caller's writer over a real file that fails after 3,000 characters: the sink closes it at once. */
    @ParameterizedTest
    @EnumSource(Format.class)
    void callersFileWriterThatFailsMidFitIsClosedAtOnce(Format format, @TempDir Path dir) throws Exception {
        assumeTrue(ResourceCheck.canCountDescriptors(), "needs /proc");
        try (Writer warm = Files.newBufferedWriter(dir.resolve("warm-up"))) {
            fitWith(format.to(new FailingAfter(warm, 3_000)), TraceRecorder.unbounded());
        }
        Files.delete(dir.resolve("warm-up"));
        warnings.list.clear();

        ResourceCheck before = ResourceCheck.snapshot();
        Path file = dir.resolve("trace");
        FailingAfter stream = new FailingAfter(Files.newBufferedWriter(file), 3_000);
        TraceWriter writer = format.to(stream);
        Fit fit = fitWith(writer, TraceRecorder.unbounded());
        assertEquals(StopReason.EPOCH_BUDGET, fit.stopReason());
        assertTrue(stream.closed, "closed when it failed, before the fit ended");
        before.assertNothingLeft("a caller's file writer that failed mid-fit");
        writer.close();
        assertEquals(1, warnings.list.size());
        assertEquals(List.of(file), list(dir));
        assertTrue(Files.size(file) <= 3_000, "nothing written after the failure");
    }

    private static List<Path> list(Path dir) throws IOException {
        try (Stream<Path> s = Files.list(dir)) {
            return s.collect(Collectors.toList());
        }
    }

    /** Passes writes through to a real file until a limit, then fails as a full device would. */
    private static final class FailingAfter extends Writer {
        private final Writer out;
        private final int limit;
        private int written;
        boolean closed;

        FailingAfter(Writer out, int limit) {
            this.out = out;
            this.limit = limit;
        }

        @Override
        public void write(char[] buffer, int offset, int length) throws IOException {
            if (written + length > limit) {
                throw new IOException("no space left after " + written + " characters (test)");
            }
            out.write(buffer, offset, length);
            written += length;
        }

        @Override
        public void flush() throws IOException {
            out.flush();
        }

        @Override
        public void close() throws IOException {
            closed = true;
            out.close();
        }
    }
}
