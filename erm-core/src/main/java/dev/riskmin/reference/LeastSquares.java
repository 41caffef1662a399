package dev.riskmin.reference;

import dev.riskmin.data.Dataset;
import dev.riskmin.data.DenseFeatures;
import dev.riskmin.data.FeatureMatrix;
import dev.riskmin.util.Arguments;
import org.ejml.data.DMatrixRMaj;
import org.ejml.dense.row.factory.DecompositionFactory_DDRM;
import org.ejml.interfaces.decomposition.QRDecomposition;

/**
 * Weighted least squares with an optional unpenalized intercept and an optional ridge penalty,
 * solved exactly by a Householder QR factorization:
 * <blockquote>
 *   minimize  (1/(2W)) Σ<sub>i</sub> w<sub>i</sub> (x<sub>i</sub>·β + b − y<sub>i</sub>)² + (λ/2)‖β‖²,   W = Σ<sub>i</sub> w<sub>i</sub>.
 * </blockquote>
 * This is the same problem as a {@code LinearObjective} with the squared loss and the penalty
 * {@code Penalty.l2(λ)}: its data term (1/n) Σ ω<sub>i</sub> (z<sub>i</sub> − y<sub>i</sub>)²/2 with
 * ω<sub>i</sub> = n w<sub>i</sub>/W equals the first term above, so the same λ means the same optimum
 * ({@link LeastSquaresSolution#parameters()} returns it in that objective's layout).
 *
 * <p>Multiplying the objective by 2W gives ‖√w ⊙ (Xβ + b1 − y)‖² + Wλ‖β‖², the residual norm of the
 * augmented system [√W<sub>d</sub> X; √(Wλ) I] β ≈ [√W<sub>d</sub> y; 0] (Hoerl &amp; Kennard,
 * "Ridge regression", Technometrics 12(1), 1970, for the estimator; the augmentation is common
 * practice), which stays a least-squares problem and is solved by QR: with A = QR,
 * R β = Q<sup>T</sup> y (Golub &amp; Van Loan, <i>Matrix Computations</i>, 4th ed., 2013, §5.3, the
 * full-rank least-squares problem; section from memory). Unlike the normal equations, whose
 * error grows with κ(X)², the QR solution's error grows with κ(X) (METHODS §12).
 *
 * @implNote With an intercept, every column and the target are first centred at their weighted
 * means; the intercept is then b = ȳ − x̄·β. This is exact (the intercept is unpenalized and the
 * centred columns are weight-orthogonal to the constant column), and it removes the constant
 * column's share of the condition number, which is what makes raw data such as NIST's Longley
 * solvable to many digits. The target is appended to A as one more column, so a single
 * factorization of [A | y] yields both R and Q<sup>T</sup>y without forming Q (Björck,
 * <i>Numerical Methods for Least Squares Problems</i>, SIAM 1996, §2.3; from memory).
 *
 * <p>Immutable and thread-safe. A reference solver: it favours clarity and accuracy over speed, and
 * allocates O((n + d)·d) per solve.
 */
public final class LeastSquares {
    private static final double EPSILON = Math.ulp(1.0);

    private final boolean intercept;
    private final double ridge;

    private LeastSquares(boolean intercept, double ridge) {
        this.intercept = intercept;
        this.ridge = ridge;
    }

    /** Ordinary least squares, z = x·β + b, with an unpenalized intercept b and no penalty. */
    public static LeastSquares withIntercept() {
        return new LeastSquares(true, 0.0);
    }

    /** Least squares through the origin, z = x·β, no penalty. */
    public static LeastSquares throughOrigin() {
        return new LeastSquares(false, 0.0);
    }

    /**
     * @param strength λ ≥ 0 in (λ/2)‖β‖²; the intercept is never penalized
     * @return a copy with this ridge strength
     * @throws IllegalArgumentException if the strength is negative, NaN or infinite
     */
    public LeastSquares withRidge(double strength) {
        return new LeastSquares(intercept, Arguments.nonNegative("ridge", strength));
    }

