package dev.riskmin.diagnostics.sink;

import dev.riskmin.diagnostics.DiagnosticEvent;
import dev.riskmin.diagnostics.EventKind;
import dev.riskmin.util.Arguments;

import java.io.BufferedReader;
import java.io.IOException;
import java.io.Reader;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.regex.Pattern;

/**
 * Reads the traces of {@link CsvTraceWriter} and {@link JsonLinesTraceWriter} back into events, so
 * that a recorded run can be inspected, compared or reported later. Records written by those
 * writers read back equal (record equality: NaN equals NaN, -0.0 differs from 0.0), except that the
 * JSON format turns infinities into NaN (see {@link JsonLinesTraceWriter}).
 *
 * <p>Both readers are strict: a malformed record throws {@link IllegalArgumentException} naming the
 * line (CSV: the line where the record starts) and the column or member. CSV columns may come in
 * any order and unknown columns are ignored; JSON members unknown to the record's kind are ignored.
 * The readers do not close the given {@link Reader}.
 */
public final class TraceReader {
    private static final Pattern DECIMAL = Pattern.compile(
            "[+-]?(NaN|Infinity|([0-9]+(\\.[0-9]*)?|\\.[0-9]+)([eE][+-]?[0-9]+)?)");
    private static final Pattern INTEGER = Pattern.compile("-?[0-9]+");

    private TraceReader() {
    }

    /**
     * Reads a CSV trace (RFC 4180; CRLF or LF line ends; a leading byte-order mark is skipped).
     *
     * @throws IOException              if the reader fails
     * @throws IllegalArgumentException if the header lacks a column or a row is malformed, naming the line
     */
    public static List<DiagnosticEvent> csv(Reader in) throws IOException {
        Arguments.notNull("in", in);
        CsvRecords records = new CsvRecords(in instanceof BufferedReader ? in : new BufferedReader(in));
        List<String> header = records.next();
        if (header == null) {
            throw new IllegalArgumentException("line 1: the CSV trace has no header");
        }
        Map<String, Integer> index = new HashMap<>();
        for (int c = 0; c < header.size(); c++) {
            index.putIfAbsent(header.get(c), c);
        }
        for (String column : TraceSchema.COLUMNS) {
            if (!index.containsKey(column)) {
                throw new IllegalArgumentException("line 1: the CSV header lacks the column " + column);
            }
        }
        List<DiagnosticEvent> events = new ArrayList<>();
        while (true) {
            int line = records.line;
            List<String> cells = records.next();
            if (cells == null) {
                return events;
            }
            if (cells.size() == 1 && cells.get(0).isEmpty() && !records.lastQuoted.get(0)) {
                continue; // a blank line
            }
            if (cells.size() != header.size()) {
                throw new IllegalArgumentException("line " + line + ": " + cells.size() + " cells, the header has "
                        + header.size());
            }
            List<Boolean> quoted = List.copyOf(records.lastQuoted);
            String where = "line " + line;
            EventKind kind = TraceSchema.kind(cells.get(index.get("kind")), where);
            events.add(TraceSchema.decode(kind, new CsvSource(cells, quoted, index, where)));
        }
    }

    /**
     * Reads a JSON-lines trace: one object per line; blank lines are skipped.
     *
     * @throws IOException              if the reader fails
     * @throws IllegalArgumentException if a line is not a strict JSON object or lacks a member, naming the line
     */
    public static List<DiagnosticEvent> jsonLines(Reader in) throws IOException {
        Arguments.notNull("in", in);
        BufferedReader reader = in instanceof BufferedReader b ? b : new BufferedReader(in);
        List<DiagnosticEvent> events = new ArrayList<>();
        String text;
        int line = 0;
        while ((text = reader.readLine()) != null) {
            line++;
            if (line == 1 && text.startsWith("\uFEFF")) {
                text = text.substring(1);
            }
            if (text.isBlank()) {
                continue;
            }
            String where = "line " + line;
            Map<String, Object> members = JsonText.object(text, where);
            Object kind = members.get("kind");
            EventKind k = TraceSchema.kind(kind instanceof String s ? s : null, where);
            events.add(TraceSchema.decode(k, new JsonSource(members, where)));
        }
        return events;
    }

