package dev.riskmin;

import dev.riskmin.data.Dataset;
import dev.riskmin.loss.Losses;
import dev.riskmin.method.Averaging;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.model.MulticlassModel;
import dev.riskmin.objective.GeneralObjective;
import dev.riskmin.objective.SampleFunction;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.reference.LeastSquares;
import dev.riskmin.reference.LeastSquaresSolution;
import dev.riskmin.reference.NewtonSolution;
import dev.riskmin.reference.NewtonSolver;
import dev.riskmin.testing.Cases;
import dev.riskmin.testing.LeastSquaresProblem;
import org.apache.commons.math3.optim.MaxIter;
import org.apache.commons.math3.optim.PointValuePair;
import org.apache.commons.math3.optim.linear.LinearConstraint;
import org.apache.commons.math3.optim.linear.LinearConstraintSet;
import org.apache.commons.math3.optim.linear.LinearObjectiveFunction;
import org.apache.commons.math3.optim.linear.NonNegativeConstraint;
import org.apache.commons.math3.optim.linear.Relationship;
import org.apache.commons.math3.optim.linear.SimplexSolver;
import org.apache.commons.math3.optim.nonlinear.scalar.GoalType;
import org.junit.jupiter.api.Test;

import java.util.ArrayList;
import java.util.List;
import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Multiclass, general (user-supplied) and non-smooth objectives go through the same fit loop and
 * reach the optimum that an outside or exact reference finds.
 */
class ObjectiveKindsThroughTheLoopTest {

    @Test
    void softmaxFitReachesTheNewtonReference() {
        // Newton/IRLS for multinomial logistic regression (McCullagh & Nelder 1989, ch. 6).
        RandomGenerator rng = Cases.rng(31);
        int n = 600;
        int d = 4;
        int k = 3;
        double[][] x = Cases.gaussianMatrix(rng, n, d);
        double[][] w = {Cases.gaussianVector(rng, d, 1.0), Cases.gaussianVector(rng, d, 1.0), new double[d]};
        int[] labels = new int[n];
        for (int i = 0; i < n; i++) {
            double[] z = new double[k];
            double max = Double.NEGATIVE_INFINITY;
            for (int c = 0; c < k; c++) {
                for (int j = 0; j < d; j++) {
                    z[c] += w[c][j] * x[i][j];
                }
                max = Math.max(max, z[c]);
            }
            double sum = 0;
            for (int c = 0; c < k; c++) {
                z[c] = Math.exp(z[c] - max);
                sum += z[c];
            }
            double u = rng.nextDouble() * sum;
            int c = 0;
            while (c < k - 1 && u > z[c]) {
                u -= z[c];
                c++;
            }
            labels[i] = c;
        }
        Dataset data = Dataset.builder().features(x).labels(labels, k).build();
        double l2 = 1e-2;
        NewtonSolution newton = NewtonSolver.softmax().withL2(l2).solve(data);
        Fit fit = Minimizer.builder().loss(Losses.softmax()).penalty(Penalty.l2(l2)).updateRule(UpdateRule.svrg())
                .epochs(60).seed(1).build().fit(data);
        double gap = (fit.finalObjective() - newton.objectiveValue()) / newton.objectiveValue();
        System.out.printf("softmax + L2 through the fit loop (SVRG): relative objective gap %.2e to Newton%n", gap);
        assertTrue(gap < 1e-9 && gap > -1e-12, "gap " + gap);
        MulticlassModel model = fit.multiclassModel();
        assertEquals(3, model.classes());
        int agree = 0;
        for (int i = 0; i < n; i++) {
            agree += model.predictClass(x[i]) == argmax(newton, x[i]) ? 1 : 0;
        }
        assertTrue(agree >= n - 2, "predicted classes agree with the reference on " + agree + " of " + n);
    }

    private static int argmax(NewtonSolution s, double[] x) {
        int best = 0;
        double bestZ = Double.NEGATIVE_INFINITY;
        for (int c = 0; c < s.blocks(); c++) {
            double z = s.intercept(c);
            for (int j = 0; j < x.length; j++) {
                z += s.coefficient(c, j) * x[j];
            }
            if (z > bestZ) {
                bestZ = z;
                best = c;
            }
        }
        return best;
    }

