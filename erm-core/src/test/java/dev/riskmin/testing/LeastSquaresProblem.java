package dev.riskmin.testing;

import dev.riskmin.data.Dataset;
import dev.riskmin.loss.Losses;
import dev.riskmin.objective.LinearObjective;
import dev.riskmin.penalty.Penalty;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.ArrayRealVector;
import org.apache.commons.math3.linear.QRDecomposition;
import org.apache.commons.math3.linear.RealVector;

import java.util.random.RandomGenerator;

/**
 * A seeded strongly convex least-squares problem, (1/2n) ‖Xw + b − y‖², with its exact optimum
 * computed by commons-math3's Householder QR (an outside reference: the library did not write it).
 */
public final class LeastSquaresProblem {
    public final double[][] x;
    public final double[] y;
    public final Dataset data;
    public final double[] optimum;       // (w, b)
    public final double optimalObjective;

    private LeastSquaresProblem(double[][] x, double[] y) {
        this.x = x;
        this.y = y;
        this.data = Dataset.of(x, y);
        int n = x.length;
        int d = x[0].length;
        double[][] a = new double[n][d + 1];
        for (int i = 0; i < n; i++) {
            System.arraycopy(x[i], 0, a[i], 0, d);
            a[i][d] = 1.0;
        }
        RealVector solution = new QRDecomposition(new Array2DRowRealMatrix(a, false)).getSolver()
                .solve(new ArrayRealVector(y, false));
        this.optimum = solution.toArray();
        this.optimalObjective = objective().value(optimum);
    }

    /** n samples of d N(0,1) features, w<sub>j</sub> ~ N(0,1), b = 0.5, noise N(0, noise²). */
    public static LeastSquaresProblem gaussian(long seed, int n, int d, double noise) {
        RandomGenerator rng = Cases.rng(seed);
        double[][] x = Cases.gaussianMatrix(rng, n, d);
        double[] w = Cases.gaussianVector(rng, d, 1.0);
        double[] y = Cases.linearTargets(rng, x, w, 0.5, noise);
        return new LeastSquaresProblem(x, y);
    }

    /** A fresh objective (objectives hold scratch buffers: one per thread). */
    public LinearObjective objective() {
        return LinearObjective.of(data, Losses.squared(), Penalty.none(), true);
    }

    /** (L(h) − L*) / L*. */
    public double relativeSuboptimality(double[] h) {
        return (objective().value(h) - optimalObjective) / optimalObjective;
    }
}
