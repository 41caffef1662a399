package dev.riskmin.examples.bench;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.data.Dataset;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.diagnostics.estimator.AngleMonitor;
import dev.riskmin.diagnostics.estimator.LossMonitor;
import dev.riskmin.diagnostics.estimator.NoiseMonitor;
import dev.riskmin.diagnostics.sink.TraceRecorder;
import dev.riskmin.hook.FitControl;
import dev.riskmin.hook.FitListener;
import dev.riskmin.hook.StepView;
import dev.riskmin.loss.Losses;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.penalty.Penalty;
import org.openjdk.jmh.annotations.Benchmark;
import org.openjdk.jmh.annotations.BenchmarkMode;
import org.openjdk.jmh.annotations.Mode;
import org.openjdk.jmh.annotations.OutputTimeUnit;
import org.openjdk.jmh.annotations.Param;
import org.openjdk.jmh.annotations.Scope;
import org.openjdk.jmh.annotations.Setup;
import org.openjdk.jmh.annotations.State;

import java.util.concurrent.TimeUnit;

/**
 * Figure 6's JMH benchmark: one operation is a whole fit of {@code steps} steps on warm data with a
 * listener that reads the step's loss and counter at every step. Run under JMH's GC profiler,
 * gc.alloc.rate.norm is the bytes allocated per fit; the difference between a 10,000-step fit and
 * a 10-step fit, divided by 9,990, is the allocation per steady-state step (the fit's set-up and
 * result, allocated once per fit, cancel). Cases: plain SGD on dense (n = 10,000, d = 20) and
 * sparse (d = 100,000, 20 non-zeros per row) features with L2(1e-4), SAGA on the dense features,
 * and plain SGD on dense features with the default diagnostics and a bounded trace recorder.
 */
@State(Scope.Benchmark)
@BenchmarkMode(Mode.AverageTime)
@OutputTimeUnit(TimeUnit.MILLISECONDS)
public class StepAllocationBenchmark {
    /** The cases, named as in the result table. */
    @Param({"sgd-dense", "sgd-sparse", "saga-dense", "sgd-dense+diagnostics"})
    public String kind;

    @Param({"10", "10000"})
    public long steps;

    private Dataset data;
    private Minimizer minimizer;
    private FitOptions options;
    private final ReadingListener listener = new ReadingListener();

    /** Reads what a cheap monitor reads, every step; allocates nothing. */
    static final class ReadingListener implements FitListener {
        long seen;
        double lossSum;

        @Override
        public void step(StepView view, FitControl control) {
            seen += view.step();
            lossSum += view.batchLoss();
        }
    }

    @Setup
    public void setUp() {
        int n = 10_000;
        if (kind.equals("sgd-sparse")) {
            data = SyntheticData.sparseLabels(n, 100_000, 20, 6);
        } else {
            data = SyntheticData.denseLabels(SyntheticData.gaussian(n * 20, 6), n, 20, 6);
        }
        minimizer = Minimizer.builder()
                .loss(Losses.logistic())
                .penalty(Penalty.l2(1e-4))
                .updateRule(kind.startsWith("saga") ? UpdateRule.saga() : UpdateRule.sgd())
                .stepSize(0.05)
                .maxSteps(steps)
                .seed(6)
                .build();
        options = FitOptions.listeners(listener);
    }

    @Benchmark
    public Fit fit() {
        if (kind.endsWith("+diagnostics")) {
            // One Diagnostics serves one fit; its construction is set-up and cancels in the difference.
            Diagnostics diagnostics = Diagnostics.builder()
                    .monitor(NoiseMonitor.defaults())
                    .monitor(AngleMonitor.defaults())
                    .monitor(LossMonitor.defaults())
                    .subscribe(TraceRecorder.bounded(64))
                    .build();
            return minimizer.fit(data, FitOptions.listeners(listener, diagnostics));
        }
        return minimizer.fit(data, options);
    }
}
