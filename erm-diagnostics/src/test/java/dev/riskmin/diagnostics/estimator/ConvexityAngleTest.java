package dev.riskmin.diagnostics.estimator;

import dev.riskmin.data.Dataset;
import dev.riskmin.loss.Losses;
import dev.riskmin.objective.LinearObjective;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.testing.Cases;
import dev.riskmin.testing.LeastSquaresProblem;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.ArrayRealVector;
import org.apache.commons.math3.linear.LUDecomposition;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The facts behind the angle-to-optimum statistics (METHODS §3): on a convex objective the full
 * negative gradient makes an acute angle with the direction to the optimum, by first-order
 * convexity ⟨−G(h), h* − h⟩ ≥ L(h) − L* ≥ 0 (Boyd &amp; Vandenberghe, <i>Convex Optimization</i>,
 * 2004, §3.1.3); a stochastic gradient does so only in expectation — the mean of the per-sample
 * inner products is the full one — and a single sample's negative gradient can point away.
 *
 * <p>Optima: least squares by commons-math3's Householder QR ({@link LeastSquaresProblem}); L2-penalized
 * logistic regression by Newton's method written here from the gradient and Hessian of McCullagh &amp;
 * Nelder, <i>Generalized Linear Models</i>, 1989 (METHODS §12), solved with commons-math3's LU.
 */
class ConvexityAngleTest {
    private static final double LAMBDA = 0.01;

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void fullNegativeGradientPointsTowardsTheOptimum(long seed) {
        RandomGenerator rng = Cases.rng(seed);
        LeastSquaresProblem ls = LeastSquaresProblem.gaussian(seed, 30, 3, 0.5);
        check("least squares", ls.objective(), ls.optimum, rng);
        Logistic logistic = Logistic.of(seed, 40, 3);
        check("logistic", logistic.objective, logistic.optimum, rng);
    }

    private static void check(String what, LinearObjective objective, double[] optimum, RandomGenerator rng) {
        int p = objective.dimension();
        double scale = Math.pow(10, -2 + 2.5 * rng.nextDouble());
        double[] h = new double[p];
        double[] toOptimum = new double[p];
        for (int j = 0; j < p; j++) {
            h[j] = optimum[j] + scale * rng.nextGaussian();
            toOptimum[j] = optimum[j] - h[j];
        }
        double[] full = new double[p];
        double value = objective.gradient(h, full);
        double optimal = objective.value(optimum);
        double gap = value - optimal;
        double inner = -NoiseStatistics.dot(full, toOptimum, p);
        double tolerance = 1e-12 * (1 + Math.abs(value));
        assertTrue(gap >= -tolerance, what + ": L(h) - L* = " + gap + " < 0; the optimum is not optimal");
        assertTrue(inner >= gap - tolerance, what + ": <-G, h* - h> = " + inner + " < L(h) - L* = " + gap);
        double cosine = inner
                / Math.sqrt(NoiseStatistics.normSquared(full, p) * NoiseStatistics.normSquared(toOptimum, p));
        assertTrue(Math.toDegrees(Math.acos(Math.min(1, cosine))) <= 90.0, what + ": obtuse, cos " + cosine);
        // In expectation: the mean over samples of <-g_i, h* - h> is the full inner product (linearity).
        Gradients g = Gradients.of(objective, h);
        double mean = 0;
        double magnitude = 0;
        for (int i = 0; i < g.n; i++) {
            double term = 0;
            for (int c = 0; c < p; c++) {
                term -= g.component(i, c) * toOptimum[c];
            }
            mean += term / g.n;
            magnitude += Math.abs(term) / g.n;
        }
        assertTrue(Math.abs(mean - inner) <= 1e-12 * Math.max(magnitude, 1e-300),
                what + ": mean per-sample inner product " + mean + " vs full " + inner);
    }

