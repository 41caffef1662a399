package dev.riskmin.spark;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.hook.FitControl;
import dev.riskmin.hook.FitListener;
import dev.riskmin.hook.Probe;
import dev.riskmin.hook.StepView;
import dev.riskmin.loss.Losses;
import dev.riskmin.objective.LinearObjective;
import dev.riskmin.penalty.Penalty;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

import java.util.Arrays;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * What the driver's probe gives is exact where its documentation says so: at the round's parameters, the
 * full gradient and objective, every per-row gradient and loss of the round's batch, and the held-out loss
 * equal the in-memory objective's on the same (weighted) rows to 1e-12 relative; the view's batch gradient
 * is exactly the scaled mean of the batch's per-row gradients; the independent batch points along the full
 * gradient. Checked at rounds 0 and 2 under the mini-batch and the local SGD strategies.
 */
class ProbeExactnessTest {
    private static final Penalty PENALTY = Penalty.elasticNet(1e-3, 1e-2);
    private static final LogisticRows ROWS = LogisticRows.generate(41, 20_000, 6).weighted();
    private static final LogisticRows HELD_OUT = LogisticRows.generate(42, 500, 6);
    private static LinearObjective inMemory;
    private static PartitionedData data;

    @BeforeAll
    static void prepare() {
        inMemory = LinearObjective.of(ROWS.dataset(), Losses.logistic(), PENALTY, true);
        data = PartitionedData.of(ROWS.frame(3), ROWS.columns());
    }

    @AfterAll
    static void release() {
        data.close();
    }

    @Test
    void miniBatchProbeIsExact() {
        check(Strategy.miniBatch(), 300);
    }

    @Test
    void localSgdProbeIsExact() {
        check(Strategy.localSgd(5), 40);
    }

    private static void check(Strategy strategy, int batchSize) {
        DistributedMinimizer distributed = DistributedMinimizer.builder()
                .loss(Losses::logistic).penalty(() -> PENALTY).strategy(strategy).batchSize(batchSize)
                .stepSize(0.5).rounds(3).seed(5).build();
        Checker checker = new Checker();
        Fit fit = distributed.fit(data, FitOptions.builder().listener(checker).heldOut(HELD_OUT.dataset()).build());
        assertTrue(fit.listenerFailures().isEmpty(), fit.listenerFailures().toString());
        assertEquals(2, checker.checked);
        // Exact up to rounding: the same sums regrouped (common practice, no source).
        assertTrue(checker.worst <= 1e-12, "largest relative error " + checker.worst);
        assertTrue(checker.independentCosine > 0.9, "cosine of the independent batch " + checker.independentCosine);
        assertTrue(fit.probeEvaluations() > 0);
    }

    /** Compares the probe with the in-memory objective at rounds 0 and 2. */
    private static final class Checker implements FitListener {
        int checked;
        double worst;
        double independentCosine = 1;

        @Override
        public void step(StepView view, FitControl control) {
            if (view.step() != 0 && view.step() != 2) {
                return;
            }
            int p = view.dimension();
            double[] h = new double[p];
            view.copyParameters(h);
            Probe probe = view.probe();

            double[] expected = new double[p];
            double value = inMemory.gradient(h, expected);
            double[] actual = new double[p];
            note(relative(probe.fullGradient(actual), value));
            note(distance(actual, expected));
            note(relative(probe.objective(), value));

            int b = view.batchLength();
            double[] penalty = new double[p];
            inMemory.addPenaltyGradient(h, 1.0, penalty);
            double[] mean = new double[p];
            double[] row = new double[p];
            double[] reference = new double[p];
            for (int k = 0; k < b; k++) {
                int i = view.batchIndex(k);
                double loss = probe.sampleGradient(k, row);
                Arrays.fill(reference, 0.0);
                double expectedLoss = inMemory.addSampleGradient(h, i, 1.0, reference);
                inMemory.addPenaltyGradient(h, 1.0, reference);
                note(distance(row, reference));
                note(relative(loss, expectedLoss));
                for (int j = 0; j < p; j++) {
                    mean[j] += view.batchScale(k) * (row[j] - penalty[j]) / b;
                }
            }
            double[] batch = new double[p];
            view.copyBatchGradient(batch);
            for (int j = 0; j < p; j++) {
                mean[j] += penalty[j];
            }
            note(distance(batch, mean));

            double heldOut = 0;
            LinearObjective held = LinearObjective.of(HELD_OUT.dataset(), Losses.logistic(), Penalty.none(), true);
            for (int i = 0; i < held.size(); i++) {
                heldOut += held.sampleLoss(h, i);
            }
            note(relative(probe.heldOutLoss(), heldOut / held.size()));

            double[] independent = new double[p];
            probe.independentBatchGradient(4_000, independent);
            independentCosine = Math.min(independentCosine, dot(independent, expected)
                    / Math.sqrt(dot(independent, independent) * dot(expected, expected)));
            checked++;
        }

        private void note(double error) {
            worst = Math.max(worst, error);
        }
    }

    private static double relative(double actual, double expected) {
        return Math.abs(actual - expected) / Math.abs(expected);
    }

    private static double distance(double[] actual, double[] expected) {
        double diff = 0;
        for (int j = 0; j < actual.length; j++) {
            diff += (actual[j] - expected[j]) * (actual[j] - expected[j]);
        }
        return Math.sqrt(diff / dot(expected, expected));
    }

    private static double dot(double[] a, double[] b) {
        double s = 0;
        for (int j = 0; j < a.length; j++) {
            s += a[j] * b[j];
        }
        return s;
    }
}