    /** Reads a CSV trace from a UTF-8 file. */
    public static List<DiagnosticEvent> csv(Path file) throws IOException {
        try (Reader in = Files.newBufferedReader(Arguments.notNull("file", file), StandardCharsets.UTF_8)) {
            return csv(in);
        }
    }

    /** Reads a JSON-lines trace from a UTF-8 file. */
    public static List<DiagnosticEvent> jsonLines(Path file) throws IOException {
        try (Reader in = Files.newBufferedReader(Arguments.notNull("file", file), StandardCharsets.UTF_8)) {
            return jsonLines(in);
        }
    }

    private static double decimal(String text, String where, String name) {
        if (!DECIMAL.matcher(text).matches()) {
            throw new IllegalArgumentException(where + ": " + name + " (" + text + ") is not a number");
        }
        return Double.parseDouble(text);
    }

    private static long integer(String text, String where, String name) {
        if (!INTEGER.matcher(text).matches()) {
            throw new IllegalArgumentException(where + ": " + name + " (" + text + ") is not an integer");
        }
        try {
            return Long.parseLong(text);
        } catch (NumberFormatException e) {
            throw new IllegalArgumentException(where + ": " + name + " (" + text + ") does not fit a long");
        }
    }

    /** Splits RFC 4180 records; quoted cells may hold commas, quotes and line breaks. */
    private static final class CsvRecords {
        final Reader in;
        final List<Boolean> lastQuoted = new ArrayList<>();
        int line = 1;
        boolean first = true;

        CsvRecords(Reader in) {
            this.in = in;
        }

        List<String> next() throws IOException {
            int ch = in.read();
            if (first) {
                first = false;
                if (ch == '\uFEFF') {
                    ch = in.read();
                }
            }
            if (ch < 0) {
                return null;
            }
            int start = line;
            List<String> cells = new ArrayList<>();
            lastQuoted.clear();
            StringBuilder cell = new StringBuilder();
            boolean quoted = false;
            boolean afterQuote = false;
            while (true) {
                if (ch < 0) {
                    if (quoted && !afterQuote) {
                        throw new IllegalArgumentException("line " + start + ": a quoted cell is not closed");
                    }
                    cells.add(cell.toString());
                    lastQuoted.add(quoted);
                    return cells;
                }
                if (quoted && !afterQuote) {
                    if (ch == '"') {
                        afterQuote = true;
                    } else {
                        if (ch == '\n') {
                            line++;
                        }
                        cell.append((char) ch);
                    }
                    ch = in.read();
                    continue;
                }
                if (afterQuote && ch == '"') {
                    cell.append('"'); // a doubled quote inside a quoted cell
                    afterQuote = false;
                    ch = in.read();
                    continue;
                }
                if (ch == ',' || ch == '\n' || ch == '\r') {
                    cells.add(cell.toString());
                    lastQuoted.add(quoted);
                    cell.setLength(0);
                    quoted = false;
                    afterQuote = false;
                    if (ch == ',') {
                        ch = in.read();
                        continue;
                    }
                    if (ch == '\r') {
                        ch = in.read();
                        if (ch != '\n') {
                            throw new IllegalArgumentException("line " + line + ": a CR not followed by LF"
                                    + " outside quotes");
                        }
                    }
                    line++;
                    return cells;
                }
                if (afterQuote) {
                    throw new IllegalArgumentException("line " + line + ": text after the closing quote of cell "
                            + (cells.size() + 1));
                }
                if (ch == '"') {
                    if (cell.length() > 0) {
                        throw new IllegalArgumentException("line " + line + ": a quote inside unquoted cell "
                                + (cells.size() + 1));
                    }
                    quoted = true;
                } else {
                    cell.append((char) ch);
                }
                ch = in.read();
            }
        }
    }

