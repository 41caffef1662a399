package dev.riskmin.examples.bench;

import java.util.List;

/**
 * Runs one figure group and prints its rows, encoded, on standard output (progress goes to standard
 * error). {@link PerformanceSuite} starts one JVM per group with this class as its entry point, so
 * that the JIT compiles each figure's loops for that figure's types alone.
 */
public final class FigureRunner {
    private FigureRunner() {
    }

    /** @param args the figure group (1, 2, 2b, …, 7), then the suite's options */
    public static void main(String[] args) {
        if (args.length < 1) {
            throw new IllegalArgumentException("expected a figure group (" + BenchSettings.ALL + ") and options");
        }
        BenchSettings settings = BenchSettings.parse(java.util.Arrays.copyOfRange(args, 1, args.length));
        for (ResultRow row : run(args[0], settings)) {
            System.out.println(row.encode());
        }
        System.out.flush();
    }

    /**
     * @throws IllegalArgumentException naming an unknown group
     */
    public static List<ResultRow> run(String group, BenchSettings settings) {
        switch (group) {
            case "1":
                return DenseThroughput.run(settings);
            case "2":
                return SamplingLocality.runWithoutReplacement(settings);
            case "2b":
                return SamplingLocality.runBlockShuffled(settings);
            case "3":
                return TimeToAccuracy.run(settings);
            case "4":
                return SparseEpoch.run(settings);
            case "5":
                return DiagnosticsOverhead.run(settings);
            case "6":
                return AllocationPerStep.run(settings);
            case "7":
                return ThreadScaling.run(settings);
            default:
                throw new IllegalArgumentException("figure group " + group + " is unknown; known: " + BenchSettings.ALL);
        }
    }
}
