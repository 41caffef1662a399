package dev.riskmin.method;

import dev.riskmin.objective.GeneralObjective;
import dev.riskmin.objective.LinearObjective;
import dev.riskmin.objective.Objective;
import dev.riskmin.objective.SampleFunction;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.testing.Cases;
import dev.riskmin.testing.LeastSquaresProblem;
import dev.riskmin.loss.Losses;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;

/** Published identities of the update rules, checked on objectives whose gradients are known exactly. */
class UpdateRuleIdentitiesTest {

    /** ℓ<sub>i</sub>(h) = c·h for every sample: the gradient is the constant c. */
    static Objective constantGradient(double[] c, int n, Penalty penalty) {
        return GeneralObjective.of(new SampleFunction() {
            @Override
            public int size() {
                return n;
            }

            @Override
            public int dimension() {
                return c.length;
            }

            @Override
            public double loss(double[] h, int i) {
                double s = 0;
                for (int j = 0; j < c.length; j++) {
                    s += c[j] * h[j];
                }
                return s;
            }

            @Override
            public double addGradient(double[] h, int i, double scale, double[] g) {
                for (int j = 0; j < c.length; j++) {
                    g[j] += scale * c[j];
                }
                return loss(h, i);
            }
        }, penalty);
    }

    private static double[] step(UpdateRule rule, Objective objective, double[] h, double eps, int times) {
        Updater u = rule.start(objective, h, 1);
        double[] g = new double[h.length];
        int[] batch = {0};
        for (int k = 0; k < times; k++) {
            u.gradient(h, batch, null, 1, g);
            u.update(h, g, eps);
        }
        return h;
    }

    @Test
    void adamsFirstStepIsAlphaTimesTheGradientsSign() {
        // Kingma & Ba 2015, §2.1: the first step has magnitude ~ alpha (METHODS §7 check).
        double[] c = {3.0, -0.002, 1e4};
        double[] h = step(UpdateRule.adam(), constantGradient(c, 5, Penalty.none()), new double[3], 0.01, 1);
        for (int j = 0; j < 3; j++) {
            assertEquals(-0.01 * Math.signum(c[j]), h[j], 1e-7);
        }
    }

    @Test
    void adamUnderAConstantGradientMovesAlphaPerStep() {
        // A constant gradient c gives m̂ = c and v̂ = c² exactly (METHODS §7 check), so each step is alpha sign(c).
        double[] c = {0.5, -2.0};
        double[] h = step(UpdateRule.adam(), constantGradient(c, 5, Penalty.none()), new double[2], 0.01, 100);
        assertEquals(-1.0, h[0], 1e-6);
        assertEquals(1.0, h[1], 1e-6);
    }

    @Test
    void adamWithDecoupledDecayShrinksByExactlyOneMinusEpsLambdaUnderZeroGradient() {
        // Loshchilov & Hutter, ICLR 2019, Alg. 2: with a zero loss gradient, h <- (1 - eta lambda) h (METHODS §7 check).
        double[] h = {2.0, -3.0};
        step(UpdateRule.adam(0.9, 0.999, 1e-8, 0.1), constantGradient(new double[2], 5, Penalty.none()), h, 0.5, 3);
        double f = Math.pow(1 - 0.5 * 0.1, 3);
        assertArrayEquals(new double[] {2.0 * f, -3.0 * f}, h, 1e-15);
    }

    @Test
    void adaGradUnderAConstantGradientTakesStepsEtaOverSqrtT() {
        // Duchi, Hazan & Singer 2011: s_t = t c², so step t is eta c/(|c| sqrt t) (METHODS §7 check).
        double[] c = {4.0};
        Objective objective = constantGradient(c, 5, Penalty.none());
        double[] h = {0.0};
        Updater u = UpdateRule.adaGrad(1e-300).start(objective, h, 1);
        double[] g = new double[1];
        double previous = 0;
        for (int t = 1; t <= 50; t++) {
            u.gradient(h, new int[] {0}, null, 1, g);
            u.update(h, g, 0.3);
            assertEquals(-0.3 / Math.sqrt(t), h[0] - previous, 1e-14);
            previous = h[0];
        }
    }

