package dev.riskmin.data;

/**
 * An n-by-d matrix of features x<sub>ij</sub>, one row per sample. The two implementations
 * are dense (one flat row-major {@code double[]}) and compressed sparse rows; fast paths switch
 * on the concrete type once per fit and then loop over the backing arrays directly.
 *
 * <p>All arrays passed to these methods are indexed from {@code offset}, so a parameter vector
 * holding several blocks (one per class) can be addressed without copying.
 */
public sealed interface FeatureMatrix permits DenseFeatures, SparseFeatures {

    /** @return n, the number of rows (samples) */
    int rows();

    /** @return d, the number of columns (features) */
    int columns();

    /** @return the number of stored entries (n·d when dense) */
    long storedEntries();

    /** @return x<sub>ij</sub>; for checks and reports, not for hot loops */
    double get(int row, int column);

    /**
     * @param h read only; {@code h[offset .. offset+d)} is used
     * @return Σ<sub>j</sub> x<sub>row,j</sub> h[offset + j]
     */
    double dot(int row, double[] h, int offset);

    /**
     * g[offset + j] += scale · x<sub>row,j</sub> for every column j.
     *
     * @param g written
     */
    void addRow(int row, double scale, double[] g, int offset);

    /** @return Σ<sub>j</sub> x<sub>row,j</sub>² */
    double rowSquaredNorm(int row);

    /** @return a dense copy of one row */
    default double[] rowCopy(int row) {
        double[] out = new double[columns()];
        for (int j = 0; j < out.length; j++) {
            out[j] = get(row, j);
        }
        return out;
    }
}
