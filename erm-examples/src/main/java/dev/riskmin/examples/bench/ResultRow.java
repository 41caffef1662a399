package dev.riskmin.examples.bench;

import java.util.Locale;

/**
 * One line of the result table: a measured figure, the baseline it is divided by, their ratio and,
 * for a figure with a target, whether the ratio meets it.
 *
 * @param id       the figure's number and case, e.g. "1 d=100 B=1"
 * @param figure   what was measured, with its value and unit
 * @param baseline what it is compared with, with its value and unit
 * @param ratio    figure / baseline in the sense the target states (NaN when not measured)
 * @param target   the target, or null for a figure reported for information
 * @param note     why a figure was not measured, or a remark; empty if none
 */
public record ResultRow(String id, String figure, String baseline, double ratio, Target target, String note) {
    private static final String PREFIX = "row";
    private static final String SEPARATOR = "\t";

    public ResultRow {
        id = clean(id);
        figure = clean(figure);
        baseline = clean(baseline);
        note = clean(note);
    }

    /** A figure that could not be measured in this run (e.g. a feature not yet in the core). */
    public static ResultRow unavailable(String id, String figure, Target target, String note) {
        return new ResultRow(id, figure, "—", Double.NaN, target, note);
    }

    /** @return PASS, FAIL, info (no target) or n/a (not measured) */
    public String verdict() {
        if (Double.isNaN(ratio)) {
            return "n/a";
        }
        if (target == null) {
            return "info";
        }
        return target.met(ratio) ? "PASS" : "FAIL";
    }

    /** @return the ratio with three significant digits, or "—" */
    public String ratioText() {
        return Double.isNaN(ratio) ? "—" : String.format(Locale.ROOT, "%.3g", ratio);
    }

    /** One line that {@link #parse} reads back: how a figure's JVM hands its rows to the suite. */
    public String encode() {
        return String.join(SEPARATOR, PREFIX, id, figure, baseline, Double.toString(ratio),
                target == null ? "" : (target.atLeast() ? ">=" : "<=") + target.bound(), note);
    }

    /** @return whether the line is an encoded row */
    public static boolean isEncoded(String line) {
        return line.startsWith(PREFIX + SEPARATOR);
    }

    /**
     * @throws IllegalArgumentException naming the line if it is not an encoded row
     */
    public static ResultRow parse(String line) {
        String[] f = line.split(SEPARATOR, -1);
        if (f.length != 7 || !f[0].equals(PREFIX)) {
            throw new IllegalArgumentException("not an encoded result row (" + f.length + " fields): " + line);
        }
        Target target = null;
        if (!f[5].isEmpty()) {
            double bound = Double.parseDouble(f[5].substring(2));
            target = f[5].startsWith(">=") ? Target.atLeast(bound) : Target.atMost(bound);
        }
        return new ResultRow(f[1], f[2], f[3], Double.parseDouble(f[4]), target, f[6]);
    }

    private static String clean(String s) {
        return s == null ? "" : s.replace('\t', ' ').replace('\n', ' ').replace('|', '/');
    }
}
