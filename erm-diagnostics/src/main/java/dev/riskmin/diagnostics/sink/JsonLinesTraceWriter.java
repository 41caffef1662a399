package dev.riskmin.diagnostics.sink;

import dev.riskmin.diagnostics.DiagnosticEvent;
import dev.riskmin.diagnostics.EventKind;
import dev.riskmin.util.Arguments;
import org.slf4j.LoggerFactory;

import java.io.IOException;
import java.io.Writer;
import java.nio.file.Path;
import java.util.Map;
import java.util.Optional;

/**
 * Writes every event as one JSON object per line (JSON: RFC 8259, Bray, IETF, 2017; one object per
 * line is common practice for logs and traces, no standard), for example
 *
 * <pre>{"kind":"noise","step":1200,"epoch":3,"batchSize":16,"traceCovariance":0.231,...}</pre>
 *
 * <p>Members: {@code kind} (lower case), {@code step}, {@code epoch}, then the event record's
 * components under their own names; a verdict has {@code condition}, {@code summary},
 * {@code advice} and {@code figures} (an object of name → number, names in order). Numbers are
 * written in {@link Double#toString(double)} form, which reads back to the same double, -0.0
 * included. Strings escape every control character, U+2028, U+2029 and lone surrogates.
 *
 * <p><b>Non-finite numbers:</b> JSON has no NaN or infinity, so NaN, +Infinity and -Infinity are
 * written as {@code null}, and {@link TraceReader#jsonLines} reads {@code null} back as NaN: an
 * infinite figure comes back as NaN. Use the CSV format when infinities must survive a round trip.
 * A null text is written as {@code null} and reads back as null.
 *
 * <p>Not thread-safe for events (the fitting thread delivers them); {@link #close()}, {@link #flush()}
 * and the accessors may be called from any thread. See {@link TraceWriter} for buffering and failure.
 */
public final class JsonLinesTraceWriter implements TraceWriter {
    private final TraceOutput output;
    private final StringBuilder line = new StringBuilder(256);
    private final TraceSchema.Target target = new TraceSchema.Target() {
        @Override
        public void integer(String name, long value) {
            member(name).append(value);
        }

        @Override
        public void real(String name, double value) {
            JsonText.number(member(name), value);
        }

        @Override
        public void text(String name, String value) {
            if (value == null) {
                member(name).append("null");
            } else {
                JsonText.string(member(name), value);
            }
        }

        @Override
        public void figures(String name, Map<String, Double> value) {
            StringBuilder b = member(name).append('{');
            boolean[] first = {true};
            value.keySet().stream().sorted().forEach(key -> {
                if (!first[0]) {
                    b.append(',');
                }
                first[0] = false;
                JsonText.string(b, key);
                b.append(':');
                JsonText.number(b, value.get(key));
            });
            b.append('}');
        }
    };

    private JsonLinesTraceWriter(TraceOutput output) {
        this.output = output;
    }

    /** A writer to the given stream, which it then owns (closes on {@link #close()}). */
    public static JsonLinesTraceWriter to(Writer out) {
        Arguments.notNull("out", out);
        return new JsonLinesTraceWriter(TraceOutput.of(out, "JSON lines to " + out.getClass().getSimpleName(),
                LoggerFactory.getLogger(JsonLinesTraceWriter.class)));
    }

    /**
     * A writer to a file in UTF-8, created or truncated now.
     *
     * @throws IOException if the file cannot be opened (before any fit: opening is configuration)
     */
    public static JsonLinesTraceWriter open(Path file) throws IOException {
        Arguments.notNull("file", file);
        return new JsonLinesTraceWriter(TraceOutput.open(file, "JSON-lines file " + file,
                LoggerFactory.getLogger(JsonLinesTraceWriter.class)));
    }

    @Override
    public void onEvent(DiagnosticEvent event) {
        line.setLength(0);
        line.append('{');
        TraceSchema.encode(event, target);
        line.append("}\n");
        output.write(line, event.kind() == EventKind.VERDICT);
    }

    private StringBuilder member(String name) {
        if (line.length() > 1) {
            line.append(',');
        }
        JsonText.string(line, name);
        return line.append(':');
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
}
