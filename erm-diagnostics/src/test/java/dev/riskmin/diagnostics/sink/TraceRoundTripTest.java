package dev.riskmin.diagnostics.sink;

import dev.riskmin.diagnostics.DiagnosticEvent;
import dev.riskmin.diagnostics.LossEvent;
import dev.riskmin.diagnostics.NoiseEvent;
import dev.riskmin.diagnostics.VerdictEvent;
import dev.riskmin.diagnostics.verdict.Condition;
import dev.riskmin.diagnostics.verdict.HealthVerdict;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.EnumSource;
import org.junit.jupiter.params.provider.MethodSource;

import java.io.IOException;
import java.io.Reader;
import java.io.StringReader;
import java.io.StringWriter;
import java.io.Writer;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Map;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Traces written by each writer read back into equal records (record equality compares doubles as
 * {@link Double#compare} does: NaN equals NaN, -0.0 differs from 0.0), through a stream and
 * through a UTF-8 file.
 */
class TraceRoundTripTest {

    enum Format {
        CSV, JSON_LINES;

        TraceWriter writer(Writer out) {
            return this == CSV ? CsvTraceWriter.to(out) : JsonLinesTraceWriter.to(out);
        }

        TraceWriter open(Path file) throws IOException {
            return this == CSV ? CsvTraceWriter.open(file) : JsonLinesTraceWriter.open(file);
        }

        List<DiagnosticEvent> read(Reader in) throws IOException {
            return this == CSV ? TraceReader.csv(in) : TraceReader.jsonLines(in);
        }

        List<DiagnosticEvent> read(Path file) throws IOException {
            return this == CSV ? TraceReader.csv(file) : TraceReader.jsonLines(file);
        }
    }

    static String write(Format format, List<DiagnosticEvent> events) {
        StringWriter out = new StringWriter();
        TraceWriter writer = format.writer(out);
        events.forEach(writer::onEvent);
        writer.close();
        assertTrue(writer.failure().isEmpty(), () -> writer.failure().get().toString());
        assertEquals(events.size(), writer.eventsWritten());
        return out.toString();
    }

    @ParameterizedTest
    @EnumSource(Format.class)
    void everyKindWithAwkwardValuesReadsBackEqual(Format format) throws IOException {
        List<DiagnosticEvent> events = TraceFixtures.allKinds();
        String text = write(format, events);
        assertEquals(events, format.read(new StringReader(text)));
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds50")
    void randomEventsReadBackEqualInBothFormats(long seed) throws IOException {
        List<DiagnosticEvent> events = TraceFixtures.random(seed, 40);
        for (Format format : Format.values()) {
            assertEquals(events, format.read(new StringReader(write(format, events))), format + " seed " + seed);
        }
    }

    @ParameterizedTest
    @EnumSource(Format.class)
    void fileTraceReadsBackEqualAndLeavesNoHandleOpen(Format format, @TempDir Path dir) throws IOException {
        Path file = dir.resolve("trace." + format);
        TraceWriter writer = format.open(file);
        List<DiagnosticEvent> events = TraceFixtures.allKinds();
        events.forEach(writer::onEvent);
        writer.close();
        assertEquals(events, format.read(file));
        Files.delete(file);
        assertFalse(Files.exists(file));
    }

    @Test
    void csvHasTheFixedHeaderCrlfRowsAndEmptyCellsOutsideTheKind() {
        String text = write(Format.CSV, List.of(new LossEvent(7, 1, 0.5, Double.NaN, 0.47, Double.NaN, 0.128, 0.05,
                16)));
        String header = "kind,step,epoch,batchSize,traceCovariance,batchMeanVariance,gradientNormSquared,noiseScale,"
                + "suggestedBatchSize,cosine,meanCosine,descentShare,angleToOptimum,suboptimality,batchLoss,"
                + "smoothedBatchLoss,objective,heldOutLoss,gradientNorm,stepSize,test,statistic,threshold,decision,"
                + "detail,condition,summary,advice,figures";
        // RFC 4180 section 2: CRLF after every record, the header included.
        assertEquals(header + "\r\nloss,7,1,16,,,,,,,,,,,0.5,NaN,0.47,NaN,0.128,0.05,,,,,,,,,\r\n", text);
    }

    @Test
    void csvQuotesTextAsRfc4180AndMarksNullApartFromEmpty() {
        String text = write(Format.CSV, List.of(new VerdictEvent(1, 0, new HealthVerdict(Condition.CONVERGED,
                "say \"hi\", then\nstop", "", Map.of("b", 1.0, "a", Double.NaN)))));
        String row = text.substring(text.indexOf("\r\n") + 2);
        // RFC 4180 section 2, rules 6 and 7: enclose in quotes, double the inner quotes.
        assertTrue(row.endsWith(",converged,\"say \"\"hi\"\", then\nstop\",\"\",a=NaN;b=1.0\r\n"), row);
    }

    @Test
    void jsonLinesAreStrictOneObjectPerLineWithNullForNaN() {
        String text = write(Format.JSON_LINES, TraceFixtures.allKinds());
        String[] lines = text.split("\n", -1);
        assertEquals(TraceFixtures.allKinds().size() + 1, lines.length);
        assertEquals("", lines[lines.length - 1]);
        for (int i = 0; i < text.length(); i++) {
            char ch = text.charAt(i);
            assertTrue(ch >= 0x20 || ch == '\n', "raw control character U+" + Integer.toHexString(ch) + " at " + i);
        }
        assertTrue(lines[1].contains("\"traceCovariance\":null") && !lines[1].contains("NaN"), lines[1]);
        assertTrue(lines[0].startsWith("{\"kind\":\"noise\",\"step\":1200,\"epoch\":3,\"batchSize\":16,"), lines[0]);
        assertTrue(lines[2].contains("\"cosine\":-0.0"), lines[2]);
        // RFC 8259 section 7: control characters escaped; \\u form for those without a short escape.
        assertTrue(lines[6].contains("\\n") && lines[6].contains("\\u0001") && lines[6].contains("\\u2028"),
                lines[6]);
    }

    @Test
    void infinitiesSurviveCsvAndBecomeNaNInJsonLines() throws IOException {
        List<DiagnosticEvent> events = List.of(new NoiseEvent(5, 0, 8, Double.POSITIVE_INFINITY, 1.0,
                Double.NEGATIVE_INFINITY, Double.POSITIVE_INFINITY, Integer.MAX_VALUE));
        assertEquals(events, Format.CSV.read(new StringReader(write(Format.CSV, events))));
        assertEquals(List.of(new NoiseEvent(5, 0, 8, Double.NaN, 1.0, Double.NaN, Double.NaN, Integer.MAX_VALUE)),
                Format.JSON_LINES.read(new StringReader(write(Format.JSON_LINES, events))));
    }

    @Test
    void filesAreUtf8() throws IOException {
        Path dir = Files.createTempDirectory("trace-utf8");
        try {
            Path file = dir.resolve("t.jsonl");
            TraceWriter writer = Format.JSON_LINES.open(file);
            writer.onEvent(TraceFixtures.allKinds().get(6));
            writer.close();
            String text = Files.readString(file, StandardCharsets.UTF_8);
            assertTrue(text.contains("é 漢字 \uD83D\uDE00"), text);
        } finally {
            try (var files = Files.list(dir)) {
                for (Path p : files.toList()) {
                    Files.delete(p);
                }
            }
            Files.delete(dir);
        }
    }
}
