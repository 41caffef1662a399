package dev.riskmin.reference;

import dev.riskmin.objective.Objective;
import dev.riskmin.util.Arguments;

/**
 * A deterministic reference for penalized objectives with a non-smooth part (L1, elastic net):
 * FISTA, the accelerated proximal gradient method with backtracking (Beck &amp; Teboulle, "A fast
 * iterative shrinkage-thresholding algorithm for linear inverse problems", SIAM J. Imaging Sciences
 * 2(1):183–202, 2009, §4 with the backtracking of §4 / FISTA with constant-free step).
 *
 * <p>It assumes the penalty's non-smooth part is λ<sub>1</sub>‖w‖<sub>1</sub> (the library's elastic-net
 * family). Writing L(h) = S(h) + R<sub>prox</sub>(h) with S the data term plus the smooth penalty, each
 * iteration takes h<sup>+</sup> = prox<sub>R/M</sub>(y − ∇S(y)/M), doubling M until
 * S(h<sup>+</sup>) ≤ S(y) + ∇S(y)·(h<sup>+</sup> − y) + (M/2)‖h<sup>+</sup> − y‖², and stops when the
 * gradient mapping M‖h<sup>+</sup> − y‖ falls below the tolerance. Because the proximal step sets
 * coordinates exactly to zero, the result's zeros are the reference's sparsity pattern. Not fast;
 * O(n p) per iteration.
 */
public final class ProximalGradient {
    private final double tolerance;
    private final int maxIterations;

    private ProximalGradient(double tolerance, int maxIterations) {
        this.tolerance = tolerance;
        this.maxIterations = maxIterations;
    }

    /** Tolerance 1e-10 on the gradient mapping, at most 20,000 iterations. */
    public static ProximalGradient defaults() {
        return new ProximalGradient(1e-10, 20_000);
    }

    /**
     * @param tolerance     stop when M‖h<sup>+</sup> − y‖ &lt; tolerance (&gt; 0)
     * @param maxIterations at most this many iterations (≥ 1)
     */
    public static ProximalGradient of(double tolerance, int maxIterations) {
        return new ProximalGradient(Arguments.positive("tolerance", tolerance),
                Arguments.positive("maxIterations", maxIterations));
    }

    /** The result: parameters, iterations, the final gradient-mapping norm and objective. */
    public record Solution(double[] parameters, int iterations, double mappingNorm, double objective) {
        /** @return a copy of the parameters */
        @Override
        public double[] parameters() {
            return parameters.clone();
        }
    }

    /**
     * @param h0 read only: the starting point
     * @throws IllegalStateException if the tolerance is not reached within the iteration limit,
     *                               naming both figures
     */
    public Solution solve(Objective objective, double[] h0) {
        int p = objective.dimension();
        double[] x = h0.clone();
        double[] xPrev = h0.clone();
        double[] y = h0.clone();
        double[] grad = new double[p];
        double[] candidate = new double[p];
        double m = 1.0;
        double momentum = 1.0;
        double mapping = Double.POSITIVE_INFINITY;
        int k;
        for (k = 1; k <= maxIterations; k++) {
            double sy = smoothValue(objective, y, grad);
            while (true) {
                for (int j = 0; j < p; j++) {
                    candidate[j] = y[j] - grad[j] / m;
                }
                objective.proximalStep(candidate, 1.0 / m);
                double lin = 0;
                double sq = 0;
                for (int j = 0; j < p; j++) {
                    double dj = candidate[j] - y[j];
                    lin += grad[j] * dj;
                    sq += dj * dj;
                }
                double sc = smoothValue(objective, candidate, null);
                // The allowance covers rounding in S itself: near the optimum the two sides differ by less
                // than the error of an n-term sum, and without it M would grow without bound.
                if (sc <= sy + lin + 0.5 * m * sq + 1e-12 * Math.max(1.0, Math.abs(sy))) {
                    mapping = m * Math.sqrt(sq);
                    break;
                }
                m *= 2.0;
                if (m > 1e300) {
                    throw new IllegalStateException("backtracking found no step: the smooth part's gradient is not"
                            + " Lipschitz near the iterate (curvature estimate above 1e300)");
                }
            }
            // Gradient-scheme adaptive restart (O'Donoghue & Candès, Found. Comput. Math. 15, 2015): when the
            // step (x+ - x) points against the mapping direction (y - x+), the momentum is overshooting.
            double restartTest = 0;
            for (int j = 0; j < p; j++) {
                restartTest += (y[j] - candidate[j]) * (candidate[j] - x[j]);
            }
            System.arraycopy(x, 0, xPrev, 0, p);
            System.arraycopy(candidate, 0, x, 0, p);
            if (mapping < tolerance) {
                break;
            }
            if (restartTest > 0) {
                momentum = 1.0;
                System.arraycopy(x, 0, y, 0, p);
                continue;
            }
            double next = 0.5 * (1.0 + Math.sqrt(1.0 + 4.0 * momentum * momentum));
            double beta = (momentum - 1.0) / next;
            momentum = next;
            for (int j = 0; j < p; j++) {
                y[j] = x[j] + beta * (x[j] - xPrev[j]);
            }
        }
        if (!(mapping < tolerance)) {
            throw new IllegalStateException("proximal gradient did not reach the tolerance " + tolerance + " within "
                    + maxIterations + " iterations (gradient mapping " + mapping + ")");
        }
        return new Solution(x, Math.min(k, maxIterations), mapping, objective.value(x));
    }

    /** S(h): the objective without the L1 part; writes ∇S into {@code grad} unless it is null. */
    private static double smoothValue(Objective objective, double[] h, double[] grad) {
        double l1 = objective.penalty().l1Strength();
        double abs = 0;
        if (l1 > 0) {
            for (int j = 0; j < h.length; j++) {
                if (objective.penalized(j)) {
                    abs += Math.abs(h[j]);
                }
            }
        }
        double value = grad != null ? objective.gradient(h, grad) : objective.value(h);
        return value - l1 * abs;
    }
}
