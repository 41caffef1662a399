package dev.riskmin.examples.bench;

import org.openjdk.jmh.profile.GCProfiler;
import org.openjdk.jmh.results.Result;
import org.openjdk.jmh.results.RunResult;
import org.openjdk.jmh.runner.Runner;
import org.openjdk.jmh.runner.RunnerException;
import org.openjdk.jmh.runner.options.Options;
import org.openjdk.jmh.runner.options.OptionsBuilder;
import org.openjdk.jmh.runner.options.TimeValue;
import org.openjdk.jmh.runner.options.VerboseMode;

import java.util.ArrayList;
import java.util.Collection;
import java.util.HashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

/**
 * Figure 6: bytes allocated per steady-state step, from JMH's GC profiler
 * (gc.alloc.rate.norm, bytes per operation) on {@link StepAllocationBenchmark}:
 * (B/op of a 10,000-step fit − B/op of a 10-step fit) / 9,990. One fork, short iterations: the
 * allocation figure is exact per thread (it reads the thread's allocated-bytes counter), so it needs
 * no long runs. Target: 0 bytes per step (the row's ratio is the bytes per step; anything below
 * 0.5 B/step rounds to zero and passes).
 */
final class AllocationPerStep {
    private static final Target TARGET = Target.atMost(0.5);
    private static final long LONG_FIT = 10_000;
    private static final long SHORT_FIT = 10;

    private AllocationPerStep() {
    }

    static List<ResultRow> run(BenchSettings s) {
        Options options = new OptionsBuilder()
                .include(StepAllocationBenchmark.class.getName().replace(".", "\\.") + "\\.fit")
                .forks(1)
                .warmupIterations(s.quick() ? 1 : 3)
                .warmupTime(TimeValue.milliseconds(s.quick() ? 100 : 500))
                .measurementIterations(s.quick() ? 1 : 3)
                .measurementTime(TimeValue.milliseconds(s.quick() ? 100 : 500))
                .jvmArgs("-Xms512m", "-Xmx512m")
                .addProfiler(GCProfiler.class)
                .verbosity(VerboseMode.SILENT)
                .build();
        Collection<RunResult> results;
        try {
            results = new Runner(options).run();
        } catch (RunnerException e) {
            throw new IllegalStateException("JMH run failed: " + e.getMessage(), e);
        }
        Map<String, double[]> perKind = new HashMap<>();
        List<String> order = new ArrayList<>();
        for (RunResult r : results) {
            String kind = r.getParams().getParam("kind");
            long steps = Long.parseLong(r.getParams().getParam("steps"));
            double norm = allocationNorm(r);
            if (!perKind.containsKey(kind)) {
                perKind.put(kind, new double[] {Double.NaN, Double.NaN});
                order.add(kind);
            }
            perKind.get(kind)[steps == LONG_FIT ? 1 : 0] = norm;
            Timing.log("[6] %s, %d steps: %.1f B/op, %.3f ms/op", kind, steps, norm, r.getPrimaryResult().getScore());
        }
        List<ResultRow> rows = new ArrayList<>();
        for (String kind : order) {
            double[] b = perKind.get(kind);
            double perStep = (b[1] - b[0]) / (LONG_FIT - SHORT_FIT);
            rows.add(new ResultRow("6 allocation per step, " + kind,
                    String.format(Locale.ROOT, "%.0f B per %d-step fit", b[1], LONG_FIT),
                    String.format(Locale.ROOT, "%.0f B per %d-step fit", b[0], SHORT_FIT),
                    perStep, kind.endsWith("+diagnostics") ? null : TARGET,
                    "ratio = B/step = difference / " + (LONG_FIT - SHORT_FIT)));
        }
        return rows;
    }

    private static double allocationNorm(RunResult r) {
        for (Map.Entry<String, Result> e : r.getSecondaryResults().entrySet()) {
            if (e.getKey().endsWith("gc.alloc.rate.norm")) {
                return e.getValue().getScore();
            }
        }
        throw new IllegalStateException("JMH reported no gc.alloc.rate.norm; secondary results: "
                + r.getSecondaryResults().keySet());
    }
}
