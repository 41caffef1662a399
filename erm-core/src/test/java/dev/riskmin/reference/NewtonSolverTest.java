package dev.riskmin.reference;

import dev.riskmin.data.Dataset;
import dev.riskmin.loss.Loss;
import dev.riskmin.loss.Losses;
import dev.riskmin.loss.MulticlassLoss;
import dev.riskmin.loss.Response;
import dev.riskmin.loss.TargetDomain;
import dev.riskmin.objective.LinearObjective;
import dev.riskmin.objective.MulticlassObjective;
import dev.riskmin.objective.Objective;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.testing.Cases;
import org.apache.commons.math3.optim.ConvergenceChecker;
import org.apache.commons.math3.optim.InitialGuess;
import org.apache.commons.math3.optim.MaxEval;
import org.apache.commons.math3.optim.MaxIter;
import org.apache.commons.math3.optim.PointValuePair;
import org.apache.commons.math3.optim.linear.LinearConstraint;
import org.apache.commons.math3.optim.linear.LinearConstraintSet;
import org.apache.commons.math3.optim.linear.NonNegativeConstraint;
import org.apache.commons.math3.optim.linear.Relationship;
import org.apache.commons.math3.optim.linear.SimplexSolver;
import org.apache.commons.math3.optim.nonlinear.scalar.GoalType;
import org.apache.commons.math3.optim.nonlinear.scalar.ObjectiveFunction;
import org.apache.commons.math3.optim.nonlinear.scalar.ObjectiveFunctionGradient;
import org.apache.commons.math3.optim.nonlinear.scalar.gradient.NonLinearConjugateGradientOptimizer;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.ArrayList;
import java.util.List;
import java.util.random.RandomGenerator;

import static dev.riskmin.reference.LeastSquaresTest.assertRelative;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

class NewtonSolverTest {

    /** The library's Poisson loss, so LinearObjective evaluates the objective the solver minimizes. */
    private static final Loss POISSON = dev.riskmin.loss.Losses.poisson();

    /** The library's softmax cross-entropy, for MulticlassObjective. */
    private static final MulticlassLoss SOFTMAX = dev.riskmin.loss.Losses.softmax();

    private static double norm(double[] v) {
        double s = 0;
        for (double e : v) {
            s += e * e;
        }
        return Math.sqrt(s);
    }

    /** ‖∇L(h)‖ of the library objective and checks it is at rounding level against the data's scale. */
    private static void assertStationary(Objective objective, double[] h, NewtonSolution fit) {
        double[] g = new double[objective.dimension()];
        double value = objective.gradient(h, g);
        double norm = norm(g);
        assertTrue(norm <= 1e-9, "objective gradient norm " + norm + " at the Newton solution (" + fit + ")");
        assertTrue(fit.gradientNorm() <= 1e-9, "reported gradient norm " + fit.gradientNorm());
        assertRelative(value, fit.objectiveValue(), 1e-12, "objective value");
    }

    private static double[] weights(RandomGenerator rng, int n) {
        double[] w = new double[n];
        for (int i = 0; i < n; i++) {
            w[i] = 0.2 + 2 * rng.nextDouble();
        }
        return w;
    }

