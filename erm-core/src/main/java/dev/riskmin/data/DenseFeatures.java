package dev.riskmin.data;

import java.util.Arrays;

/**
 * Dense features stored as one flat row-major array: x<sub>ij</sub> = {@code values[i·d + j]}.
 * One contiguous array (rather than one array per row) lets a pass over the data stream through
 * memory in order.
 */
public final class DenseFeatures implements FeatureMatrix {
    private final double[] values;
    private final int rows;
    private final int columns;

    private DenseFeatures(double[] values, int rows, int columns) {
        this.values = values;
        this.rows = rows;
        this.columns = columns;
    }

    /**
     * Copies and validates a rectangular array of rows.
     *
     * @param x read only; every row must have the same length and hold finite values
     * @throws IllegalArgumentException naming the row (and column) if x is empty, ragged or not finite
     */
    public static DenseFeatures of(double[][] x) {
        if (x == null) {
            throw new NullPointerException("features must not be null");
        }
        if (x.length == 0) {
            throw new IllegalArgumentException("features have no rows");
        }
        if (x[0] == null) {
            throw new IllegalArgumentException("features row 0 is null");
        }
        int d = x[0].length;
        if (d == 0) {
            throw new IllegalArgumentException("features row 0 has no columns");
        }
        long size = (long) x.length * d;
        if (size > Integer.MAX_VALUE - 8) {
            throw new IllegalArgumentException("features of " + x.length + " rows by " + d
                    + " columns exceed the largest Java array (" + size + " entries)");
        }
        double[] flat = new double[(int) size];
        for (int i = 0; i < x.length; i++) {
            double[] row = x[i];
            if (row == null) {
                throw new IllegalArgumentException("features row " + i + " is null");
            }
            if (row.length != d) {
                throw new IllegalArgumentException("features row " + i + " has " + row.length
                        + " columns, but row 0 has " + d);
            }
            System.arraycopy(row, 0, flat, i * d, d);
        }
        requireFinite(flat, x.length, d);
        return new DenseFeatures(flat, x.length, d);
    }

    /**
     * Wraps (when {@code copy} is false) or copies a flat row-major array after validating it.
     * A wrapped array must not be changed by the caller while any fit uses it.
     *
     * @param values read only; length rows·columns, finite
     * @throws IllegalArgumentException naming the offending size or entry
     */
    public static DenseFeatures ofFlat(double[] values, int rows, int columns, boolean copy) {
        if (values == null) {
            throw new NullPointerException("features must not be null");
        }
        if (rows < 1) {
            throw new IllegalArgumentException("rows (" + rows + ") must be >= 1");
        }
        if (columns < 1) {
            throw new IllegalArgumentException("columns (" + columns + ") must be >= 1");
        }
        if ((long) rows * columns != values.length) {
            throw new IllegalArgumentException("flat features have " + values.length + " entries, but rows ("
                    + rows + ") x columns (" + columns + ") = " + (long) rows * columns);
        }
        requireFinite(values, rows, columns);
        return new DenseFeatures(copy ? values.clone() : values, rows, columns);
    }

    private static void requireFinite(double[] flat, int rows, int d) {
        for (int k = 0; k < flat.length; k++) {
            if (!Double.isFinite(flat[k])) {
                throw new IllegalArgumentException("x[" + (k / d) + ", " + (k % d) + "] is " + flat[k]
                        + " (features must be finite)");
            }
        }
    }

    /**
     * The backing row-major array, not a copy: read only. Hot loops index it as
     * {@code values[i * columns() + j]}.
     */
    public double[] values() {
        return values;
    }

    @Override
    public int rows() {
        return rows;
    }

    @Override
    public int columns() {
        return columns;
    }

    @Override
    public long storedEntries() {
        return values.length;
    }

    @Override
    public double get(int row, int column) {
        return values[row * columns + column];
    }

    @Override
    public double dot(int row, double[] h, int offset) {
        final double[] x = values;
        final int d = columns;
        int base = row * d;
        // Four partial sums break the add dependency chain; the result differs from a plain
        // left-to-right sum only by rounding, and is the same on every run.
        double s0 = 0, s1 = 0, s2 = 0, s3 = 0;
        int j = 0;
        for (; j + 3 < d; j += 4) {
            s0 += x[base + j] * h[offset + j];
            s1 += x[base + j + 1] * h[offset + j + 1];
            s2 += x[base + j + 2] * h[offset + j + 2];
            s3 += x[base + j + 3] * h[offset + j + 3];
        }
        for (; j < d; j++) {
            s0 += x[base + j] * h[offset + j];
        }
        return (s0 + s1) + (s2 + s3);
    }

    @Override
    public void addRow(int row, double scale, double[] g, int offset) {
        final double[] x = values;
        final int d = columns;
        int base = row * d;
        for (int j = 0; j < d; j++) {
            g[offset + j] += scale * x[base + j];
        }
    }

    @Override
    public double rowSquaredNorm(int row) {
        double s = 0;
        int base = row * columns;
        for (int j = 0; j < columns; j++) {
            double v = values[base + j];
            s += v * v;
        }
        return s;
    }

    @Override
    public double[] rowCopy(int row) {
        return Arrays.copyOfRange(values, row * columns, (row + 1) * columns);
    }
}
