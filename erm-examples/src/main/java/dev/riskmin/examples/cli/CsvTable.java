package dev.riskmin.examples.cli;

import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVParser;
import org.apache.commons.csv.CSVRecord;
import org.apache.commons.csv.DuplicateHeaderMode;

import java.io.IOException;
import java.io.StringReader;
import java.io.UncheckedIOException;
import java.nio.charset.CharacterCodingException;
import java.nio.charset.StandardCharsets;
import java.nio.file.AccessDeniedException;
import java.nio.file.Files;
import java.nio.file.NoSuchFileException;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashSet;
import java.util.List;
import java.util.Set;
import java.util.regex.Pattern;

/**
 * The numeric columns of a CSV file that a fit needs: the target y and the feature columns x, one
 * row per record, with the line each record starts on. Parsing is done by Apache Commons CSV
 * (RFC 4180: Shafranovich, IETF, 2005 — quoted cells, doubled quotes, cells spanning lines) with a
 * header row, an optional comment marker (lines starting with it are skipped, anywhere in the file)
 * and blank lines skipped. Cells are trimmed. Columns not selected may hold anything.
 *
 * <p>A number is a plain decimal, {@code [+-]?(d+(.d*)?|.d+)([eE][+-]?d+)?}: no hexadecimal, no type
 * suffix, no NaN or infinity, no empty cell. Every failure is an {@link InputException} naming the
 * file, the line (1-based, counting every line of the file) and the column by name and position.
 */
final class CsvTable {
    private static final Pattern DECIMAL = Pattern.compile("[+-]?([0-9]+(\\.[0-9]*)?|\\.[0-9]+)([eE][+-]?[0-9]+)?");

    final List<String> header;
    final String target;
    final List<String> features;
    final double[][] x;
    final double[] y;
    /** The line each row starts on. */
    final int[] lines;

    private CsvTable(List<String> header, String target, List<String> features, double[][] x, double[] y,
                     int[] lines) {
        this.header = header;
        this.target = target;
        this.features = features;
        this.x = x;
        this.y = y;
        this.lines = lines;
    }

    int rows() {
        return y.length;
    }

    /**
     * Reads the target column and the feature columns (all columns but the target when
     * {@code featureNames} is empty).
     *
     * @param comment the comment marker, or null for none
     * @throws InputException if the file cannot be read as UTF-8 CSV text, has no header or no data
     *                        row, lacks a named column, has a row with a different number of cells
     *                        than the header, or a selected cell is not a finite decimal number
     */
    static CsvTable read(Path file, char delimiter, Character comment, String target, List<String> featureNames)
            throws InputException {
        String text = readText(file);
        if (text.startsWith("\uFEFF")) {
            text = text.substring(1); // a byte-order mark is not part of the first column's name
        }
        Lines lineIndex = new Lines(text, comment);
        CSVFormat format = CSVFormat.RFC4180.builder()
                .setDelimiter(delimiter)
                .setCommentMarker(comment)
                .setHeader()
                .setSkipHeaderRecord(true)
                .setIgnoreEmptyLines(true)
                .setTrim(true)
                .setDuplicateHeaderMode(DuplicateHeaderMode.DISALLOW)
                .setAllowMissingColumnNames(false)
                .get();
        try (CSVParser parser = CSVParser.parse(new StringReader(text), format)) {
            List<String> header = List.copyOf(parser.getHeaderNames());
            if (header.isEmpty()) {
                throw new InputException(file + ": the file has no header row (the first line that is not"
                        + (comment != null ? " a comment or" : "") + " blank must name the columns)");
            }
            int targetColumn = column(file, header, target, "--target");
            List<String> features = new ArrayList<>(featureNames);
            if (features.isEmpty()) {
                for (String name : header) {
                    if (!name.equals(target)) {
                        features.add(name);
                    }
                }
                if (features.isEmpty()) {
                    throw new InputException(file + ": the file has only the target column '" + target
                            + "', no feature column");
                }
            }
            int[] featureColumns = new int[features.size()];
            for (int j = 0; j < featureColumns.length; j++) {
                featureColumns[j] = column(file, header, features.get(j), "--features");
            }
            List<double[]> rows = new ArrayList<>();
            List<Double> targets = new ArrayList<>();
            List<Integer> starts = new ArrayList<>();
            for (CSVRecord record : parser) {
                if (blank(record)) {
                    continue;
                }
                int line = lineIndex.recordLine(record.getCharacterPosition());
                if (record.size() != header.size()) {
                    throw new InputException(file + ": line " + line + " has " + record.size() + " cell"
                            + (record.size() == 1 ? "" : "s") + ", the header " + header.size());
                }
                double[] row = new double[featureColumns.length];
                for (int j = 0; j < row.length; j++) {
                    row[j] = number(file, record, line, header, featureColumns[j]);
                }
                targets.add(number(file, record, line, header, targetColumn));
                rows.add(row);
                starts.add(line);
            }
            if (rows.isEmpty()) {
                throw new InputException(file + ": the file has a header but no data row");
            }
            double[] y = new double[targets.size()];
            int[] lines = new int[y.length];
            for (int i = 0; i < y.length; i++) {
                y[i] = targets.get(i);
                lines[i] = starts.get(i);
            }
            return new CsvTable(header, target, List.copyOf(features), rows.toArray(new double[0][]), y, lines);
        } catch (IOException | UncheckedIOException e) {
            // Commons CSV reports malformed quoting as an IOException whose message names the line.
            throw new InputException(file + ": not readable as CSV: " + e.getMessage(), e);
        } catch (IllegalArgumentException e) {
            // A duplicate or missing column name in the header.
            throw new InputException(file + ": the header row is not usable: " + e.getMessage(), e);
        }
    }