    @Test
    void singleSampleNegativeGradientCanPointAwayFromTheOptimum() {
        // Near the optimum the per-sample gradients nearly cancel, so some point the wrong way: at
        // h = h* + δ, <-g_i, h* - h> ≥ f_i(h) - f_i(h*) (METHODS §3) has no sign.
        Logistic logistic = Logistic.of(7, 40, 3);
        int p = logistic.objective.dimension();
        double[] h = logistic.optimum.clone();
        double[] toOptimum = new double[p];
        for (int j = 0; j < p; j++) {
            h[j] += 0.05 * (j % 2 == 0 ? 1 : -1);
            toOptimum[j] = logistic.optimum[j] - h[j];
        }
        Gradients g = Gradients.of(logistic.objective, h);
        int obtuse = 0;
        double worst = Double.POSITIVE_INFINITY;
        for (int i = 0; i < g.n; i++) {
            double term = 0;
            for (int c = 0; c < p; c++) {
                term -= g.component(i, c) * toOptimum[c];
            }
            if (term < 0) {
                obtuse++;
            }
            worst = Math.min(worst, term);
        }
        double full = -NoiseStatistics.dot(g.mean, toOptimum, p);
        assertTrue(full > 0, "the full negative gradient points towards the optimum: " + full);
        assertTrue(obtuse >= 1, "no sample's negative gradient points away (worst inner product " + worst + ")");
    }

    /** An L2-penalized logistic regression with its Newton optimum. */
    private static final class Logistic {
        final LinearObjective objective;
        final double[] optimum;

        private Logistic(LinearObjective objective, double[] optimum) {
            this.objective = objective;
            this.optimum = optimum;
        }

        static Logistic of(long seed, int n, int d) {
            RandomGenerator rng = Cases.rng(seed + 1000);
            double[][] x = Cases.gaussianMatrix(rng, n, d);
            double[] w = Cases.gaussianVector(rng, d, 1.0);
            int[] labels = Cases.logisticLabels(rng, x, w, 0.3);
            labels[0] = 0; // both classes present
            labels[1] = 1;
            double[] y = Cases.asDoubles(labels);
            LinearObjective objective =
                    LinearObjective.of(Dataset.of(x, y), Losses.logistic(), Penalty.l2(LAMBDA), true);
            double[] h = newton(x, y);
            double[] grad = new double[d + 1];
            objective.gradient(h, grad);
            double norm = Math.sqrt(NoiseStatistics.normSquared(grad, d + 1));
            assertTrue(norm < 1e-10, "Newton's optimum has library gradient norm " + norm);
            return new Logistic(objective, h);
        }

        /**
         * Newton's method on (1/n) Σ [log(1 + e^z_i) − y_i z_i] + (λ/2)‖w‖², z = w·x + b, y ∈ {0, 1}:
         * gradient (1/n) X̃ᵀ(σ(z) − y) + λ(w, 0),
         * Hessian (1/n) X̃ᵀ diag(σ(1 − σ)) X̃ + λ diag(1, …, 1, 0).
         */
        private static double[] newton(double[][] x, double[] y) {
            int n = x.length;
            int d = x[0].length;
            int p = d + 1;
            double[] h = new double[p];
            for (int iteration = 0; iteration < 100; iteration++) {
                double[] grad = new double[p];
                double[][] hess = new double[p][p];
                for (int i = 0; i < n; i++) {
                    double[] row = new double[p];
                    System.arraycopy(x[i], 0, row, 0, d);
                    row[d] = 1;
                    double z = NoiseStatistics.dot(h, row, p);
                    double s = 1 / (1 + Math.exp(-z));
                    for (int a = 0; a < p; a++) {
                        grad[a] += (s - y[i]) * row[a] / n;
                        for (int b = 0; b < p; b++) {
                            hess[a][b] += s * (1 - s) * row[a] * row[b] / n;
                        }
                    }
                }
                for (int j = 0; j < d; j++) {
                    grad[j] += LAMBDA * h[j];
                    hess[j][j] += LAMBDA;
                }
                double[] step = new LUDecomposition(new Array2DRowRealMatrix(hess, false)).getSolver()
                        .solve(new ArrayRealVector(grad, false)).toArray();
                double size = 0;
                for (int j = 0; j < p; j++) {
                    h[j] -= step[j];
                    size += step[j] * step[j];
                }
                if (Math.sqrt(size) < 1e-15) {
                    break;
                }
            }
            return h;
        }
    }
}
