package dev.riskmin.diagnostics.sink;

import dev.riskmin.diagnostics.DiagnosticEvent;
import dev.riskmin.diagnostics.EventKind;
import dev.riskmin.util.Arguments;
import org.slf4j.LoggerFactory;

import java.io.IOException;
import java.io.Writer;
import java.nio.file.Path;
import java.util.Arrays;
import java.util.Map;
import java.util.Optional;

/**
 * Writes every event as one row of comma-separated values (RFC 4180: Shafranovich, "Common Format
 * and MIME Type for Comma-Separated Values (CSV) Files", IETF, 2005), under a fixed header that
 * names every field of every event kind:
 *
 * <pre>kind,step,epoch,batchSize,traceCovariance,batchMeanVariance,gradientNormSquared,noiseScale,
 * suggestedBatchSize,cosine,meanCosine,descentShare,angleToOptimum,suboptimality,batchLoss,
 * smoothedBatchLoss,objective,heldOutLoss,gradientNorm,stepSize,test,statistic,threshold,decision,
 * detail,condition,summary,advice,figures</pre>
 *
 * (one line in the file). A row fills the columns of its kind and leaves the others empty. Records
 * end in CRLF, as the RFC asks.
 *
 * <p>Cells: numbers in {@link Double#toString(double)} form, which reads back to the same double
 * (NaN, Infinity, -Infinity and -0.0 included); kinds, decisions and conditions in lower case; text
 * in double quotes when it is empty or holds a comma, quote, CR or LF, with quotes doubled. An empty
 * unquoted cell in a text column of the row's kind means "no text" (null), a quoted empty cell the
 * empty string. The verdict's figures are one cell, {@code name=value} pairs joined by {@code ;} in
 * name order, with {@code \}, {@code =} and {@code ;} in names escaped by a backslash.
 * {@link TraceReader#csv} reads the rows back into equal records. Beyond the RFC's ASCII grammar,
 * cells carry any text as is; a file is written in UTF-8, where a lone surrogate (which UTF-8 cannot
 * carry) becomes '?'.
 *
 * <p>Not thread-safe for events (the fitting thread delivers them); {@link #close()}, {@link #flush()}
 * and the accessors may be called from any thread. See {@link TraceWriter} for buffering and failure.
 */
public final class CsvTraceWriter implements TraceWriter {
    static final String LINE_END = "\r\n";

    private final TraceOutput output;
    private final String[] cells = new String[TraceSchema.COLUMNS.size()];
    private final StringBuilder row = new StringBuilder(256);
    private final TraceSchema.Target target = new TraceSchema.Target() {
        @Override
        public void integer(String name, long value) {
            cells[column(name)] = Long.toString(value);
        }

        @Override
        public void real(String name, double value) {
            cells[column(name)] = Double.toString(value);
        }

        @Override
        public void text(String name, String value) {
            cells[column(name)] = value == null ? "" : quote(value, name.equals("kind"));
        }

        @Override
        public void figures(String name, Map<String, Double> value) {
            cells[column(name)] = quote(encodeFigures(value), false);
        }
    };

    private CsvTraceWriter(TraceOutput output) {
        this.output = output;
        output.header(String.join(",", TraceSchema.COLUMNS) + LINE_END);
    }

    /** A writer to the given stream, which it then owns (closes on {@link #close()}). */
    public static CsvTraceWriter to(Writer out) {
        Arguments.notNull("out", out);
        return new CsvTraceWriter(TraceOutput.of(out, "CSV to " + out.getClass().getSimpleName(),
                LoggerFactory.getLogger(CsvTraceWriter.class)));
    }

    /**
     * A writer to a file in UTF-8, created or truncated now.
     *
     * @throws IOException if the file cannot be opened (before any fit: opening is configuration)
     */
    public static CsvTraceWriter open(Path file) throws IOException {
        Arguments.notNull("file", file);
        return new CsvTraceWriter(TraceOutput.open(file, "CSV file " + file,
                LoggerFactory.getLogger(CsvTraceWriter.class)));
    }

    @Override
    public void onEvent(DiagnosticEvent event) {
        Arrays.fill(cells, "");
        TraceSchema.encode(event, target);
        row.setLength(0);
        for (int c = 0; c < cells.length; c++) {
            if (c > 0) {
                row.append(',');
            }
            row.append(cells[c]);
        }
        row.append(LINE_END);
        output.write(row, event.kind() == EventKind.VERDICT);
    }

    @Override
    public void flush() {
        output.flush();
    }

    @Override
    public void close() {
        output.close();
    }

    @Override
    public Optional<IOException> failure() {
        return Optional.ofNullable(output.failure());
    }

    @Override
    public long eventsWritten() {
        return output.records();
    }

    @Override
    public long droppedEvents() {
        return output.dropped();
    }

    static int column(String name) {
        int c = TraceSchema.COLUMNS.indexOf(name);
        if (c < 0) {
            throw new IllegalStateException("no column " + name);
        }
        return c;
    }

    /** Quotes text as RFC 4180 asks: when it is empty or holds a comma, quote, CR or LF. */
    static String quote(String text, boolean bare) {
        if (bare) {
            return text;
        }
        boolean needs = text.isEmpty();
        for (int i = 0; i < text.length() && !needs; i++) {
            char ch = text.charAt(i);
            needs = ch == ',' || ch == '"' || ch == '\r' || ch == '\n';
        }
        return needs ? '"' + text.replace("\"", "\"\"") + '"' : text;
    }

    static String encodeFigures(Map<String, Double> figures) {
        StringBuilder b = new StringBuilder();
        figures.keySet().stream().sorted().forEach(name -> {
            if (b.length() > 0) {
                b.append(';');
            }
            for (int i = 0; i < name.length(); i++) {
                char ch = name.charAt(i);
                if (ch == '\\' || ch == '=' || ch == ';') {
                    b.append('\\');
                }
                b.append(ch);
            }
            b.append('=').append(Double.toString(figures.get(name)));
        });
        return b.toString();
    }
}