    /** @return whether the model has an intercept */
    public boolean hasIntercept() {
        return intercept;
    }

    /** @return λ */
    public double ridge() {
        return ridge;
    }

    /**
     * Unweighted least squares.
     *
     * @param x read only; n rows of d finite features
     * @param y read only; n finite targets
     * @throws IllegalArgumentException on ragged or non-finite input (naming the row and column), or
     *                                  if the design is rank deficient (naming the column)
     */
    public LeastSquaresSolution solve(double[][] x, double[] y) {
        DenseFeatures features = DenseFeatures.of(x);
        return solveFlat(features.values(), features.rows(), features.columns(), checkedTargets(y, features.rows()),
                null);
    }

    /**
     * Weighted least squares.
     *
     * @param x       read only; n rows of d finite features
     * @param y       read only; n finite targets
     * @param weights read only; n finite weights ≥ 0, not all zero
     * @throws IllegalArgumentException on invalid input (naming the row) or a rank-deficient design
     */
    public LeastSquaresSolution solve(double[][] x, double[] y, double[] weights) {
        DenseFeatures features = DenseFeatures.of(x);
        int n = features.rows();
        return solveFlat(features.values(), n, features.columns(), checkedTargets(y, n), checkedWeights(weights, n));
    }

    /**
     * Least squares on a dataset, with its weights as given (the solution does not depend on their
     * scale, so raw and normalized weights give the same fit). Sparse features are densified.
     *
     * @throws IllegalArgumentException if the design is rank deficient (naming the column)
     */
    public LeastSquaresSolution solve(Dataset data) {
        Arguments.notNull("data", data);
        FeatureMatrix f = data.features();
        int n = f.rows();
        int d = f.columns();
        double[] flat;
        if (f instanceof DenseFeatures) {
            flat = ((DenseFeatures) f).values();
        } else {
            flat = new double[n * d];
            for (int i = 0; i < n; i++) {
                f.addRow(i, 1.0, flat, i * d);
            }
        }
        double[] weights = null;
        if (data.weighted()) {
            weights = new double[n];
            for (int i = 0; i < n; i++) {
                weights[i] = data.weight(i);
            }
        }
        return solveFlat(flat, n, d, data.targetsView(), weights);
    }

    private static double[] checkedTargets(double[] y, int n) {
        Arguments.notNull("y", y);
        if (y.length != n) {
            throw new IllegalArgumentException("y has " + y.length + " entries, but x has " + n + " rows");
        }
        for (int i = 0; i < n; i++) {
            if (!Double.isFinite(y[i])) {
                throw new IllegalArgumentException("y[" + i + "] is " + y[i] + " (targets must be finite)");
            }
        }
        return y;
    }

    private static double[] checkedWeights(double[] w, int n) {
        Arguments.notNull("weights", w);
        if (w.length != n) {
            throw new IllegalArgumentException("weights have " + w.length + " entries, but x has " + n + " rows");
        }
        double sum = 0;
        for (int i = 0; i < n; i++) {
            if (!Double.isFinite(w[i]) || w[i] < 0) {
                throw new IllegalArgumentException("weights[" + i + "] (" + w[i] + ") must be finite and >= 0");
            }
            sum += w[i];
        }
        if (!(sum > 0) || Double.isInfinite(sum)) {
            throw new IllegalArgumentException("weights sum to " + sum + "; expected a finite positive sum");
        }
        return w;
    }

