package dev.riskmin.diagnostics.stopping;

import dev.riskmin.data.Dataset;
import dev.riskmin.testing.LeastSquaresProblem;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.EigenDecomposition;

/**
 * A least-squares problem from {@link LeastSquaresProblem}, translated so that its optimum is the
 * origin (targets replaced by the residuals at h*, which leaves the Hessian H, the noise covariance
 * Σ* at the optimum and L* unchanged) and optionally with feature 0 rescaled (which makes H
 * ill-conditioned; the residual vector is orthogonal to the rescaled columns too, so h* stays 0).
 * It predicts constant-step SGD (step ε, batch B drawn with replacement) from a start at distance R
 * along the eigenvector of the smallest eigenvalue μ of H:
 * <ul>
 * <li>noise ball: the stationary E[L(h) − L*] ≈ ε tr Σ* / (4B), from H C + C H = (ε/B) Σ* for the
 * stationary covariance C of h − h* (derived, first order in ε; it agrees with the scalar check of
 * METHODS §3, E F = aM/(2(2 − ac)) ≈ aM/4 for f = (c/2)w² with noise variance M);</li>
 * <li>transient: the distance along that eigenvector contracts by (1 − εμ) per step in expectation,
 * so the gap μR²/2 contracts by (1 − εμ)² and reaches the ball after
 * T = ln(gap<sub>0</sub>/ball) / (−2 ln(1 − εμ)) ≈ ln(gap<sub>0</sub>/ball)/(2εμ) steps (the
 * (1 − εμ)<sup>t</sup> form of the brief, ln(gap<sub>0</sub>/ball)/(εμ), is twice this).</li>
 * </ul>
 * Exact figures (H, μ, tr Σ*) come from the full data, μ from commons-math3's eigendecomposition.
 */
final class NoiseBallProblem {
    final Dataset data;
    final double[] start;
    final double optimalObjective;
    final double mu;
    final double traceSigma;
    final double ball;
    final double gap0;
    final double transientSteps;

    private NoiseBallProblem(Dataset data, double[] start, double optimalObjective, double mu, double traceSigma,
                             double ball, double gap0, double transientSteps) {
        this.data = data;
        this.start = start;
        this.optimalObjective = optimalObjective;
        this.mu = mu;
        this.traceSigma = traceSigma;
        this.ball = ball;
        this.gap0 = gap0;
        this.transientSteps = transientSteps;
    }

    /**
     * @param scale     the factor applied to feature 0 (1: isotropic features)
     * @param gapRatio  gap<sub>0</sub>/ball, which sets R
     */
    static NoiseBallProblem of(long seed, int n, int d, double noise, double scale, double step, int batch,
                               double gapRatio) {
        LeastSquaresProblem ls = LeastSquaresProblem.gaussian(seed, n, d, noise);
        int p = d + 1;
        double[][] x = new double[n][];
        double[] residual = new double[n];
        double[][] hessian = new double[p][p];
        double[] a = new double[p];
        double traceSigma = 0;
        double sumSquares = 0;
        for (int i = 0; i < n; i++) {
            double z = ls.optimum[d];
            for (int j = 0; j < d; j++) {
                z += ls.x[i][j] * ls.optimum[j];
            }
            double r = ls.y[i] - z;
            residual[i] = r;
            sumSquares += r * r;
            x[i] = ls.x[i].clone();
            x[i][0] *= scale;
            System.arraycopy(x[i], 0, a, 0, d);
            a[d] = 1.0;
            double norm2 = 0;
            for (int j = 0; j < p; j++) {
                norm2 += a[j] * a[j];
                for (int k = 0; k < p; k++) {
                    hessian[j][k] += a[j] * a[k] / n;
                }
            }
            traceSigma += r * r * norm2 / n; // the gradient at h* = 0 is −r a: tr Σ* = mean of r²‖a‖² (G(h*) = 0)
        }
        EigenDecomposition eigen = new EigenDecomposition(new Array2DRowRealMatrix(hessian, false));
        double[] values = eigen.getRealEigenvalues();
        int smallest = 0;
        for (int j = 1; j < p; j++) {
            if (values[j] < values[smallest]) {
                smallest = j;
            }
        }
        double mu = values[smallest];
        double ball = step * traceSigma / (4.0 * batch);
        double radius = Math.sqrt(2 * gapRatio * ball / mu);
        double[] u = eigen.getEigenvector(smallest).toArray();
        double[] start = new double[p];
        for (int j = 0; j < p; j++) {
            start[j] = radius * u[j];
        }
        double gap0 = 0.5 * mu * radius * radius;
        double transientSteps = Math.log(gap0 / ball) / (-2.0 * Math.log1p(-step * mu));
        return new NoiseBallProblem(Dataset.of(x, residual), start, sumSquares / (2.0 * n), mu, traceSigma, ball,
                gap0, transientSteps);
    }

    double gapOverBall(double objective) {
        return (objective - optimalObjective) / ball;
    }
}
