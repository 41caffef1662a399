package dev.riskmin.examples.bench;

import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.data.Dataset;
import dev.riskmin.loss.Losses;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.penalty.Penalty;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

/**
 * Figure 4: a sparse epoch against a dense one with as many stored entries per row. Sparse: CSR with
 * 1,000,000 columns and 50 distinct uniformly drawn columns per row (values N(0, 1)); dense: d = 50;
 * the same n (the configured size of dense features / 400 bytes per row) and the same planted-label
 * construction. Plain SGD (which takes the O(non-zeros) path for a single-output linear model with
 * an elastic-net penalty), logistic loss, batch 1, default sampling (without replacement), penalty
 * L2(1e-4) and, separately, L1(1e-4) on both. Median epoch time (epochs 2 onwards), the two fits
 * alternating. Ratio = sparse / dense, the median of the paired ratios; target ≤ 2.
 */
final class SparseEpoch {
    private static final int COLUMNS = 1_000_000;
    private static final int PER_ROW = 50;
    private static final Target TARGET = Target.atMost(2.0);

    private SparseEpoch() {
    }

    static List<ResultRow> run(BenchSettings s) {
        int n = s.denseEntries() / PER_ROW;
        int epochs = s.quick() ? 2 : 4;
        Dataset sparse = SyntheticData.sparseLabels(n, s.quick() ? 10_000 : COLUMNS, PER_ROW, 4);
        double[] x = SyntheticData.gaussian(n * PER_ROW, 4);
        Dataset dense = SyntheticData.denseLabels(x, n, PER_ROW, 4);
        List<ResultRow> rows = new ArrayList<>();
        Penalty[] penalties = {Penalty.l2(1e-4), Penalty.l1(1e-4)};
        String[] names = {"L2", "L1"};
        for (int p = 0; p < penalties.length; p++) {
            double[] sparseTimes = new double[s.repetitions()];
            double[] denseTimes = new double[s.repetitions()];
            for (int r = 0; r < s.repetitions(); r++) {
                sparseTimes[r] = epochNanos(sparse, penalties[p], epochs, r);
                denseTimes[r] = epochNanos(dense, penalties[p], epochs, r);
            }
            double sp = Timing.median(sparseTimes);
            double de = Timing.median(denseTimes);
            double ratio = Timing.pairedRatio(sparseTimes, denseTimes);
            Timing.log("[4] %s n=%d: sparse epoch %s, dense d=50 epoch %s, ratio %.3f", names[p], n,
                    Timing.duration(sp), Timing.duration(de), ratio);
            rows.add(new ResultRow("4 sparse / dense d=50, " + names[p],
                    "sparse epoch " + Timing.duration(sp), "dense epoch " + Timing.duration(de), ratio, TARGET,
                    String.format(Locale.ROOT, "n=%d, %d columns, %d non-zeros per row", n,
                            sparse.dimension(), PER_ROW)));
        }
        return rows;
    }

    private static double epochNanos(Dataset data, Penalty penalty, int epochs, long seed) {
        Minimizer m = Minimizer.builder()
                .loss(Losses.logistic())
                .penalty(penalty)
                .updateRule(UpdateRule.sgd())
                // half of 1/L with L ≈ ¼(‖x‖² + 1) ≈ ¼ · 51, given so that no default-step pass runs
                .stepSize(2.0 / (PER_ROW + 1))
                .epochs(epochs)
                .seed(seed)
                .build();
        EpochClock clock = new EpochClock(epochs);
        EpochClock.requireBudgetSpent(m.fit(data, FitOptions.listeners(clock)));
        return clock.medianEpochNanos(1);
    }
}