    /** @param w null for all ones */
    private LeastSquaresSolution solveFlat(double[] x, int n, int d, double[] y, double[] w) {
        int p = d + (intercept ? 1 : 0);
        int observed = 0;
        double totalWeight = 0;
        for (int i = 0; i < n; i++) {
            double wi = w == null ? 1.0 : w[i];
            if (wi > 0) {
                observed++;
                totalWeight += wi;
            }
        }
        if (ridge == 0 && observed < p) {
            throw new IllegalArgumentException(observed + " rows with positive weight cannot determine " + p
                    + " parameters without a penalty; add rows or a ridge penalty (withRidge)");
        }

        // Weighted means; a second pass corrects the first one's rounding (common practice).
        double[] xMean = new double[d];
        double yMean = 0;
        if (intercept) {
            for (int i = 0; i < n; i++) {
                double wi = w == null ? 1.0 : w[i];
                yMean += wi * y[i];
                for (int j = 0; j < d; j++) {
                    xMean[j] += wi * x[i * d + j];
                }
            }
            yMean /= totalWeight;
            for (int j = 0; j < d; j++) {
                xMean[j] /= totalWeight;
            }
            double yFix = 0;
            double[] xFix = new double[d];
            for (int i = 0; i < n; i++) {
                double wi = w == null ? 1.0 : w[i];
                yFix += wi * (y[i] - yMean);
                for (int j = 0; j < d; j++) {
                    xFix[j] += wi * (x[i * d + j] - xMean[j]);
                }
            }
            yMean += yFix / totalWeight;
            for (int j = 0; j < d; j++) {
                xMean[j] += xFix[j] / totalWeight;
            }
        }

        // A = [ sqrt(w) (X - 1 x̄ᵀ) | sqrt(w) (y - ȳ) ] stacked over [ sqrt(Wλ) I | 0 ].
        int m = n + (ridge > 0 ? d : 0);
        DMatrixRMaj a = new DMatrixRMaj(m, d + 1);
        double[] columnNorm = new double[d];
        for (int i = 0; i < n; i++) {
            double s = Math.sqrt(w == null ? 1.0 : w[i]);
            for (int j = 0; j < d; j++) {
                double v = s * (x[i * d + j] - xMean[j]);
                a.unsafe_set(i, j, v);
                columnNorm[j] += v * v;
            }
            a.unsafe_set(i, d, s * (y[i] - yMean));
        }
        if (ridge > 0) {
            double s = Math.sqrt(totalWeight * ridge);
            for (int j = 0; j < d; j++) {
                a.unsafe_set(n + j, j, s);
                columnNorm[j] += s * s;
            }
        }

        QRDecomposition<DMatrixRMaj> qr = DecompositionFactory_DDRM.qr(m, d + 1);
        // decompose() reports false when a column is already zero below the diagonal: an exact fit
        // (the target column) or a dependent feature column, which the rank check below names.
        qr.decompose(a);
        DMatrixRMaj r = qr.getR(null, true);
        // |R_jj| is the length of column j's part orthogonal to the columns before it; relative to the
        // column's own length it is scale free, and at rounding level the column is dependent.
        double rankTolerance = Math.max(m, d) * EPSILON;
        for (int j = 0; j < d; j++) {
            double len = Math.sqrt(columnNorm[j]);
            if (len == 0 || Math.abs(r.get(j, j)) <= rankTolerance * len) {
                throw new IllegalArgumentException("column " + j + " of the design is " + (len == 0
                        ? (intercept ? "constant (it duplicates the intercept)" : "zero")
                        : "a linear combination of the columns before it (|R[" + j + "," + j + "]| = "
                                + Math.abs(r.get(j, j)) + ")")
                        + "; drop it or add a ridge penalty (withRidge)");
            }
        }

        // Back substitution R β = Qᵀy, the last column of R holding Qᵀy.
        double[] beta = new double[d];
        for (int j = d - 1; j >= 0; j--) {
            double s = r.get(j, d);
            for (int k = j + 1; k < d; k++) {
                s -= r.get(j, k) * beta[k];
            }
            beta[j] = s / r.get(j, j);
        }
        double b = 0;
        if (intercept) {
            b = yMean;
            for (int j = 0; j < d; j++) {
                b -= xMean[j] * beta[j];
            }
        }

        // Residuals from the centred data (fewer cancellations than from the raw columns).
        double rss = 0;
        double tss = 0;
        double[] gradient = new double[p];
        for (int i = 0; i < n; i++) {
            double wi = w == null ? 1.0 : w[i];
            double fit = 0;
            for (int j = 0; j < d; j++) {
                fit += (x[i * d + j] - xMean[j]) * beta[j];
            }
            double yc = y[i] - yMean;
            double res = yc - fit;
            rss += wi * res * res;
            tss += wi * yc * yc;
            double c = -wi * res / totalWeight;
            for (int j = 0; j < d; j++) {
                gradient[j] += c * x[i * d + j];
            }
            if (intercept) {
                gradient[d] += c;
            }
        }
        double penalty = 0;
        for (int j = 0; j < d; j++) {
            gradient[j] += ridge * beta[j];
            penalty += beta[j] * beta[j];
        }
        double objective = rss / (2 * totalWeight) + 0.5 * ridge * penalty;
        double gradientNorm = 0;
        for (double g : gradient) {
            gradientNorm += g * g;
        }
        gradientNorm = Math.sqrt(gradientNorm);

        int df = observed - p;
        double[][] covariance = null;
        if (ridge == 0 && df > 0) {
            covariance = covariance(r, d, xMean, totalWeight, rss / df);
        }
        return new LeastSquaresSolution(beta, b, intercept, ridge, rss, tss, df, covariance, objective, gradientNorm);
    }

