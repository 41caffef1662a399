package dev.riskmin.testing;

import java.io.BufferedReader;
import java.io.IOException;
import java.io.InputStream;
import java.io.InputStreamReader;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * Reads the published reference data copied into test resources under {@code /reference/}:
 * a CSV with one header row of plain decimal numbers, and a {@code key = value} file of certified
 * values ('#' starts a comment). See each resource's header for its source.
 */
public final class ReferenceData {
    private final String[] header;
    private final double[][] rows;

    private ReferenceData(String[] header, double[][] rows) {
        this.header = header;
        this.rows = rows;
    }

    /** Loads {@code /reference/<name>.csv}; lines starting with '#' are comments. */
    public static ReferenceData csv(String name) {
        List<String> lines = lines("/reference/" + name + ".csv");
        String[] header = null;
        List<double[]> rows = new ArrayList<>();
        for (String line : lines) {
            if (line.isBlank() || line.startsWith("#")) {
                continue;
            }
            String[] cells = line.split(",");
            if (header == null) {
                header = cells;
                continue;
            }
            double[] row = new double[cells.length];
            for (int j = 0; j < cells.length; j++) {
                row[j] = Double.parseDouble(cells[j].trim());
            }
            rows.add(row);
        }
        return new ReferenceData(header, rows.toArray(new double[0][]));
    }

    /** Loads {@code /reference/<name>.certified.txt} as an ordered key → value map (values as written). */
    public static Map<String, String> certified(String name) {
        Map<String, String> out = new LinkedHashMap<>();
        for (String line : lines("/reference/" + name + ".certified.txt")) {
            String t = line.trim();
            if (t.isEmpty() || t.startsWith("#")) {
                continue;
            }
            int eq = t.indexOf('=');
            if (eq > 0) {
                out.put(t.substring(0, eq).trim(), t.substring(eq + 1).trim());
            }
        }
        return out;
    }

    private static List<String> lines(String resource) {
        InputStream in = ReferenceData.class.getResourceAsStream(resource);
        if (in == null) {
            throw new IllegalStateException("missing test resource " + resource);
        }
        List<String> out = new ArrayList<>();
        try (BufferedReader r = new BufferedReader(new InputStreamReader(in, StandardCharsets.UTF_8))) {
            for (String line = r.readLine(); line != null; line = r.readLine()) {
                out.add(line);
            }
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        return out;
    }

    /** @return the index of a header column */
    public int column(String name) {
        for (int j = 0; j < header.length; j++) {
            if (header[j].trim().equals(name)) {
                return j;
            }
        }
        throw new IllegalArgumentException("no column " + name);
    }

    /** @return one column as an array */
    public double[] columnValues(String name) {
        int j = column(name);
        double[] out = new double[rows.length];
        for (int i = 0; i < rows.length; i++) {
            out[i] = rows[i][j];
        }
        return out;
    }

    /** @return the given columns as rows of a matrix */
    public double[][] matrix(String... names) {
        double[][] out = new double[rows.length][names.length];
        for (int k = 0; k < names.length; k++) {
            int j = column(names[k]);
            for (int i = 0; i < rows.length; i++) {
                out[i][k] = rows[i][j];
            }
        }
        return out;
    }

    public int rows() {
        return rows.length;
    }
}
