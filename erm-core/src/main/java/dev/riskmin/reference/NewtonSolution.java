package dev.riskmin.reference;

/**
 * The optimum found by {@link NewtonSolver}: the parameter vector h in the layout of the matching
 * objective (one block (w, b) for logistic and Poisson, K blocks of stride d + 1 for softmax), the
 * number of Newton iterations, the objective L(h) and ‖∇L(h)‖<sub>2</sub> at the returned h.
 *
 * <p>For an unpenalized logistic or Poisson fit it also holds the covariance of the maximum-
 * likelihood estimate with the raw weights read as frequency counts,
 * (Σ<sub>i</sub> w<sub>i</sub> v<sub>i</sub> x̃<sub>i</sub>x̃<sub>i</sub><sup>T</sup>)<sup>−1</sup> with v<sub>i</sub> = p<sub>i</sub>(1 − p<sub>i</sub>)
 * (binomial: a row with proportion k/m and weight m counts as m trials) or v<sub>i</sub> = μ<sub>i</sub> (Poisson),
 * the inverse expected (= observed, for canonical links) information (McCullagh &amp; Nelder,
 * <i>Generalized Linear Models</i>, 2nd ed., 1989, §4.4; section from memory).
 *
 * <p>Immutable: every array accessor returns a copy.
 */
public final class NewtonSolution {
    private final String lossName;
    private final double[] parameters;
    private final int blocks;
    private final int dimension;
    private final boolean intercept;
    private final double l2;
    private final int iterations;
    private final double gradientNorm;
    private final double objectiveValue;
    private final double[][] covariance;  // null when undefined
    private final String noCovariance;    // why, when undefined

    NewtonSolution(String lossName, double[] parameters, int blocks, int dimension, boolean intercept, double l2,
                   int iterations, double gradientNorm, double objectiveValue, double[][] covariance,
                   String noCovariance) {
        this.lossName = lossName;
        this.parameters = parameters;
        this.blocks = blocks;
        this.dimension = dimension;
        this.intercept = intercept;
        this.l2 = l2;
        this.iterations = iterations;
        this.gradientNorm = gradientNorm;
        this.objectiveValue = objectiveValue;
        this.covariance = covariance;
        this.noCovariance = noCovariance;
    }

    /** @return "logistic", "Poisson" or "softmax cross-entropy" */
    public String lossName() {
        return lossName;
    }

    /** @return a copy of h */
    public double[] parameters() {
        return parameters.clone();
    }

    /** @return 1 for logistic and Poisson, K for softmax */
    public int blocks() {
        return blocks;
    }

    /** @return d, the number of features */
    public int dimension() {
        return dimension;
    }

    public boolean hasIntercept() {
        return intercept;
    }

    /** @return w<sub>j</sub> of block k (k = 0 for single-output losses) */
    public double coefficient(int block, int j) {
        if (j < 0 || j >= dimension) {
            throw new IndexOutOfBoundsException("feature (" + j + ") must be in [0, " + dimension + ")");
        }
        return parameters[offset(block) + j];
    }

    /** @return b of block k, or 0 without intercepts */
    public double intercept(int block) {
        return intercept ? parameters[offset(block) + dimension] : 0.0;
    }

    private int offset(int block) {
        if (block < 0 || block >= blocks) {
            throw new IndexOutOfBoundsException("block (" + block + ") must be in [0, " + blocks + ")");
        }
        return block * (intercept ? dimension + 1 : dimension);
    }

    public double l2() {
        return l2;
    }

    /** @return Newton steps taken */
    public int iterations() {
        return iterations;
    }

    /** @return ‖∇L(h)‖<sub>2</sub> at the returned h */
    public double gradientNorm() {
        return gradientNorm;
    }

    /** @return L(h) */
    public double objectiveValue() {
        return objectiveValue;
    }

    /** @return whether {@link #covariance()} is defined (unpenalized logistic or Poisson, non-singular) */
    public boolean hasCovariance() {
        return covariance != null;
    }

    /**
     * @return the inverse information matrix, in the layout of {@link #parameters()} (a copy)
     * @throws IllegalStateException for a penalized or softmax fit, saying why
     */
    public double[][] covariance() {
        if (covariance == null) {
            throw new IllegalStateException(noCovariance);
        }
        double[][] out = new double[covariance.length][];
        for (int i = 0; i < out.length; i++) {
            out[i] = covariance[i].clone();
        }
        return out;
    }

    /**
     * @return √diag of {@link #covariance()}
     * @throws IllegalStateException as {@link #covariance()}
     */
    public double[] standardErrors() {
        if (covariance == null) {
            throw new IllegalStateException(noCovariance);
        }
        double[] se = new double[covariance.length];
        for (int j = 0; j < se.length; j++) {
            se[j] = Math.sqrt(covariance[j][j]);
        }
        return se;
    }

    @Override
    public String toString() {
        return "NewtonSolution[" + lossName + ", iterations=" + iterations + ", objective=" + objectiveValue
                + ", gradientNorm=" + gradientNorm + "]";
    }
}
