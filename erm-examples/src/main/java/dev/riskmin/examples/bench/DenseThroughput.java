package dev.riskmin.examples.bench;

import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.data.Dataset;
import dev.riskmin.loss.Loss;
import dev.riskmin.loss.Losses;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.sampling.Sampling;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

/**
 * Figure 1: dense epoch throughput. One array of standard-normal features (the configured size) is
 * viewed as n × d for d = 10, 100, 1000; plain SGD on the logistic loss, no penalty, sequential
 * sampling (so the figure is the step's arithmetic and memory traffic, not the sampler's: figure 2
 * measures that), batch 1 and 256. Throughput = n·d·8 bytes / median epoch time (epochs 2 onwards,
 * from {@link EpochClock}); the baseline is a four-way summing pass over the same array (median of
 * three just before and three just after each fit). Ratio = epoch throughput / read throughput, the
 * median over repetitions of the ratio within each; target ≥ 0.5 for d ≥ 100. One more case, d = 100
 * and batch 1 with the squared loss, shows what the logistic loss's exp and log cost (information).
 */
final class DenseThroughput {
    private static final int[] DIMENSIONS = {10, 100, 1000};
    private static final int[] BATCHES = {1, 256};
    private static final Target TARGET = Target.atLeast(0.5);

    private DenseThroughput() {
    }

    static List<ResultRow> run(BenchSettings s) {
        int entries = s.denseEntries();
        double[] x = SyntheticData.gaussian(entries, 1);
        int epochs = s.quick() ? 2 : 4;
        List<ResultRow> rows = new ArrayList<>();
        for (int d : DIMENSIONS) {
            int n = entries / d;
            Dataset data = SyntheticData.denseLabels(x, n, d, d);
            for (int b : BATCHES) {
                rows.add(measure(s, x, data, Losses.logistic(), b, epochs, d >= 100 ? TARGET : null));
            }
            if (d == 100) {
                // The same case with a loss free of transcendental functions: how much of the gap
                // the logistic loss's exp and log take (the targets are in {0, 1}, valid for both).
                rows.add(measure(s, x, data, Losses.squared(), 1, epochs, null));
            }
        }
        return rows;
    }

    private static ResultRow measure(BenchSettings s, double[] x, Dataset data, Loss loss, int b, int epochs,
                                     Target target) {
        int entries = x.length;
        int d = data.dimension();
        int n = data.size();
        double bytes = (double) entries * Double.BYTES;
        double[] reads = new double[s.repetitions()];
        double[] epochTimes = new double[s.repetitions()];
        double[] ratios = new double[s.repetitions()];
        for (int r = 0; r < s.repetitions(); r++) {
            double before = Timing.medianNanos(3, () -> Timing.sequentialRead(x, entries));
            Minimizer m = Minimizer.builder()
                    .loss(loss)
                    .updateRule(UpdateRule.sgd())
                    .sampling(Sampling.sequential())
                    .batchSize(b)
                    // half of 1/L with L = sup ℓ'' · (‖x‖² + 1) ≈ sup ℓ'' · (d + 1): stable, and given so
                    // that no default-step pass runs
                    .stepSize(0.5 / (loss.smoothness() * (d + 1)))
                    .epochs(epochs)
                    .seed(r)
                    .build();
            EpochClock clock = new EpochClock(epochs);
            EpochClock.requireBudgetSpent(m.fit(data, FitOptions.listeners(clock)));
            epochTimes[r] = clock.medianEpochNanos(1);
            double after = Timing.medianNanos(3, () -> Timing.sequentialRead(x, entries));
            reads[r] = 0.5 * (before + after);
            ratios[r] = reads[r] / epochTimes[r];
        }
        double epoch = Timing.median(epochTimes);
        double read = Timing.median(reads);
        // The median of per-repetition ratios: each pairs a fit with the reads just around it, so a
        // burst of load from other processes moves both sides of one ratio.
        double ratio = Timing.median(ratios);
        Timing.log("[1] %s d=%d B=%d n=%d: epoch %s (%s), read %s (%s), ratio %.3f", loss.name(), d, b, n,
                Timing.duration(epoch), Timing.rate(bytes, epoch), Timing.duration(read), Timing.rate(bytes, read),
                ratio);
        return new ResultRow(String.format(Locale.ROOT, "1 dense epoch d=%d B=%d%s", d, b,
                loss.name().equals("logistic") ? "" : ", " + loss.name() + " loss"),
                "epoch " + Timing.rate(bytes, epoch) + " (" + Timing.duration(epoch) + ")",
                "read " + Timing.rate(bytes, read) + " (" + Timing.duration(read) + ")",
                ratio, target, String.format(Locale.ROOT, "%d MB, n=%d", entries / 125_000, n));
    }
}
