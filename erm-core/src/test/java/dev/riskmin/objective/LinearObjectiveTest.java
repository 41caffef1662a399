package dev.riskmin.objective;

import dev.riskmin.data.Dataset;
import dev.riskmin.loss.MulticlassLoss;
import dev.riskmin.loss.Response;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.testing.Cases;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.random.RandomGenerator;

import static dev.riskmin.objective.LinearCase.relativeDifference;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

class LinearObjectiveTest {

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void gradientEqualsCentralDifferenceOfValue(long seed) {
        // Elementary calculus (METHODS §11 checks): (L(h + δe_j) − L(h − δe_j))/(2δ) = ∂L/∂h_j + O(δ²).
        // value() includes the whole penalty, gradient() its smooth part only, so on a penalized
        // coordinate (kept 0.1 away from the kink) the difference quotient adds λ1·sign(h_j).
        LinearCase c = LinearCase.of(seed);
        LinearObjective objective = c.denseObjective();
        double[] g = new double[c.dimension()];
        objective.gradient(c.h, g);
        double l1 = c.penalty.l1Strength();
        double[] h = c.h.clone();
        for (int j = 0; j < h.length; j++) {
            double delta = 1e-5;
            double saved = h[j];
            h[j] = saved + delta;
            double up = objective.value(h);
            h[j] = saved - delta;
            double down = objective.value(h);
            h[j] = saved;
            double difference = (up - down) / (2 * delta);
            double expected = g[j] + (objective.penalized(j) ? l1 * Math.signum(h[j]) : 0.0);
            assertEquals(expected, difference, 1e-7 * (1 + Math.abs(expected)), "coordinate " + j + " (" + c + ")");
        }
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void batchGradientOverAllSamplesEqualsFullGradient(long seed) {
        // Objective contract: the batch mean over every sample once is the full gradient.
        LinearCase c = LinearCase.of(seed);
        LinearObjective objective = c.denseObjective();
        int n = c.n;
        int[] batch = new int[n + 3];
        RandomGenerator rng = Cases.rng(seed ^ 0x5DEECE66DL);
        for (int i = 0; i < n; i++) {
            batch[i + 3] = i;
        }
        for (int i = n - 1; i > 0; i--) {   // any order: shuffle the batch after a 3-entry offset
            int k = rng.nextInt(i + 1);
            int t = batch[3 + i];
            batch[3 + i] = batch[3 + k];
            batch[3 + k] = t;
        }
        double[] full = new double[c.dimension()];
        double[] fromBatch = new double[c.dimension()];
        double value = objective.gradient(c.h, full);
        double batchLoss = objective.batchGradient(c.h, batch, null, 3, n, fromBatch);
        assertTrue(relativeDifference(full, fromBatch) <= 1e-12, c.toString());
        assertEquals(value - objective.penaltyValue(c.h), batchLoss, 1e-12 * Math.abs(value), c.toString());
        assertEquals(objective.value(c.h), value, 1e-12 * Math.abs(value), c.toString());
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void importanceScalesWeightTheSamplesAsDocumented(long seed) {
        LinearCase c = LinearCase.of(seed);
        LinearObjective objective = c.denseObjective();
        RandomGenerator rng = Cases.rng(seed + 17);
        int p = c.dimension();
        int length = 1 + rng.nextInt(2 * c.n);
        int[] batch = new int[length];
        double[] scales = new double[length];
        for (int k = 0; k < length; k++) {
            batch[k] = rng.nextInt(c.n);      // with repeats, as with replacement
            scales[k] = 0.1 + 3 * rng.nextDouble();
        }
        // Objective.batchGradient: g = (1/B) Σ s_k ∇(ω ℓ)_{i_k} + ∇R_smooth; returns (1/B) Σ s_k ω ℓ_{i_k}.
        double[] expected = new double[p];
        double expectedLoss = 0;
        for (int k = 0; k < length; k++) {
            expectedLoss += scales[k] * objective.addSampleGradient(c.h, batch[k], scales[k] / length, expected) / length;
        }
        objective.addPenaltyGradient(c.h, 1.0, expected);
        double[] g = new double[p];
        double loss = objective.batchGradient(c.h, batch, scales, 0, length, g);
        assertTrue(relativeDifference(expected, g) <= 1e-12, c.toString());
        assertEquals(expectedLoss, loss, 1e-12 * Math.abs(expectedLoss), c.toString());

        // METHODS §9: drawing i with probability p_i and scaling by 1/(n p_i) is unbiased, exactly
        // (enumerated): Σ_i p_i · batchGradient({i}, 1/(n p_i)) = ∇L.
        double[] probability = new double[c.n];
        double total = 0;
        for (int i = 0; i < c.n; i++) {
            probability[i] = 0.05 + rng.nextDouble();
            total += probability[i];
        }
        double[] mean = new double[p];
        double[] single = new double[p];
        for (int i = 0; i < c.n; i++) {
            double pi = probability[i] / total;
            objective.batchGradient(c.h, new int[]{i}, new double[]{1.0 / (c.n * pi)}, 0, 1, single);
            for (int j = 0; j < p; j++) {
                mean[j] += pi * single[j];
            }
        }
        double[] full = new double[p];
        objective.gradient(c.h, full);
        assertTrue(relativeDifference(full, mean) <= 1e-12, c.toString());
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void denseAndSparsePathsAgree(long seed) {
        // The same matrix stored densely and in CSR must give the same objective up to rounding.
        LinearCase c = LinearCase.of(seed);
        LinearObjective dense = c.denseObjective();
        LinearObjective sparse = c.sparseObjective();
        int p = c.dimension();
        double[] gd = new double[p];
        double[] gs = new double[p];
        double vd = dense.gradient(c.h, gd);
        double vs = sparse.gradient(c.h, gs);
        assertEquals(vd, vs, 1e-12 * Math.abs(vd), "value " + c);
        assertEquals(dense.value(c.h), sparse.value(c.h), 1e-12 * Math.abs(vd), "value() " + c);
        assertTrue(relativeDifference(gd, gs) <= 1e-12, "gradient " + c);
        for (int i = 0; i < c.n; i++) {
            double[] sd = new double[p];
            double[] ss = new double[p];
            double ld = dense.addSampleGradient(c.h, i, 1.0, sd);
            double ls = sparse.addSampleGradient(c.h, i, 1.0, ss);
            assertEquals(ld, ls, 1e-12 * Math.abs(ld), "sample loss " + i + " " + c);
            assertEquals(dense.sampleLoss(c.h, i), sparse.sampleLoss(c.h, i), 1e-12 * Math.abs(ld), "sampleLoss " + i);
            assertTrue(relativeDifference(sd, ss) <= 1e-12, "sample gradient " + i + " " + c);
            assertEquals(dense.sampleSmoothness(i), sparse.sampleSmoothness(i), 1e-12 * dense.sampleSmoothness(i));
        }
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void penaltyNeverTouchesTheIntercept(long seed) {
        // DESIGN: penalties act on coefficients only; METHODS §8: do not penalize the bias.
        LinearCase c = LinearCase.of(seed);
        int d = c.d;
        double[] start = java.util.Arrays.copyOf(c.h, d + 1);
        start[d] = c.intercept ? c.h[d] : 0.7;
        Penalty strong = Penalty.elasticNet(5.0, 5.0);
        LinearObjective objective = LinearObjective.of(c.dense(), c.loss, strong, true);
        assertFalse(objective.penalized(d));
        double[] h = start.clone();
        objective.proximalStep(h, 0.7);
        assertEquals(start[d], h[d], 0.0, "proximalStep moved the intercept");
        for (int j = 0; j < d; j++) {
            assertTrue(objective.penalized(j));
            assertTrue(Math.abs(h[j]) < Math.abs(start[j]), "proximalStep left coefficient " + j + " alone");
        }
        h = start.clone();
        objective.fullProximalStep(h, 0.7);
        assertEquals(start[d], h[d], 0.0, "fullProximalStep moved the intercept");
        double[] g = new double[d + 1];
        objective.addPenaltyGradient(h, 1.0, g);
        assertEquals(0.0, g[d], 0.0, "penalty gradient on the intercept");
        double[] shifted = start.clone();
        shifted[d] += 100;
        assertEquals(objective.penaltyValue(start), objective.penaltyValue(shifted), 0.0, "penalty value depends on b");

        // The same for every intercept of a K-class objective (block stride d + 1).
        int classes = 3;
        int[] labels = new int[c.n];
        for (int i = 0; i < c.n; i++) {
            labels[i] = i % classes;
        }
        Dataset multi = Dataset.builder().features(c.x).labels(labels, classes).build();
        MulticlassObjective k = MulticlassObjective.of(multi, UNUSED_LOSS, strong, true);
        double[] hk = new double[classes * (d + 1)];
        for (int j = 0; j < hk.length; j++) {
            hk[j] = 1.0 + j;
        }
        double[] before = hk.clone();
        k.proximalStep(hk, 0.1);
        k.fullProximalStep(hk, 0.1);
        for (int block = 0; block < classes; block++) {
            int b = block * (d + 1) + d;
            assertFalse(k.penalized(b));
            assertEquals(before[b], hk[b], 0.0, "intercept of block " + block);
            assertTrue(hk[block * (d + 1)] < before[block * (d + 1)], "coefficient of block " + block);
        }
    }

    /** Only its name is read: the penalty checks above never evaluate a loss. */
    private static final MulticlassLoss UNUSED_LOSS = new MulticlassLoss() {
        @Override
        public double value(double[] z, int offset, int classes, int y) {
            throw new AssertionError("not evaluated");
        }

        @Override
        public double gradient(double[] z, int offset, int classes, int y, double[] gradient, int gOffset) {
            throw new AssertionError("not evaluated");
        }

        @Override
        public double smoothness() {
            return 0.5;
        }

        @Override
        public boolean convex() {
            return true;
        }

        @Override
        public Response response() {
            return Response.SOFTMAX;
        }

        @Override
        public String name() {
            return "unused";
        }
    };
}