    @Test
    void userSuppliedSampleFunctionReachesTheQrSolution() {
        // A user's model written by hand: least squares through (w, b), checked against QR (EJML).
        LeastSquaresProblem problem = LeastSquaresProblem.gaussian(12, 400, 3, 0.5);
        SampleFunction handWritten = new SampleFunction() {
            @Override
            public int size() {
                return problem.x.length;
            }

            @Override
            public int dimension() {
                return 4;
            }

            private double residual(double[] h, int i) {
                return h[0] * problem.x[i][0] + h[1] * problem.x[i][1] + h[2] * problem.x[i][2] + h[3] - problem.y[i];
            }

            @Override
            public double loss(double[] h, int i) {
                double r = residual(h, i);
                return 0.5 * r * r;
            }

            @Override
            public double addGradient(double[] h, int i, double scale, double[] g) {
                double r = residual(h, i);
                for (int j = 0; j < 3; j++) {
                    g[j] += scale * r * problem.x[i][j];
                }
                g[3] += scale * r;
                return 0.5 * r * r;
            }

            @Override
            public boolean penalized(int j) {
                return j < 3;
            }

            @Override
            public double smoothness(int i) {
                double s = 1;
                for (double v : problem.x[i]) {
                    s += v * v;
                }
                return s;
            }
        };
        Fit fit = Minimizer.builder().updateRule(UpdateRule.saga()).epochs(60).build()
                .fit(GeneralObjective.of(handWritten, Penalty.l2(0.1)), FitOptions.none());
        LeastSquaresSolution qr = LeastSquares.withIntercept().withRidge(0.1).solve(problem.x, problem.y);
        double[] h = fit.parameters();
        double[] ref = qr.parameters();
        for (int j = 0; j < 4; j++) {
            assertEquals(ref[j], h[j], 1e-9 * (1 + Math.abs(ref[j])), "parameter " + j);
        }
        assertTrue(!fit.hasModel());
    }

    @Test
    void hingeLossWithL1ReachesTheLinearProgramOptimum() {
        // Hinge loss + L1 is a linear program: min (1/n) Σ ξ_i + λ Σ (u_j + v_j) with w = u − v,
        // ξ_i ≥ 1 − y_i (w·x_i + b), ξ ≥ 0 — solved exactly by commons-math3's simplex method.
        // The fit has no smoothness constant, so its default step size comes from calibration.
        RandomGenerator rng = Cases.rng(5);
        int n = 120;
        int d = 3;
        double lambda = 0.02;
        double[][] x = Cases.gaussianMatrix(rng, n, d);
        double[] y = new double[n];
        for (int i = 0; i < n; i++) {
            double z = x[i][0] - 0.5 * x[i][1] + 0.3 + 0.8 * rng.nextGaussian();
            y[i] = z > 0 ? 1 : -1;
        }
        double lp = linearProgramOptimum(x, y, lambda);
        Fit fit = Minimizer.builder().loss(Losses.hinge()).penalty(Penalty.l1(lambda))
                .averaging(Averaging.tail(0.5)).epochs(3000).seed(2).build().fit(x, y);
        double gap = (fit.finalObjective() - lp) / lp;
        System.out.printf("hinge + L1 with the calibrated default schedule: relative gap %.2e to the LP optimum%n", gap);
        assertTrue(gap > -1e-9 && gap < 1e-4, "gap " + gap);
    }

    private static double linearProgramOptimum(double[][] x, double[] y, double lambda) {
        int n = x.length;
        int d = x[0].length;
        // variables: u (d), v (d), b+ , b-, xi (n)
        int m = 2 * d + 2 + n;
        double[] cost = new double[m];
        for (int j = 0; j < 2 * d; j++) {
            cost[j] = lambda;
        }
        for (int i = 0; i < n; i++) {
            cost[2 * d + 2 + i] = 1.0 / n;
        }
        List<LinearConstraint> constraints = new ArrayList<>();
        for (int i = 0; i < n; i++) {
            double[] a = new double[m];
            for (int j = 0; j < d; j++) {
                a[j] = y[i] * x[i][j];
                a[d + j] = -y[i] * x[i][j];
            }
            a[2 * d] = y[i];
            a[2 * d + 1] = -y[i];
            a[2 * d + 2 + i] = 1.0;
            constraints.add(new LinearConstraint(a, Relationship.GEQ, 1.0));
        }
        PointValuePair solution = new SimplexSolver().optimize(new MaxIter(100_000),
                new LinearObjectiveFunction(cost, 0.0), new LinearConstraintSet(constraints), GoalType.MINIMIZE,
                new NonNegativeConstraint(true));
        return solution.getValue();
    }
}