    private static int poissonDraw(RandomGenerator rng, double mean) {
        // Knuth's multiplication method (TAOCP vol. 2, 3.4.1; from memory), fine for small means.
        double limit = Math.exp(-mean);
        double product = rng.nextDouble();
        int k = 0;
        while (product > limit) {
            product *= rng.nextDouble();
            k++;
        }
        return k;
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void logisticSolutionIsStationaryForLinearObjective(long seed) {
        RandomGenerator rng = Cases.rng(seed);
        int n = 150;
        int d = 4;
        double[][] x = Cases.gaussianMatrix(rng, n, d);
        int[] labels = Cases.logisticLabels(rng, x, Cases.gaussianVector(rng, d, 0.7), 0.3);
        boolean plusMinus = rng.nextBoolean();
        double[] y = new double[n];
        for (int i = 0; i < n; i++) {
            y[i] = plusMinus ? 2 * labels[i] - 1 : labels[i];
        }
        boolean intercept = rng.nextBoolean();
        double lambda = rng.nextBoolean() ? 0.0 : Math.pow(10, -3 + 2 * rng.nextDouble());
        Dataset.Builder b = Dataset.builder().features(x).targets(y);
        if (rng.nextBoolean()) {
            b.weights(weights(rng, n));
        }
        Dataset data = b.build();

        NewtonSolution fit = NewtonSolver.logistic().withIntercept(intercept).withL2(lambda).solve(data);
        assertStationary(LinearObjective.of(data, Losses.logistic(), Penalty.l2(lambda), intercept), fit.parameters(), fit);
        assertTrue(fit.iterations() <= 12, "iterations " + fit.iterations());
    }

    @Test
    void plusMinusOneLabelsGiveTheSameFitAsZeroOneLabels() {
        // METHODS §11: the {0,1} form equals the ±1 form with y' = 2y − 1.
        RandomGenerator rng = Cases.rng(7);
        double[][] x = Cases.gaussianMatrix(rng, 80, 3);
        int[] labels = Cases.logisticLabels(rng, x, new double[]{1, -0.5, 0.2}, 0.1);
        double[] plusMinus = new double[labels.length];
        for (int i = 0; i < labels.length; i++) {
            plusMinus[i] = 2 * labels[i] - 1;
        }
        double[] a = NewtonSolver.logistic().solve(Dataset.of(x, Cases.asDoubles(labels))).parameters();
        double[] b = NewtonSolver.logistic().solve(Dataset.of(x, plusMinus)).parameters();
        for (int j = 0; j < a.length; j++) {
            assertRelative(a[j], b[j], 1e-14, "h[" + j + "]");
        }
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void poissonSolutionAgreesWithCommonsMathConjugateGradient(long seed) {
        RandomGenerator rng = Cases.rng(seed);
        int n = 200;
        int d = 3;
        double[][] x = Cases.gaussianMatrix(rng, n, d);
        double[] w = Cases.gaussianVector(rng, d, 0.4);
        double[] y = new double[n];
        for (int i = 0; i < n; i++) {
            double z = 0.5;
            for (int j = 0; j < d; j++) {
                z += w[j] * x[i][j];
            }
            y[i] = poissonDraw(rng, Math.exp(z));
        }
        double lambda = rng.nextBoolean() ? 0.0 : 0.01 * rng.nextDouble();
        Dataset.Builder b = Dataset.builder().features(x).targets(y);
        if (rng.nextBoolean()) {
            b.weights(weights(rng, n));
        }
        Dataset data = b.build();
        NewtonSolution fit = NewtonSolver.poisson().withL2(lambda).solve(data);
        LinearObjective objective = LinearObjective.of(data, POISSON, Penalty.l2(lambda), true);
        assertStationary(objective, fit.parameters(), fit);

        // Outside reference: commons-math3 3.6.1 nonlinear conjugate gradient (Polak–Ribière) on the
        // same objective, stopped on the gradient norm.
        int p = objective.dimension();
        double[] g = new double[p];
        ConvergenceChecker<PointValuePair> gradientSmall = (iteration, previous, current) -> {
            objective.gradient(current.getPoint(), g);
            // Its value-based line search stalls once L changes only in its last bits (about 1e-8 here).
            return norm(g) < 1e-8 || current.getValue() >= previous.getValue();
        };
        NonLinearConjugateGradientOptimizer cg = new NonLinearConjugateGradientOptimizer(
                NonLinearConjugateGradientOptimizer.Formula.POLAK_RIBIERE, gradientSmall, 1e-16, 1e-20, 1.0);
        PointValuePair optimum = cg.optimize(new MaxEval(200_000), new MaxIter(20_000), GoalType.MINIMIZE,
                new InitialGuess(new double[p]),
                new ObjectiveFunction(objective::value),
                new ObjectiveFunctionGradient(h -> {
                    double[] out = new double[p];
                    objective.gradient(h, out);
                    return out;
                }));
        double[] expected = optimum.getPoint();
        double[] actual = fit.parameters();
        objective.gradient(expected, g);
        assertTrue(norm(g) < 1e-6, "conjugate gradient stopped at gradient norm " + norm(g));
        double worst = 0;
        for (int j = 0; j < p; j++) {
            worst = Math.max(worst, Math.abs(expected[j] - actual[j]) / Math.max(1, Math.abs(expected[j])));
        }
        assertTrue(worst <= 1e-6, "Newton and conjugate gradient differ by " + worst + " (relative)");
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void softmaxSolutionIsStationaryForMulticlassObjective(long seed) {
        RandomGenerator rng = Cases.rng(seed);
        int n = 200;
        int d = 3;
        int classes = 3 + rng.nextInt(2);
        double[][] x = Cases.gaussianMatrix(rng, n, d);
        double[][] w = new double[classes][];
        for (int k = 0; k < classes; k++) {
            w[k] = Cases.gaussianVector(rng, d, 0.8);
        }
        int[] labels = new int[n];
        double[] prob = new double[classes];
        for (int i = 0; i < n; i++) {
            double total = 0;
            for (int k = 0; k < classes; k++) {
                double z = 0;
                for (int j = 0; j < d; j++) {
                    z += w[k][j] * x[i][j];
                }
                prob[k] = Math.exp(z);
                total += prob[k];
            }
            double u = rng.nextDouble() * total;
            int k = 0;
            while (k < classes - 1 && u > prob[k]) {
                u -= prob[k];
                k++;
            }
            labels[i] = k;
        }
        boolean intercept = rng.nextBoolean();
        double lambda = rng.nextBoolean() ? 0.0 : Math.pow(10, -3 + 2 * rng.nextDouble());
        Dataset.Builder b = Dataset.builder().features(x).labels(labels, classes);
        if (rng.nextBoolean()) {
            b.weights(weights(rng, n));
        }
        Dataset data = b.build();

        NewtonSolution fit = NewtonSolver.softmax().withIntercept(intercept).withL2(lambda).solve(data);
        double[] h = fit.parameters();
        assertStationary(MulticlassObjective.of(data, SOFTMAX, Penalty.l2(lambda), intercept), h, fit);
        // The documented choice among equivalent optima: blocks sum to zero coordinate by coordinate.
        int stride = intercept ? d + 1 : d;
        for (int j = 0; j < stride; j++) {
            double sum = 0;
            double scale = 0;
            for (int k = 0; k < classes; k++) {
                sum += h[k * stride + j];
                scale += Math.abs(h[k * stride + j]);
            }
            assertTrue(Math.abs(sum) <= 1e-10 * Math.max(1, scale), "coordinate " + j + " sums to " + sum);
        }
        assertThrows(IllegalStateException.class, fit::covariance);
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void twoClassSoftmaxEqualsLogisticOnTheDifference(long seed) {
        // METHODS §11: K = 2 softmax equals logistic in z1 − z0. With L2 on both blocks the optimum has
        // w1 = −w0 (derived), so the difference carries the penalty (λ/2)·2·‖v/2‖² = (λ/2)/2·‖v‖²:
        // logistic with strength λ/2.
        RandomGenerator rng = Cases.rng(seed);
        int n = 120;
        int d = 3;
        double[][] x = Cases.gaussianMatrix(rng, n, d);
        int[] labels = Cases.logisticLabels(rng, x, Cases.gaussianVector(rng, d, 0.8), -0.2);
        boolean intercept = rng.nextBoolean();
        double lambda = rng.nextBoolean() ? 0.0 : Math.pow(10, -3 + 2 * rng.nextDouble());
        double[] weights = weights(rng, n);

        NewtonSolution softmax = NewtonSolver.softmax().withIntercept(intercept).withL2(lambda)
                .solve(Dataset.builder().features(x).labels(labels, 2).weights(weights).build());
        NewtonSolution logistic = NewtonSolver.logistic().withIntercept(intercept).withL2(lambda / 2)
                .solve(Dataset.builder().features(x).targets(Cases.asDoubles(labels)).weights(weights).build());
        for (int j = 0; j < d; j++) {
            assertRelative(logistic.coefficient(0, j), softmax.coefficient(1, j) - softmax.coefficient(0, j), 1e-9,
                    "w[" + j + "]");
        }
        assertEquals(logistic.intercept(0), softmax.intercept(1) - softmax.intercept(0),
                1e-9 * Math.max(1, Math.abs(logistic.intercept(0))), "intercept");
        assertRelative(logistic.objectiveValue(), softmax.objectiveValue(), 1e-12, "objective value");
    }

    /** Two clusters on either side of the line x0 + x1 = 0, with a gap. */
    private static Dataset separable(RandomGenerator rng, int n, boolean classes) {
        double[][] x = new double[n][2];
        int[] labels = new int[n];
        for (int i = 0; i < n; i++) {
            labels[i] = i % 2;
            double side = labels[i] == 1 ? 1 : -1;
            double along = 3 * rng.nextGaussian();
            double across = side * (0.5 + Math.abs(rng.nextGaussian()));
            x[i][0] = along + across;
            x[i][1] = -along + across;
        }
        return classes ? Dataset.builder().features(x).labels(labels, 2).build()
                : Dataset.of(x, Cases.asDoubles(labels));
    }

    @Test
    void separableDataWithoutPenaltyIsRefusedAndSolvedWithOne() {
        // Albert & Anderson (Biometrika 1984): complete separation, no finite maximum-likelihood estimate.
        Dataset binary = separable(Cases.rng(11), 60, false);
        IllegalStateException e = assertThrows(IllegalStateException.class, () -> NewtonSolver.logistic().solve(binary));
        assertTrue(e.getMessage().contains("separable") && e.getMessage().contains("L2"), e.getMessage());
        NewtonSolution penalized = NewtonSolver.logistic().withL2(0.01).solve(binary);
        assertStationary(LinearObjective.of(binary, Losses.logistic(), Penalty.l2(0.01), true),
                penalized.parameters(), penalized);

        Dataset classes = separable(Cases.rng(12), 60, true);
        e = assertThrows(IllegalStateException.class, () -> NewtonSolver.softmax().solve(classes));
        assertTrue(e.getMessage().contains("separable"), e.getMessage());
        NewtonSolution softmax = NewtonSolver.softmax().withL2(0.01).solve(classes);
        assertStationary(MulticlassObjective.of(classes, SOFTMAX, Penalty.l2(0.01), true), softmax.parameters(), softmax);
    }

    @Test
    void quasiSeparatedDataIsRefused() {
        // Quasi-complete separation (Albert & Anderson 1984): x < 0 only in class 0, x > 0 only in class 1,
        // both classes at x = 0; the slope runs to +∞ while the gradient vanishes.
        double[][] x = {{-2}, {-1}, {-1}, {0}, {0}, {0}, {0}, {1}, {1}, {2}};
        double[] y = {0, 0, 0, 0, 1, 0, 1, 1, 1, 1};
        IllegalStateException e = assertThrows(IllegalStateException.class,
                () -> NewtonSolver.logistic().solve(Dataset.of(x, y)));
        assertTrue(e.getMessage().contains("separated") && e.getMessage().contains("L2"), e.getMessage());

        // Poisson analogue: the rows with x = 1 all have zero counts, so their slope runs to −∞.
        double[][] u = {{0}, {0}, {0}, {0}, {1}, {1}, {1}};
        double[] counts = {1, 3, 0, 2, 0, 0, 0};
        e = assertThrows(IllegalStateException.class, () -> NewtonSolver.poisson().solve(Dataset.of(u, counts)));
        assertTrue(e.getMessage().contains("separated") && e.getMessage().contains("L2"), e.getMessage());
        NewtonSolution fit = NewtonSolver.poisson().withL2(0.1).solve(Dataset.of(u, counts));
        assertStationary(LinearObjective.of(Dataset.of(u, counts), POISSON, Penalty.l2(0.1), true), fit.parameters(), fit);
    }

    /**
     * Whether a direction of recession exists: v ≠ 0 with s_i v·x̃_i ≥ 0 for all i and some > 0, found
     * as max Σ s_i v·x̃_i over |v_j| ≤ 1 by commons-math3 3.6.1 SimplexSolver. For the logistic loss
     * s_i = 2y_i − 1 (Albert &amp; Anderson 1984: no finite maximum-likelihood estimate exactly when such
     * a v exists); for Poisson, v·x̃_i ≤ 0 on zero counts and = 0 on positive counts (derived the same way).
     */
    private static boolean recessionDirectionExists(double[][] x, double[] y, boolean poisson) {
        int n = x.length;
        int p = x[0].length + 1;
        List<LinearConstraint> constraints = new ArrayList<>();
        double[] objective = new double[p];
        for (int i = 0; i < n; i++) {
            double s = poisson ? -1 : 2 * y[i] - 1;
            double[] a = new double[p];
            for (int j = 0; j < p - 1; j++) {
                a[j] = s * x[i][j];
            }
            a[p - 1] = s;
            if (poisson && y[i] > 0) {
                constraints.add(new LinearConstraint(a, Relationship.EQ, 0));
                continue;
            }
            constraints.add(new LinearConstraint(a, Relationship.GEQ, 0));
            for (int j = 0; j < p; j++) {
                objective[j] += a[j];
            }
        }
        for (int j = 0; j < p; j++) {
            double[] e = new double[p];
            e[j] = 1;
            constraints.add(new LinearConstraint(e, Relationship.LEQ, 1));
            constraints.add(new LinearConstraint(e, Relationship.GEQ, -1));
        }
        PointValuePair best = new SimplexSolver().optimize(new MaxIter(10_000),
                new org.apache.commons.math3.optim.linear.LinearObjectiveFunction(objective, 0),
                new LinearConstraintSet(constraints), GoalType.MAXIMIZE, new NonNegativeConstraint(false));
        return best.getValue() > 1e-7;
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void refusalsCoincideWithExistenceOfARecessionDirection(long seed) {
        // Small problems, often (quasi-)separated: the solver must refuse exactly those the linear
        // program shows to have no finite optimum, and solve every other one.
        RandomGenerator rng = Cases.rng(seed);
        boolean poisson = rng.nextInt(3) == 0;
        int n = 8 + rng.nextInt(30);
        int d = 1 + rng.nextInt(3);
        double[][] x = new double[n][d];
        double[] y = new double[n];
        boolean discreteFirst = rng.nextBoolean();
        double strength = 4 * rng.nextDouble();
        for (int i = 0; i < n; i++) {
            double z = poisson ? -2 * rng.nextDouble() : 0.0;
            for (int j = 0; j < d; j++) {
                // A discrete first column makes (quasi-)separation common (three levels for the logistic
                // loss; two for Poisson, where a level with only zero counts is what separates); the
                // other columns keep the design of full rank.
                boolean discrete = j == 0 && discreteFirst;
                x[i][j] = discrete ? (poisson ? rng.nextInt(2) : rng.nextInt(3) - 1) : rng.nextGaussian();
                z += (poisson && discrete ? -2 * strength : strength) * x[i][j] / (j + 1);
            }
            y[i] = poisson ? poissonDraw(rng, Math.exp(z)) : (rng.nextDouble() < 1 / (1 + Math.exp(-z)) ? 1 : 0);
        }
        if (discreteFirst) {
            x[0][0] = 0;   // never a constant column
            x[1][0] = 1;
        }
        if (!poisson) {
            y[0] = 0;   // both classes present, so the intercept alone cannot run off
            y[1] = 1;
        } else {
            y[0] = Math.max(y[0], 1);
        }
        boolean noOptimum = recessionDirectionExists(x, y, poisson);
        NewtonSolver solver = poisson ? NewtonSolver.poisson() : NewtonSolver.logistic();
        Dataset data = Dataset.of(x, y);
        if (noOptimum) {
            IllegalStateException e = assertThrows(IllegalStateException.class, () -> solver.solve(data));
            assertTrue(e.getMessage().contains("separa") && e.getMessage().contains("L2"), e.getMessage());
        } else {
            NewtonSolution fit = solver.solve(data);
            assertTrue(fit.gradientNorm() <= 1e-9, fit.toString());
        }
    }

    @Test
    void targetsWithoutAFiniteOptimumAreRefusedWithTheReason() {
        double[][] x = {{0.1}, {0.5}, {-0.3}, {1.2}};
        IllegalStateException e = assertThrows(IllegalStateException.class,
                () -> NewtonSolver.poisson().withL2(1.0).solve(Dataset.of(x, new double[]{0, 0, 0, 0})));
        assertTrue(e.getMessage().contains("zero"), e.getMessage());
        e = assertThrows(IllegalStateException.class,
                () -> NewtonSolver.logistic().withL2(1.0).solve(Dataset.of(x, new double[]{1, 1, 1, 1})));
        assertTrue(e.getMessage().contains("y = 1"), e.getMessage());
        e = assertThrows(IllegalStateException.class,
                () -> NewtonSolver.softmax().withL2(1.0).solve(Dataset.builder().features(x).labels(new int[]{0, 2, 0, 2}, 3).build()));
        assertTrue(e.getMessage().contains("class 1"), e.getMessage());
    }

    @Test
    void invalidTargetsAndOptionsAreRefusedNamingThem() {
        double[][] x = {{0.1}, {0.5}, {-0.3}};
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> NewtonSolver.logistic().solve(Dataset.of(x, new double[]{0, 2, 1})));
        assertTrue(e.getMessage().contains("y[1]"), e.getMessage());
        e = assertThrows(IllegalArgumentException.class,
                () -> NewtonSolver.poisson().solve(Dataset.of(x, new double[]{0, 2, -1})));
        assertTrue(e.getMessage().contains("y[2]"), e.getMessage());
        e = assertThrows(IllegalArgumentException.class,
                () -> NewtonSolver.softmax().solve(Dataset.of(x, new double[]{0, 2, 1})));
        assertTrue(e.getMessage().contains("labels"), e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> NewtonSolver.logistic().withTolerance(0));
        assertTrue(e.getMessage().contains("tolerance"), e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> NewtonSolver.logistic().withL2(-1e-3));
        assertTrue(e.getMessage().contains("l2"), e.getMessage());
    }

    @Test
    void penalizedFitHasNoClassicalCovariance() {
        RandomGenerator rng = Cases.rng(3);
        double[][] x = Cases.gaussianMatrix(rng, 50, 2);
        Dataset data = Dataset.of(x, Cases.asDoubles(Cases.logisticLabels(rng, x, new double[]{1, 1}, 0)));
        NewtonSolution fit = NewtonSolver.logistic().withL2(0.1).solve(data);
        IllegalStateException e = assertThrows(IllegalStateException.class, fit::standardErrors);
        assertTrue(e.getMessage().contains("penalized"), e.getMessage());
        assertTrue(NewtonSolver.logistic().solve(data).hasCovariance());
    }
}
