package dev.riskmin.penalty;

import dev.riskmin.testing.Cases;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.Arrays;
import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The contract of the elastic-net family R(w) = λ₁‖w‖₁ + (λ₂/2)‖w‖² on a range [from, to), run for
 * none, L2, L1 and the elastic net by subclasses. Sources: Zou &amp; Hastie, JRSS-B 67(2), 2005
 * (the penalty); Parikh &amp; Boyd, "Proximal Algorithms", Found. Trends Optim. 1(3), 2014 (proximal
 * operator and its optimality condition; soft thresholding in §6.5.2, section number from memory).
 */
abstract class PenaltyContract {

    /** A penalty of the kind under test, strengths drawn from {@code rng}. */
    abstract Penalty penalty(RandomGenerator rng);

    /** A vector of length n with a mix of tiny, moderate and large entries, so that thresholds bite. */
    static double[] vector(RandomGenerator rng, int n) {
        double[] v = new double[n];
        for (int j = 0; j < n; j++) {
            double scale = switch (rng.nextInt(3)) {
                case 0 -> 0.05;
                case 1 -> 1.0;
                default -> 10.0;
            };
            v[j] = scale * rng.nextGaussian();
        }
        return v;
    }

    /** A range [from, to) inside a vector of length n, possibly empty. */
    static int[] range(RandomGenerator rng, int n) {
        int from = rng.nextInt(n + 1);
        int to = from + rng.nextInt(n - from + 1);
        return new int[] {from, to};
    }