    @Test
    void heavyBallMatchesPolyaksTwoStepForm() {
        // Polyak 1964: x+ = x - a G(x) + beta (x - x_prev) (METHODS §7).
        LeastSquaresProblem problem = LeastSquaresProblem.gaussian(4, 30, 3, 0.2);
        Objective objective = problem.objective();
        double a = 0.05;
        double beta = 0.7;
        double[] h = new double[4];
        Updater u = UpdateRule.heavyBall(beta).start(objective, h, 1);
        double[] x = new double[4];
        double[] prev = new double[4];
        double[] g = new double[4];
        int[] batch = new int[30];
        for (int i = 0; i < 30; i++) {
            batch[i] = i;
        }
        for (int k = 0; k < 20; k++) {
            u.gradient(h, batch, null, 30, g);
            u.update(h, g, a);
            double[] gx = new double[4];
            objective.gradient(x, gx);
            double[] next = new double[4];
            for (int j = 0; j < 4; j++) {
                next[j] = x[j] - a * gx[j] + beta * (x[j] - prev[j]);
            }
            prev = x;
            x = next;
            assertArrayEquals(x, h, 1e-12);
        }
    }

    static long[] seeds() {
        return Cases.seeds(20).toArray();
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("seeds")
    void svrgDirectionIsUnbiasedAndEqualsTheFullGradientAtTheSnapshot(long seed) {
        // Johnson & Zhang 2013: E[g_i(w) - g_i(w~) + mu] = G(w), and at w = w~ the direction is G(w~).
        LeastSquaresProblem problem = LeastSquaresProblem.gaussian(seed, 40, 3, 0.5);
        Objective objective = LinearObjective.of(problem.data, Losses.squared(), Penalty.l2(0.1), true);
        RandomGenerator rng = Cases.rng(seed);
        double[] h = Cases.gaussianVector(rng, 4, 1.0);
        Updater u = UpdateRule.svrg(1000).start(objective, h, 40);
        double[] g = new double[4];
        // First step: snapshot at h, so the step moves along G(h) exactly.
        u.gradient(h, new int[] {Math.floorMod(seed, 40)}, null, 1, g);
        double[] full = new double[4];
        objective.gradient(h, full);
        double[] moved = h.clone();
        u.update(moved, g, 1.0);
        for (int j = 0; j < 4; j++) {
            assertEquals(h[j] - full[j], moved[j], 1e-12);
        }
        // Later steps: averaging the direction over every sample gives G at the new point.
        double[] mean = new double[4];
        for (int i = 0; i < 40; i++) {
            double[] probe = moved.clone();
            u.gradient(probe, new int[] {i}, null, 1, g);
            u.update(probe, g, 1.0);
            for (int j = 0; j < 4; j++) {
                mean[j] += (moved[j] - probe[j]) / 40;
            }
        }
        double[] fullAtMoved = new double[4];
        objective.gradient(moved, fullAtMoved);
        assertArrayEquals(fullAtMoved, mean, 1e-12);
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("seeds")
    void sagaTableMeanEqualsAFullRecomputation(long seed) {
        // Defazio, Bach & Lacoste-Julien 2014: the incremental table mean equals a full recomputation
        // (METHODS §7 check), seen through the step along d at a point where every sample was refreshed.
        LeastSquaresProblem problem = LeastSquaresProblem.gaussian(seed, 25, 3, 0.5);
        Objective objective = problem.objective();
        RandomGenerator rng = Cases.rng(seed);
        double[] h = Cases.gaussianVector(rng, 4, 1.0);
        Updater u = UpdateRule.saga().start(objective, new double[4], 25);
        double[] g = new double[4];
        for (int i = 0; i < 25; i++) {
            u.gradient(h, new int[] {i}, null, 1, g); // refresh every entry at the same h, without moving
        }
        // Now every table entry holds the gradient at h: the direction for any sample is the full gradient.
        u.gradient(h, new int[] {Math.floorMod(seed, 25)}, null, 1, g);
        double[] moved = h.clone();
        u.update(moved, g, 1.0);
        double[] full = new double[4];
        objective.gradient(h, full);
        for (int j = 0; j < 4; j++) {
            assertEquals(full[j], h[j] - moved[j], 1e-12);
        }
    }
}