    private static final class CsvSource implements TraceSchema.Source {
        final List<String> cells;
        final List<Boolean> quoted;
        final Map<String, Integer> index;
        final String where;

        CsvSource(List<String> cells, List<Boolean> quoted, Map<String, Integer> index, String where) {
            this.cells = cells;
            this.quoted = quoted;
            this.index = index;
            this.where = where;
        }

        String cell(String name) {
            return cells.get(index.get(name));
        }

        @Override
        public long integer(String name) {
            return TraceReader.integer(cell(name), where, name);
        }

        @Override
        public double real(String name) {
            return decimal(cell(name), where, name);
        }

        @Override
        public String text(String name) {
            int c = index.get(name);
            String text = cells.get(c);
            return text.isEmpty() && !quoted.get(c) ? null : text;
        }

        @Override
        public Map<String, Double> figures(String name) {
            String text = cell(name);
            Map<String, Double> figures = new LinkedHashMap<>();
            int i = 0;
            int n = text.length();
            while (i < n) {
                StringBuilder key = new StringBuilder();
                while (i < n && text.charAt(i) != '=') {
                    char ch = text.charAt(i);
                    if (ch == ';') {
                        throw new IllegalArgumentException(where + ": figures: a pair without '=' in " + text);
                    }
                    if (ch == '\\' && i + 1 < n) {
                        ch = text.charAt(++i);
                    }
                    key.append(ch);
                    i++;
                }
                if (i >= n) {
                    throw new IllegalArgumentException(where + ": figures: a pair without '=' in " + text);
                }
                int end = text.indexOf(';', ++i);
                end = end < 0 ? n : end;
                String name2 = key.toString();
                if (figures.put(name2, decimal(text.substring(i, end), where, "figures." + name2)) != null) {
                    throw new IllegalArgumentException(where + ": figures: the name " + name2 + " appears twice");
                }
                i = end + 1;
            }
            return figures;
        }

        @Override
        public String where() {
            return where;
        }
    }

    private static final class JsonSource implements TraceSchema.Source {
        final Map<String, Object> members;
        final String where;

        JsonSource(Map<String, Object> members, String where) {
            this.members = members;
            this.where = where;
        }

        Object member(String name) {
            if (!members.containsKey(name)) {
                throw new IllegalArgumentException(where + ": the member \"" + name + "\" is missing");
            }
            return members.get(name);
        }

        @Override
        public long integer(String name) {
            Object v = member(name);
            if (!(v instanceof JsonText.Number num)) {
                throw new IllegalArgumentException(where + ": " + name + " (" + v + ") is not an integer");
            }
            return TraceReader.integer(num.token(), where, name);
        }

        @Override
        public double real(String name) {
            return real(member(name), name);
        }

        private double real(Object v, String name) {
            if (v == null) {
                return Double.NaN;
            }
            if (!(v instanceof JsonText.Number num)) {
                throw new IllegalArgumentException(where + ": " + name + " (" + v + ") is not a number");
            }
            return Double.parseDouble(num.token());
        }

        @Override
        public String text(String name) {
            Object v = member(name);
            if (v != null && !(v instanceof String)) {
                throw new IllegalArgumentException(where + ": " + name + " (" + v + ") is not a string");
            }
            return (String) v;
        }

        @Override
        public Map<String, Double> figures(String name) {
            Object v = member(name);
            if (!(v instanceof Map<?, ?> map)) {
                throw new IllegalArgumentException(where + ": " + name + " (" + v + ") is not an object");
            }
            Map<String, Double> figures = new LinkedHashMap<>();
            for (Map.Entry<?, ?> e : map.entrySet()) {
                figures.put((String) e.getKey(), real(e.getValue(), name + "." + e.getKey()));
            }
            return figures;
        }

        @Override
        public String where() {
            return where;
        }
    }
}
