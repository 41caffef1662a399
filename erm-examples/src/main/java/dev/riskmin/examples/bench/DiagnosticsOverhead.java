package dev.riskmin.examples.bench;

import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.data.Dataset;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.diagnostics.estimator.AngleMonitor;
import dev.riskmin.diagnostics.estimator.LossMonitor;
import dev.riskmin.diagnostics.estimator.NoiseMonitor;
import dev.riskmin.diagnostics.sink.TraceRecorder;
import dev.riskmin.loss.Losses;
import dev.riskmin.method.UpdateRule;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

/**
 * Figure 5: what the diagnostics cost at their default cadence. The same fit (plain SGD, logistic
 * loss, default sampling, dense n × 100 features of the configured size, 3 epochs) runs with and
 * without a {@link Diagnostics} holding the noise, angle and loss monitors at their defaults and a
 * bounded {@link TraceRecorder} subscribed to every event; the two alternate, each timed whole
 * (set-up included, a fresh Diagnostics per fit). Ratio = (with − without) / without; target ≤ 0.05.
 * Batch 1 is the target case (the listener runs at every step, so its fixed cost per step weighs
 * most); batch 64 is reported for information.
 */
final class DiagnosticsOverhead {
    private static final int D = 100;
    private static final int[] BATCHES = {1, 64};
    private static final Target TARGET = Target.atMost(0.05);

    private DiagnosticsOverhead() {
    }

    static List<ResultRow> run(BenchSettings s) {
        int entries = s.denseEntries();
        int n = entries / D;
        double[] x = SyntheticData.gaussian(entries, 5);
        Dataset data = SyntheticData.denseLabels(x, n, D, 5);
        int epochs = s.quick() ? 1 : 3;
        int reps = s.quick() ? 1 : 5;
        List<ResultRow> rows = new ArrayList<>();
        for (int b : BATCHES) {
            Minimizer m = Minimizer.builder()
                    .loss(Losses.logistic())
                    .updateRule(UpdateRule.sgd())
                    .batchSize(b)
                    .stepSize(2.0 / (D + 1))
                    .epochs(epochs)
                    .seed(5)
                    .build();
            m.fit(data); // warm-up: both variants then start compiled
            m.fit(data, FitOptions.listeners(diagnostics(TraceRecorder.bounded(1024))));
            double[] without = new double[reps];
            double[] with = new double[reps];
            long events = 0;
            for (int r = 0; r < reps; r++) {
                long start = System.nanoTime();
                m.fit(data);
                without[r] = System.nanoTime() - start;
                TraceRecorder recorder = TraceRecorder.bounded(1024);
                Diagnostics diagnostics = diagnostics(recorder);
                start = System.nanoTime();
                m.fit(data, FitOptions.listeners(diagnostics));
                with[r] = System.nanoTime() - start;
                events = recorder.events().size();
            }
            double plain = Timing.median(without);
            double monitored = Timing.median(with);
            double ratio = (monitored - plain) / plain;
            Timing.log("[5] B=%d n=%d: with diagnostics %s, without %s, overhead %.2f %% (%d events kept)", b, n,
                    Timing.duration(monitored), Timing.duration(plain), 100 * ratio, events);
            rows.add(new ResultRow("5 diagnostics overhead B=" + b, "fit with diagnostics " + Timing.duration(monitored),
                    "fit without " + Timing.duration(plain), ratio, b == 1 ? TARGET : null,
                    String.format(Locale.ROOT, "n=%d, d=%d, %d epochs; ratio = extra time / time", n, D, epochs)));
        }
        return rows;
    }

    private static Diagnostics diagnostics(TraceRecorder recorder) {
        return Diagnostics.builder()
                .monitor(NoiseMonitor.defaults())
                .monitor(AngleMonitor.defaults())
                .monitor(LossMonitor.defaults())
                .subscribe(recorder)
                .build();
    }
}