    /**
     * s²(X<sup>T</sup>WX)<sup>−1</sup> in the layout (β, b). For the centred columns X<sub>c</sub> = R's
     * factor, (X<sub>c</sub><sup>T</sup>WX<sub>c</sub>)<sup>−1</sup> = R<sup>−1</sup>R<sup>−T</sup>; the intercept
     * b = a − x̄·β with a = ȳ-fit uncorrelated with β and Var(a) = s²/W, hence
     * Var(b) = s²(1/W + x̄<sup>T</sup>Cx̄) and Cov(β, b) = −s²Cx̄ (standard; e.g. Seber &amp; Lee,
     * <i>Linear Regression Analysis</i>, 2nd ed., 2003, ch. 3, from memory).
     */
    private double[][] covariance(DMatrixRMaj r, int d, double[] xMean, double totalWeight, double s2) {
        // Inverse of the upper-triangular d x d block, column by column.
        double[][] inv = new double[d][d];
        for (int c = 0; c < d; c++) {
            inv[c][c] = 1.0 / r.get(c, c);
            for (int i = c - 1; i >= 0; i--) {
                double s = 0;
                for (int k = i + 1; k <= c; k++) {
                    s += r.get(i, k) * inv[k][c];
                }
                inv[i][c] = -s / r.get(i, i);
            }
        }
        int p = intercept ? d + 1 : d;
        double[][] cov = new double[p][p];
        for (int i = 0; i < d; i++) {
            for (int j = i; j < d; j++) {
                double s = 0;
                for (int k = Math.max(i, j); k < d; k++) {
                    s += inv[i][k] * inv[j][k];
                }
                cov[i][j] = s;
                cov[j][i] = s;
            }
        }
        if (intercept) {
            double quad = 0;
            for (int i = 0; i < d; i++) {
                double cx = 0;
                for (int j = 0; j < d; j++) {
                    cx += cov[i][j] * xMean[j];
                }
                cov[i][d] = -cx;
                cov[d][i] = -cx;
                quad += xMean[i] * cx;
            }
            cov[d][d] = 1.0 / totalWeight + quad;
        }
        for (double[] row : cov) {
            for (int j = 0; j < p; j++) {
                row[j] *= s2;
            }
        }
        return cov;
    }

    @Override
    public String toString() {
        return "LeastSquares[" + (intercept ? "intercept" : "through origin") + ", ridge=" + ridge + "]";
    }
}