    static double step(RandomGenerator rng) {
        return rng.nextInt(10) == 0 ? 0.0 : 3.0 * rng.nextDouble();
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void fullProximalSatisfiesTheOptimalityCondition(long seed) {
        // u = prox_{εR}(v) iff 0 ∈ (u − v) + ε∂R(u) (Parikh & Boyd 2014, §3.1, from memory). Per
        // coordinate: u_j ≠ 0 ⇒ (u_j − v_j) + ε(λ₁ sign u_j + λ₂ u_j) = 0; u_j = 0 ⇒ |v_j| ≤ ελ₁.
        RandomGenerator rng = Cases.rng(seed);
        Penalty r = penalty(rng);
        double l1 = r.l1Strength();
        double l2 = r.l2Strength();
        int n = 1 + rng.nextInt(12);
        double[] v = vector(rng, n);
        int[] span = range(rng, n);
        double eps = step(rng);
        double[] u = v.clone();
        r.fullProximal(u, span[0], span[1], eps);
        for (int j = span[0]; j < span[1]; j++) {
            String at = r + ", ε = " + eps + ", v[" + j + "] = " + v[j] + ", u = " + u[j];
            if (u[j] != 0) {
                double residual = (u[j] - v[j]) + eps * (l1 * Math.signum(u[j]) + l2 * u[j]);
                assertEquals(0.0, residual, 1e-14 * (1 + Math.abs(v[j])), at);
                assertEquals(Math.signum(v[j]), Math.signum(u[j]), at + ": the proximal step never flips a sign");
            } else {
                assertTrue(Math.abs(v[j]) <= eps * l1 * (1 + 1e-15), at);
            }
        }
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void fullProximalMinimizesTheProximalObjective(long seed) {
        // Definition: prox_{εR}(v) = argmin_u ½‖u − v‖² + ε R(u) (Parikh & Boyd 2014, §1.1, from memory); the
        // objective is strongly convex, so any perturbation of the minimizer cannot lower it.
        RandomGenerator rng = Cases.rng(seed);
        Penalty r = penalty(rng);
        int n = 1 + rng.nextInt(8);
        double[] v = vector(rng, n);
        double eps = step(rng);
        double[] u = v.clone();
        r.fullProximal(u, 0, n, eps);
        double best = proximalObjective(r, u, v, eps);
        for (int trial = 0; trial < 20; trial++) {
            double[] w = u.clone();
            double scale = trial % 2 == 0 ? 1e-3 : 1.0;
            for (int j = 0; j < n; j++) {
                w[j] += rng.nextInt(3) == 0 ? 0.0 : scale * rng.nextGaussian();
            }
            double other = proximalObjective(r, w, v, eps);
            assertTrue(best <= other + 1e-13 * (1 + Math.abs(other)), r + ": " + best + " > " + other + " at " + Arrays.toString(w));
        }
    }

    private static double proximalObjective(Penalty r, double[] u, double[] v, double eps) {
        double sq = 0;
        for (int j = 0; j < u.length; j++) {
            sq += (u[j] - v[j]) * (u[j] - v[j]);
        }
        return 0.5 * sq + eps * r.value(u, 0, u.length);
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void proximalStepIsSoftThresholdingByStepTimesL1(long seed) {
        // The non-smooth part λ₁‖w‖₁ has prox sign(v) max(|v| − ελ₁, 0) (Parikh & Boyd 2014, §6.5.2,
        // section number from memory; METHODS §8); with λ₁ = 0 it is the identity.
        RandomGenerator rng = Cases.rng(seed);
        Penalty r = penalty(rng);
        int n = 1 + rng.nextInt(12);
        double[] v = vector(rng, n);
        double eps = step(rng);
        double t = eps * r.l1Strength();
        double[] u = v.clone();
        r.proximalStep(u, 0, n, eps);
        for (int j = 0; j < n; j++) {
            double expected = Math.signum(v[j]) * Math.max(Math.abs(v[j]) - t, 0.0);
            assertEquals(expected, u[j], 1e-15 * Math.abs(v[j]), r + ", ε = " + eps + ", v = " + v[j]);
        }
        assertEquals(r.l1Strength() == 0, r.smooth());
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void smoothGradientEqualsAFiniteDifferenceOfTheSmoothPart(long seed) {
        // R_smooth(w) = R(w) − λ₁‖w‖₁; central differences of it (elementary calculus) must match
        // the scaled gradient that addSmoothGradient accumulates into g.
        RandomGenerator rng = Cases.rng(seed);
        Penalty r = penalty(rng);
        int n = 1 + rng.nextInt(10);
        double[] w = vector(rng, n);
        double scale = rng.nextGaussian();
        double[] g = Cases.gaussianVector(rng, n, 1.0);
        double[] g0 = g.clone();
        r.addSmoothGradient(w, 0, n, scale, g);
        for (int j = 0; j < n; j++) {
            double h = 1e-5 * Math.max(1.0, Math.abs(w[j]));
            double[] up = w.clone();
            double[] down = w.clone();
            up[j] += h;
            down[j] -= h;
            double fd = (smoothPart(r, up) - smoothPart(r, down)) / (2 * h);
            assertEquals(g0[j] + scale * fd, g[j], 1e-7 * (1 + Math.abs(g[j])), r + " coordinate " + j);
        }
    }

    private static double smoothPart(Penalty r, double[] w) {
        double abs = 0;
        for (double x : w) {
            abs += Math.abs(x);
        }
        return r.value(w, 0, w.length) - r.l1Strength() * abs;
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void valueMatchesTheElasticNetFormula(long seed) {
        // Zou & Hastie (2005): λ₁ Σ|w_j| + (λ₂/2) Σ w_j² over the range.
        RandomGenerator rng = Cases.rng(seed);
        Penalty r = penalty(rng);
        int n = 1 + rng.nextInt(12);
        double[] w = vector(rng, n);
        int[] span = range(rng, n);
        double abs = 0;
        double sq = 0;
        for (int j = span[0]; j < span[1]; j++) {
            abs += Math.abs(w[j]);
            sq += w[j] * w[j];
        }
        double expected = r.l1Strength() * abs + 0.5 * r.l2Strength() * sq;
        assertEquals(expected, r.value(w, span[0], span[1]), 1e-13 * (1 + expected), r.toString());
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void operationsLeaveCoordinatesOutsideTheRangeUntouched(long seed) {
        // The caller keeps intercepts (and other blocks) outside [from, to): they must be neither read
        // nor written. NaN outside the range would leak into any result that read it.
        RandomGenerator rng = Cases.rng(seed);
        Penalty r = penalty(rng);
        int n = 2 + rng.nextInt(10);
        int[] span = range(rng, n);
        int from = span[0];
        int to = span[1];
        double[] w = vector(rng, n);
        for (int j = 0; j < n; j++) {
            if (j < from || j >= to) {
                w[j] = Double.NaN;
            }
        }
        double value = r.value(w, from, to);
        assertTrue(Double.isFinite(value), r + " read outside [" + from + ", " + to + ")");

        double[] g = Cases.gaussianVector(rng, n, 1.0);
        double[] g0 = g.clone();
        r.addSmoothGradient(w, from, to, 0.7, g);
        double eps = 0.5 + rng.nextDouble();
        double[] prox = w.clone();
        r.proximalStep(prox, from, to, eps);
        double[] full = w.clone();
        r.fullProximal(full, from, to, eps);
        for (int j = 0; j < n; j++) {
            if (j < from || j >= to) {
                assertEquals(g0[j], g[j], 0.0, "addSmoothGradient wrote g[" + j + "]");
                assertTrue(Double.isNaN(prox[j]) && Double.isNaN(full[j]), "a proximal step wrote w[" + j + "]");
            } else {
                assertTrue(Double.isFinite(g[j]) && Double.isFinite(prox[j]) && Double.isFinite(full[j]),
                        r + " read outside [" + from + ", " + to + ") at " + j);
            }
        }
    }

    @Test
    void zeroStepProximalOperatorsAreTheIdentity() {
        // prox_{0·R}(v) = v (definition).
        Penalty r = penalty(Cases.rng(7));
        double[] v = vector(Cases.rng(8), 9);
        double[] a = v.clone();
        double[] b = v.clone();
        r.proximalStep(a, 0, 9, 0.0);
        r.fullProximal(b, 0, 9, 0.0);
        assertEquals(Arrays.toString(v), Arrays.toString(a));
        assertEquals(Arrays.toString(v), Arrays.toString(b));
    }
}
