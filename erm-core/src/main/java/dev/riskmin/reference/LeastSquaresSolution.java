package dev.riskmin.reference;

import java.util.Arrays;

/**
 * The exact minimizer of a {@link LeastSquares} problem and its classical summaries:
 * <ul>
 *   <li>coefficients β and intercept b;</li>
 *   <li>the (weighted) residual sum of squares RSS = Σ w<sub>i</sub> r<sub>i</sub>², r<sub>i</sub> = y<sub>i</sub> − x<sub>i</sub>·β − b;</li>
 *   <li>the residual standard deviation s = √(RSS/(n − p)), with n the rows of positive weight and p
 *       the number of parameters (intercept included);</li>
 *   <li>R² = 1 − RSS/TSS, TSS = Σ w<sub>i</sub>(y<sub>i</sub> − ȳ)² with an intercept and Σ w<sub>i</sub> y<sub>i</sub>² without
 *       (the uncentred form for a model through the origin, as NIST StRD uses; from memory);</li>
 *   <li>for an unpenalized fit, the covariance s²(X<sup>T</sup>WX)<sup>−1</sup> of (β, b), X including the
 *       constant column, and the standard errors √diag of it (weights read as precisions, Var y<sub>i</sub> = σ²/w<sub>i</sub>;
 *       so unweighted this is s·√diag((X<sup>T</sup>X)<sup>−1</sup>));</li>
 *   <li>the objective (1/(2W)) Σ w<sub>i</sub> r<sub>i</sub>² + (λ/2)‖β‖² and the Euclidean norm of its gradient
 *       at the solution, a measure of the solve's accuracy (zero in exact arithmetic).</li>
 * </ul>
 * Immutable: every array accessor returns a copy.
 */
public final class LeastSquaresSolution {
    private final double[] coefficients;
    private final double intercept;
    private final boolean hasIntercept;
    private final double ridge;
    private final double residualSumOfSquares;
    private final double totalSumOfSquares;
    private final int residualDegreesOfFreedom;
    private final double[][] covariance; // null when undefined
    private final double objectiveValue;
    private final double gradientNorm;

    LeastSquaresSolution(double[] coefficients, double intercept, boolean hasIntercept, double ridge,
                         double residualSumOfSquares, double totalSumOfSquares, int residualDegreesOfFreedom,
                         double[][] covariance, double objectiveValue, double gradientNorm) {
        this.coefficients = coefficients;
        this.intercept = intercept;
        this.hasIntercept = hasIntercept;
        this.ridge = ridge;
        this.residualSumOfSquares = residualSumOfSquares;
        this.totalSumOfSquares = totalSumOfSquares;
        this.residualDegreesOfFreedom = residualDegreesOfFreedom;
        this.covariance = covariance;
        this.objectiveValue = objectiveValue;
        this.gradientNorm = gradientNorm;
    }

    /** @return d */
    public int dimension() {
        return coefficients.length;
    }

    /** @return a copy of β */
    public double[] coefficients() {
        return coefficients.clone();
    }

    /** @return β<sub>j</sub> */
    public double coefficient(int j) {
        return coefficients[j];
    }

    /** @return b (0 for a fit through the origin) */
    public double intercept() {
        return intercept;
    }

    public boolean hasIntercept() {
        return hasIntercept;
    }

    /** @return λ */
    public double ridge() {
        return ridge;
    }

    /**
     * @return h = (β<sub>0</sub>, …, β<sub>d−1</sub>, b), or β alone without an intercept: the layout of a
     * {@code LinearObjective} over the same data, at which its gradient vanishes when it uses the
     * squared loss and {@code Penalty.l2(λ)}
     */
    public double[] parameters() {
        double[] h = Arrays.copyOf(coefficients, coefficients.length + (hasIntercept ? 1 : 0));
        if (hasIntercept) {
            h[coefficients.length] = intercept;
        }
        return h;
    }

    /** @return Σ w<sub>i</sub> r<sub>i</sub>² */
    public double residualSumOfSquares() {
        return residualSumOfSquares;
    }

    /** @return n − p, rows of positive weight less parameters (may be ≤ 0 for a penalized fit) */
    public int residualDegreesOfFreedom() {
        return residualDegreesOfFreedom;
    }

    /** @return s = √(RSS/(n − p)), or NaN when n − p ≤ 0 */
    public double residualStandardDeviation() {
        return residualDegreesOfFreedom > 0 ? Math.sqrt(residualSumOfSquares / residualDegreesOfFreedom) : Double.NaN;
    }

    /** @return 1 − RSS/TSS (NaN when TSS = 0) */
    public double rSquared() {
        return totalSumOfSquares > 0 ? 1.0 - residualSumOfSquares / totalSumOfSquares : Double.NaN;
    }

    /** @return whether {@link #covariance()} and the standard errors are defined (unpenalized, n &gt; p) */
    public boolean hasCovariance() {
        return covariance != null;
    }

    /**
     * @return s²(X<sup>T</sup>WX)<sup>−1</sup> in the layout of {@link #parameters()} (a copy)
     * @throws IllegalStateException for a ridge fit (its estimator is biased, so this is not its
     *                               covariance) or when no residual degrees of freedom remain
     */
    public double[][] covariance() {
        requireCovariance();
        double[][] out = new double[covariance.length][];
        for (int i = 0; i < out.length; i++) {
            out[i] = covariance[i].clone();
        }
        return out;
    }

    /**
     * @return s·√[(X<sup>T</sup>WX)<sup>−1</sup>]<sub>jj</sub> for each coefficient j &lt; d
     * @throws IllegalStateException as {@link #covariance()}
     */
    public double[] coefficientStandardErrors() {
        requireCovariance();
        double[] se = new double[coefficients.length];
        for (int j = 0; j < se.length; j++) {
            se[j] = Math.sqrt(covariance[j][j]);
        }
        return se;
    }

    /**
     * @return the standard error of b
     * @throws IllegalStateException as {@link #covariance()}, or if the fit has no intercept
     */
    public double interceptStandardError() {
        requireCovariance();
        if (!hasIntercept) {
            throw new IllegalStateException("the fit is through the origin: it has no intercept");
        }
        int d = coefficients.length;
        return Math.sqrt(covariance[d][d]);
    }

    private void requireCovariance() {
        if (covariance == null) {
            throw new IllegalStateException(ridge > 0
                    ? "a ridge fit (ridge = " + ridge + ") has no classical covariance; solve without ridge for it"
                    : "no residual degrees of freedom (n - p = " + residualDegreesOfFreedom
                    + "): the covariance needs more rows than parameters");
        }
    }

    /** @return (1/(2W)) Σ w<sub>i</sub> r<sub>i</sub>² + (λ/2)‖β‖² at the solution */
    public double objectiveValue() {
        return objectiveValue;
    }

    /** @return ‖∇‖<sub>2</sub> of that objective at the solution, computed from the raw data */
    public double gradientNorm() {
        return gradientNorm;
    }

    @Override
    public String toString() {
        return "LeastSquaresSolution[b=" + intercept + ", beta=" + Arrays.toString(coefficients) + ", rss="
                + residualSumOfSquares + ", gradientNorm=" + gradientNorm + "]";
    }
}
