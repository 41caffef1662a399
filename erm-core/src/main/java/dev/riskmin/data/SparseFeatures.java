package dev.riskmin.data;

/**
 * Sparse features in compressed sparse row (CSR) form: the entries of row i are
 * {@code values[k]} at column {@code columnIndex[k]} for k in [{@code rowStart[i]}, {@code rowStart[i+1]}).
 * Column indices within a row are strictly increasing (checked), so a row never holds a column twice.
 */
public final class SparseFeatures implements FeatureMatrix {
    private final int rows;
    private final int columns;
    private final int[] rowStart;
    private final int[] columnIndex;
    private final double[] values;

    private SparseFeatures(int rows, int columns, int[] rowStart, int[] columnIndex, double[] values) {
        this.rows = rows;
        this.columns = columns;
        this.rowStart = rowStart;
        this.columnIndex = columnIndex;
        this.values = values;
    }

    /**
     * Copies and validates CSR arrays.
     *
     * @param rowStart    read only; length rows + 1, starts at 0, non-decreasing, ends at values.length
     * @param columnIndex read only; strictly increasing within each row, each in [0, columns)
     * @param values      read only; finite
     * @throws IllegalArgumentException naming the row, entry and value that break the rules above
     */
    public static SparseFeatures of(int rows, int columns, int[] rowStart, int[] columnIndex, double[] values) {
        if (rowStart == null || columnIndex == null || values == null) {
            throw new NullPointerException("CSR arrays must not be null");
        }
        if (rows < 1) {
            throw new IllegalArgumentException("rows (" + rows + ") must be >= 1");
        }
        if (columns < 1) {
            throw new IllegalArgumentException("columns (" + columns + ") must be >= 1");
        }
        if (rowStart.length != rows + 1) {
            throw new IllegalArgumentException("rowStart has " + rowStart.length + " entries, expected rows + 1 = "
                    + (rows + 1));
        }
        if (columnIndex.length != values.length) {
            throw new IllegalArgumentException("columnIndex has " + columnIndex.length + " entries but values has "
                    + values.length);
        }
        if (rowStart[0] != 0) {
            throw new IllegalArgumentException("rowStart[0] (" + rowStart[0] + ") must be 0");
        }
        if (rowStart[rows] != values.length) {
            throw new IllegalArgumentException("rowStart[" + rows + "] (" + rowStart[rows]
                    + ") must equal the number of values (" + values.length + ")");
        }
        // All row pointers are checked before any entry is read: a pointer beyond the end in the
        // middle (0, 5, 3 with 3 values) would otherwise index past the arrays in the first row.
        for (int i = 0; i < rows; i++) {
            if (rowStart[i + 1] < rowStart[i]) {
                throw new IllegalArgumentException("rowStart[" + (i + 1) + "] (" + rowStart[i + 1]
                        + ") is less than rowStart[" + i + "] (" + rowStart[i] + ")");
            }
        }
        for (int i = 0; i < rows; i++) {
            int from = rowStart[i];
            int to = rowStart[i + 1];
            int previous = -1;
            for (int k = from; k < to; k++) {
                int c = columnIndex[k];
                if (c < 0 || c >= columns) {
                    throw new IllegalArgumentException("row " + i + ": column index " + c + " is outside [0, "
                            + columns + ")");
                }
                if (c <= previous) {
                    throw new IllegalArgumentException("row " + i + ": column indices must increase, but " + c
                            + " follows " + previous);
                }
                if (!Double.isFinite(values[k])) {
                    throw new IllegalArgumentException("x[" + i + ", " + c + "] is " + values[k]
                            + " (features must be finite)");
                }
                previous = c;
            }
        }
        return new SparseFeatures(rows, columns, rowStart.clone(), columnIndex.clone(), values.clone());
    }

    /** The backing row pointers, not a copy: read only. */
    public int[] rowStart() {
        return rowStart;
    }

    /** The backing column indices, not a copy: read only. */
    public int[] columnIndex() {
        return columnIndex;
    }

    /** The backing values, not a copy: read only. */
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
        int lo = rowStart[row];
        int hi = rowStart[row + 1] - 1;
        while (lo <= hi) {
            int mid = (lo + hi) >>> 1;
            int c = columnIndex[mid];
            if (c < column) {
                lo = mid + 1;
            } else if (c > column) {
                hi = mid - 1;
            } else {
                return values[mid];
            }
        }
        return 0.0;
    }

    @Override
    public double dot(int row, double[] h, int offset) {
        double s = 0;
        for (int k = rowStart[row], end = rowStart[row + 1]; k < end; k++) {
            s += values[k] * h[offset + columnIndex[k]];
        }
        return s;
    }

    @Override
    public void addRow(int row, double scale, double[] g, int offset) {
        for (int k = rowStart[row], end = rowStart[row + 1]; k < end; k++) {
            g[offset + columnIndex[k]] += scale * values[k];
        }
    }

    @Override
    public double rowSquaredNorm(int row) {
        double s = 0;
        for (int k = rowStart[row], end = rowStart[row + 1]; k < end; k++) {
            s += values[k] * values[k];
        }
        return s;
    }
}