    private static String readText(Path file) throws InputException {
        try {
            if (Files.isDirectory(file)) {
                throw new InputException(file + ": is a directory, not a CSV file");
            }
            return Files.readString(file, StandardCharsets.UTF_8);
        } catch (NoSuchFileException e) {
            throw new InputException(file + ": no such file", e);
        } catch (AccessDeniedException e) {
            throw new InputException(file + ": not readable (permission denied)", e);
        } catch (CharacterCodingException e) {
            throw new InputException(file + ": not UTF-8 text", e);
        } catch (IOException e) {
            throw new InputException(file + ": cannot be read: " + e, e);
        }
    }

    private static int column(Path file, List<String> header, String name, String option) throws InputException {
        int c = header.indexOf(name);
        if (c < 0) {
            throw new InputException(file + ": no column named '" + name + "' (from " + option
                    + "); the header has " + quoted(header));
        }
        return c;
    }

    private static String quoted(List<String> names) {
        List<String> q = new ArrayList<>(names.size());
        for (String n : names) {
            q.add("'" + n + "'");
        }
        return String.join(", ", q);
    }

    private static boolean blank(CSVRecord record) {
        for (String cell : record) {
            if (!cell.isEmpty()) {
                return false;
            }
        }
        return true;
    }

    private static double number(Path file, CSVRecord record, int line, List<String> header, int column)
            throws InputException {
        String cell = record.get(column);
        String where = file + ": line " + line + ", column '" + header.get(column) + "' (column " + (column + 1) + ")";
        if (cell.isEmpty()) {
            throw new InputException(where + ": the cell is empty, a number is needed");
        }
        if (!DECIMAL.matcher(cell).matches()) {
            throw new InputException(where + ": '" + excerpt(cell) + "' is not a number");
        }
        double v = Double.parseDouble(cell);
        if (!Double.isFinite(v)) {
            throw new InputException(where + ": '" + excerpt(cell) + "' is beyond the range of a double");
        }
        return v;
    }

    private static String excerpt(String cell) {
        String oneLine = cell.replace("\r", "\\r").replace("\n", "\\n");
        return oneLine.length() <= 40 ? oneLine : oneLine.substring(0, 40) + "…";
    }

    /** Line starts of the text, to turn a record's character position into its line. */
    private static final class Lines {
        private final String text;
        private final Character comment;
        private final int[] starts;

        Lines(String text, Character comment) {
            this.text = text;
            this.comment = comment;
            int count = 1;
            for (int i = 0; i < text.length(); i++) {
                if (text.charAt(i) == '\n') {
                    count++;
                }
            }
            int[] s = new int[count];
            int k = 1;
            for (int i = 0; i < text.length(); i++) {
                if (text.charAt(i) == '\n') {
                    s[k++] = i + 1;
                }
            }
            this.starts = s;
        }

        /**
         * The parser's position for a record is where it started reading, before the blank and
         * comment lines it skipped on the way: the record starts on the first other line from there.
         */
        int recordLine(long position) {
            int index = Arrays.binarySearch(starts, (int) position);
            int line = index >= 0 ? index : -index - 2;
            while (line < starts.length - 1 && skipped(line)) {
                line++;
            }
            return line + 1;
        }

        private boolean skipped(int line) {
            int from = starts[line];
            int to = line + 1 < starts.length ? starts[line + 1] - 1 : text.length();
            String content = text.substring(from, to);
            if (content.endsWith("\r")) {
                content = content.substring(0, content.length() - 1);
            }
            return content.isEmpty() || (comment != null && content.charAt(0) == comment);
        }
    }

    /** @return the first name that occurs twice in the list, or null when all are distinct */
    static String firstRepeat(List<String> names) {
        Set<String> seen = new HashSet<>();
        for (String n : names) {
            if (!seen.add(n)) {
                return n;
            }
        }
        return null;
    }
}
