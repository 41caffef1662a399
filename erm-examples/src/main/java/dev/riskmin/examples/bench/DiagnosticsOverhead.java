package dev.riskmin.examples.bench;

import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.data.Dataset;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.diagnostics.estimator.AngleMonitor;
import dev.riskmin.diagnostics.estimator.Cadence;
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
 * (set-up included, a fresh Diagnostics per fit). Ratio = the median of the paired ratios
 * with / without, minus one; target ≤ 0.05. A third fit in each round has the same monitors with
 * every cadence set to never, which isolates the cost of being called at every step (reported for
 * information).
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
        int reps = s.quick() ? 1 : 9;
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
            m.fit(data); // warm-up: every variant then starts compiled
            m.fit(data, FitOptions.listeners(diagnostics(TraceRecorder.bounded(1024), false)));
            m.fit(data, FitOptions.listeners(diagnostics(TraceRecorder.bounded(1024), true)));
            double[] without = new double[reps];
            double[] with = new double[reps];
            double[] hookOnly = new double[reps];
            long events = 0;
            for (int r = 0; r < reps; r++) {
                without[r] = time(m, data, null);
                TraceRecorder recorder = TraceRecorder.bounded(1024);
                with[r] = time(m, data, diagnostics(recorder, false));
                events = recorder.events().size();
                hookOnly[r] = time(m, data, diagnostics(TraceRecorder.bounded(1024), true));
            }
            double plain = Timing.median(without);
            double monitored = Timing.median(with);
            double ratio = Timing.pairedRatio(with, without) - 1.0;
            double hook = Timing.pairedRatio(hookOnly, without) - 1.0;
            Timing.log("[5] B=%d n=%d: with diagnostics %s, without %s, overhead %.2f %% (%d events kept);"
                    + " monitors that never measure: %.2f %%", b, n, Timing.duration(monitored),
                    Timing.duration(plain), 100 * ratio, events, 100 * hook);
            String note = String.format(Locale.ROOT, "n=%d, d=%d, %d epochs; ratio = extra time / time", n, D, epochs);
            rows.add(new ResultRow("5 diagnostics overhead B=" + b, "fit with diagnostics " + Timing.duration(monitored),
                    "fit without " + Timing.duration(plain), ratio, b == 1 ? TARGET : null, note));
            rows.add(new ResultRow("5 of which per-step hook B=" + b, "fit with never-measuring monitors "
                    + Timing.duration(Timing.median(hookOnly)), "fit without " + Timing.duration(plain), hook, null,
                    "the same monitors with every cadence never: the cost of being called at each step"));
        }
        return rows;
    }

    private static double time(Minimizer m, Dataset data, Diagnostics diagnostics) {
        FitOptions options = diagnostics == null ? FitOptions.none() : FitOptions.listeners(diagnostics);
        long start = System.nanoTime();
        m.fit(data, options);
        return System.nanoTime() - start;
    }

    /** @param idle whether every monitor's cadence is never: the hook's own per-step cost */
    private static Diagnostics diagnostics(TraceRecorder recorder, boolean idle) {
        NoiseMonitor noise = NoiseMonitor.defaults();
        AngleMonitor angle = AngleMonitor.defaults();
        LossMonitor loss = LossMonitor.defaults();
        if (idle) {
            noise = noise.withCadence(Cadence.never()).withReferenceCadence(Cadence.never());
            angle = angle.withCadence(Cadence.never());
            loss = loss.withObjectiveCadence(Cadence.never()).withHeldOutCadence(Cadence.never());
        }
        return Diagnostics.builder().monitor(noise).monitor(angle).monitor(loss).subscribe(recorder).build();
    }
}
