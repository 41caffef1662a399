package dev.riskmin.method;

import dev.riskmin.data.Dataset;
import dev.riskmin.loss.Loss;
import dev.riskmin.loss.Losses;
import dev.riskmin.objective.LinearObjective;
import dev.riskmin.objective.Objective;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.testing.Cases;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.ArrayList;
import java.util.List;
import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The O(non-zeros) path of proximal SGD (lazy L2 scaling, just-in-time L1) gives the same iterates
 * and batch gradients as the general O(p) path, to 1e-12, on the same data and batch order — dense
 * and sparse, with every elastic-net mix, weights, importance scales and batch sizes (METHODS §8
 * check: "matches the dense update, at O(nnz) cost per step").
 */
class LinearSgdAgreementTest {

    record Case(long seed, boolean sparse, Penalty penalty, Loss loss, boolean intercept, int batch) {
        @Override
        public String toString() {
            return "seed=" + seed + " " + (sparse ? "sparse" : "dense") + " " + penalty.name() + " " + loss.name()
                    + (intercept ? "" : " no-intercept") + " B=" + batch;
        }
    }

    static List<Case> cases() {
        List<Case> out = new ArrayList<>();
        Penalty[] penalties = {Penalty.none(), Penalty.l2(0.05), Penalty.l1(0.02), Penalty.elasticNet(0.01, 0.1)};
        Loss[] losses = {Losses.squared(), Losses.logistic(), Losses.huber(0.7)};
        int k = 0;
        for (long seed : Cases.seeds(48).toArray()) {
            out.add(new Case(seed, k % 2 == 0, penalties[k % 4], losses[(k / 4) % 3], k % 5 != 0, 1 + (k % 3) * 3));
            k++;
        }
        return out;
    }

    private static Dataset data(Case c, RandomGenerator rng) {
        int n = 60;
        int d = 12;
        double[][] x = new double[n][d];
        List<Integer> starts = new ArrayList<>();
        List<Integer> cols = new ArrayList<>();
        List<Double> vals = new ArrayList<>();
        for (int i = 0; i < n; i++) {
            starts.add(cols.size());
            for (int j = 0; j < d; j++) {
                if (!c.sparse() || rng.nextDouble() < 0.25) {
                    x[i][j] = rng.nextGaussian();
                    cols.add(j);
                    vals.add(x[i][j]);
                }
            }
        }
        starts.add(cols.size());
        double[] y = new double[n];
        double[] w = new double[n];
        for (int i = 0; i < n; i++) {
            y[i] = c.loss() == Losses.logistic() ? (rng.nextDouble() < 0.5 ? 1 : 0) : rng.nextGaussian();
            w[i] = 0.5 + rng.nextDouble();
        }
        Dataset.Builder b = Dataset.builder().targets(y).weights(w);
        if (c.sparse()) {
            b.sparseFeatures(n, d, starts.stream().mapToInt(Integer::intValue).toArray(),
                    cols.stream().mapToInt(Integer::intValue).toArray(),
                    vals.stream().mapToDouble(Double::doubleValue).toArray());
        } else {
            b.features(x);
        }
        return b.build();
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("cases")
    void fastAndGeneralPathsAgree(Case c) {
        RandomGenerator rng = Cases.rng(c.seed());
        Dataset data = data(c, rng);
        Objective objective = LinearObjective.of(data, c.loss(), c.penalty(), c.intercept());
        int p = objective.dimension();
        assertTrue(LinearSgd.applies(objective));
        double[] h0 = Cases.gaussianVector(rng, p, 0.3);
        Updater fast = UpdateRule.sgd().start(objective, h0, 10);
        Updater general = PlainSgd.general(objective);
        assertTrue(fast.lazy());
        double[] hFast = h0.clone();
        double[] hGeneral = h0.clone();
        double[] gFast = new double[p];
        double[] gGeneral = new double[p];
        int[] batch = new int[c.batch()];
        double[] scales = new double[c.batch()];
        double worst = 0;
        for (int step = 0; step < 300; step++) {
            for (int k = 0; k < batch.length; k++) {
                batch[k] = rng.nextInt(data.size());
                scales[k] = 0.5 + rng.nextDouble();
            }
            double[] s = step % 2 == 0 ? scales : null;
            double eps = 0.05 / (1 + 0.01 * step);
            double lossFast = fast.gradient(hFast, batch, s, batch.length, gFast);
            double lossGeneral = general.gradient(hGeneral, batch, s, batch.length, gGeneral);
            assertEquals(lossGeneral, lossFast, 1e-12 * (1 + Math.abs(lossGeneral)), "batch loss at step " + step);
            if (step % 7 == 0) {
                fast.fillGradient(gFast);
                for (int j = 0; j < p; j++) {
                    worst = Math.max(worst, Math.abs(gFast[j] - gGeneral[j]) / (1 + Math.abs(gGeneral[j])));
                }
            }
            fast.update(hFast, gFast, eps);
            general.update(hGeneral, gGeneral, eps);
            if (step % 11 == 0 || step == 299) {
                fast.materialize(hFast);
                for (int j = 0; j < p; j++) {
                    worst = Math.max(worst, Math.abs(hFast[j] - hGeneral[j]) / (1 + Math.abs(hGeneral[j])));
                }
            }
        }
        assertTrue(worst < 1e-12, c + ": worst relative difference " + worst);
        if (c.penalty().l1Strength() > 0) {
            int zerosFast = 0;
            int zerosGeneral = 0;
            fast.materialize(hFast);
            for (int j = 0; j < data.dimension(); j++) {
                zerosFast += hFast[j] == 0 ? 1 : 0;
                zerosGeneral += hGeneral[j] == 0 ? 1 : 0;
            }
            assertEquals(zerosGeneral, zerosFast, "exact zeros of the L1 path");
        }
    }

    @ParameterizedTest(name = "step factor {0}")
    @MethodSource("bigSteps")
    void stepsThatZeroTheL2FactorAreWrittenOutDirectly(double factor) {
        // With ε = 1/λ the decay factor 1 − ελ is 0 (METHODS §8: "set w directly"); beyond it, negative.
        RandomGenerator rng = Cases.rng(99);
        Dataset data = data(new Case(99, true, Penalty.l2(0.5), Losses.squared(), true, 2), rng);
        Objective objective = LinearObjective.of(data, Losses.squared(), Penalty.l2(0.5), true);
        double[] h0 = Cases.gaussianVector(rng, objective.dimension(), 1.0);
        Updater fast = UpdateRule.sgd().start(objective, h0, 10);
        Updater general = PlainSgd.general(objective);
        double[] a = h0.clone();
        double[] b = h0.clone();
        double[] g = new double[a.length];
        double[] g2 = new double[a.length];
        int[] batch = {3, 17};
        fast.gradient(a, batch, null, 2, g);
        general.gradient(b, batch, null, 2, g2);
        double eps = (1 - factor) / 0.5;
        fast.update(a, g, eps);
        general.update(b, g2, eps);
        fast.materialize(a);
        for (int j = 0; j < a.length; j++) {
            assertEquals(b[j], a[j], 1e-12 * (1 + Math.abs(b[j])));
        }
    }

    static double[] bigSteps() {
        return new double[] {0.0, 1e-9, -0.5};
    }
}
