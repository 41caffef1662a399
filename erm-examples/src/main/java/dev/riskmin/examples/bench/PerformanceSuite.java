package dev.riskmin.examples.bench;

import java.io.BufferedReader;
import java.io.IOException;
import java.io.InputStreamReader;
import java.lang.management.ManagementFactory;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

/**
 * The performance suite's entry point: runs each figure group in a JVM of its own (see
 * {@link FigureRunner}), collects the rows and prints the table of figure, baseline, ratio, target
 * and result, with the machine's description and load before and after. Options: see
 * {@link BenchSettings}. Exit status 0 whether or not targets are met (a missed target is a
 * finding, not a failure of the run); 1 if a figure's JVM failed.
 */
public final class PerformanceSuite {
    private PerformanceSuite() {
    }

    public static void main(String[] args) throws IOException, InterruptedException {
        BenchSettings settings = BenchSettings.parse(args);
        long start = System.nanoTime();
        System.out.println(machine(settings));
        System.out.println("load average (1 min) at start: " + load());
        List<ResultRow> rows = new ArrayList<>();
        boolean failed = false;
        for (String group : settings.figures()) {
            long groupStart = System.nanoTime();
            if (settings.inProcess()) {
                rows.addAll(FigureRunner.run(group, settings));
            } else {
                List<ResultRow> got = fork(group, settings);
                if (got == null) {
                    failed = true;
                    rows.add(ResultRow.unavailable(group + " (all)", "its JVM failed", null, "see the log above"));
                } else {
                    rows.addAll(got);
                }
            }
            Timing.log("figure group %s done in %s", group, Timing.duration(System.nanoTime() - groupStart));
        }
        System.out.println();
        System.out.print(ResultTable.format(rows));
        System.out.println();
        System.out.println(String.format(Locale.ROOT, "total %s; load average (1 min) at end: %s",
                Timing.duration(System.nanoTime() - start), load()));
        if (failed) {
            System.exit(1);
        }
    }

    /** Runs one group in a new JVM with the same classpath; null if it failed. */
    private static List<ResultRow> fork(String group, BenchSettings settings) throws IOException, InterruptedException {
        List<String> command = new ArrayList<>();
        command.add(Path.of(System.getProperty("java.home"), "bin", "java").toString());
        command.addAll(childJvmFlags(settings));
        command.add("-cp");
        command.add(System.getProperty("java.class.path"));
        command.add(FigureRunner.class.getName());
        command.add(group);
        command.addAll(settings.childArguments());
        Process process = new ProcessBuilder(command).redirectError(ProcessBuilder.Redirect.INHERIT).start();
        List<ResultRow> rows = new ArrayList<>();
        try (BufferedReader out = new BufferedReader(new InputStreamReader(process.getInputStream(),
                StandardCharsets.UTF_8))) {
            String line;
            while ((line = out.readLine()) != null) {
                if (ResultRow.isEncoded(line)) {
                    rows.add(ResultRow.parse(line));
                } else {
                    System.out.println(line);
                }
            }
        }
        int status = process.waitFor();
        if (status != 0) {
            Timing.log("figure group %s: its JVM exited with status %d", group, status);
            return null;
        }
        return rows;
    }

    /** The flags of each figure's JVM: a fixed heap ceiling, nothing else changed from the defaults. */
    static List<String> childJvmFlags(BenchSettings settings) {
        return List.of("-Xms1g", "-Xmx" + settings.heap());
    }

    private static String machine(BenchSettings settings) {
        Runtime rt = Runtime.getRuntime();
        long memory = -1;
        if (ManagementFactory.getOperatingSystemMXBean() instanceof com.sun.management.OperatingSystemMXBean os) {
            memory = os.getTotalMemorySize();
        }
        return String.format(Locale.ROOT,
                "riskmin performance suite: %d processors, %.1f GiB memory, %s %s (%s), figure JVM flags %s, "
                        + "options %s",
                rt.availableProcessors(), memory / (double) (1L << 30), System.getProperty("java.vm.name"),
                System.getProperty("java.version"), System.getProperty("os.arch"), childJvmFlags(settings), settings);
    }

    private static String load() {
        double load = ManagementFactory.getOperatingSystemMXBean().getSystemLoadAverage();
        return load < 0 ? "unknown" : String.format(Locale.ROOT, "%.2f", load);
    }
}
