package dev.riskmin.examples.bench;

import java.util.ArrayList;
import java.util.List;

/**
 * Formats result rows as a Markdown table (columns: figure, measured, baseline, ratio, target,
 * result, note), padded so that it also reads as plain text.
 */
public final class ResultTable {
    private static final String[] HEADER = {"#", "measured", "baseline", "ratio", "target", "result", "note"};

    private ResultTable() {
    }

    /** @return the table, one line per row after the header and its rule, each line ending in '\n' */
    public static String format(List<ResultRow> rows) {
        List<String[]> cells = new ArrayList<>();
        cells.add(HEADER);
        for (ResultRow r : rows) {
            cells.add(new String[] {r.id(), r.figure(), r.baseline(), r.ratioText(),
                r.target() == null ? "—" : r.target().toString(), r.verdict(), r.note()});
        }
        int[] width = new int[HEADER.length];
        for (String[] line : cells) {
            for (int c = 0; c < width.length; c++) {
                width[c] = Math.max(width[c], line[c].length());
            }
        }
        StringBuilder out = new StringBuilder();
        for (int k = 0; k < cells.size(); k++) {
            appendLine(out, cells.get(k), width);
            if (k == 0) {
                String[] rule = new String[width.length];
                for (int c = 0; c < width.length; c++) {
                    rule[c] = "-".repeat(Math.max(3, width[c]));
                }
                appendLine(out, rule, width);
            }
        }
        return out.toString();
    }

    private static void appendLine(StringBuilder out, String[] line, int[] width) {
        out.append('|');
        for (int c = 0; c < width.length; c++) {
            out.append(' ').append(line[c]).append(" ".repeat(width[c] - line[c].length())).append(" |");
        }
        out.append('\n');
    }
}
