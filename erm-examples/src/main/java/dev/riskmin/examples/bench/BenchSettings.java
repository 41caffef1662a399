package dev.riskmin.examples.bench;

import java.util.ArrayList;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Set;

/**
 * The suite's options, parsed from the command line (each argument may hold several options
 * separated by spaces, so that one Maven property can carry them all):
 * <ul>
 * <li>{@code --size-mb=N}: megabytes of dense features for figures 1, 2, 4, 5 and 7 (default 200;
 * the full size is 800);</li>
 * <li>{@code --figures=1,3,…}: which figures to run (default all, 1 to 7);</li>
 * <li>{@code --quick}: tiny sizes and few repetitions, a check that everything runs (seconds, not
 * a measurement);</li>
 * <li>{@code --heap=6g}: the maximum heap of each figure's JVM;</li>
 * <li>{@code --in-process}: run the figures in this JVM rather than one JVM each (for debugging;
 * the JIT's profile of one figure then colours the next).</li>
 * </ul>
 *
 * @param sizeMb    megabytes of dense features
 * @param figures   the figure groups to run, in order
 * @param quick     whether to run the tiny smoke configuration
 * @param heap      the -Xmx value of each figure's JVM
 * @param inProcess whether to run in this JVM
 */
public record BenchSettings(int sizeMb, List<String> figures, boolean quick, String heap, boolean inProcess) {
    /** The figure groups, in the order they run; 2b is figure 2 with the block-shuffled sampler. */
    public static final List<String> ALL = List.of("1", "2", "2b", "3", "4", "5", "6", "7");

    public BenchSettings {
        if (sizeMb < 1) {
            throw new IllegalArgumentException("--size-mb (" + sizeMb + ") must be >= 1");
        }
        figures = List.copyOf(figures);
    }

    /**
     * @throws IllegalArgumentException naming an unknown option or figure
     */
    public static BenchSettings parse(String... args) {
        int size = 200;
        Set<String> figures = new LinkedHashSet<>(ALL);
        boolean quick = false;
        String heap = "6g";
        boolean inProcess = false;
        for (String arg : args) {
            for (String option : arg.trim().split("\\s+")) {
                if (option.isEmpty()) {
                    continue;
                }
                if (option.startsWith("--size-mb=")) {
                    size = Integer.parseInt(option.substring("--size-mb=".length()));
                } else if (option.startsWith("--figures=")) {
                    figures = new LinkedHashSet<>();
                    for (String f : option.substring("--figures=".length()).split(",")) {
                        if (!ALL.contains(f)) {
                            throw new IllegalArgumentException("--figures: unknown figure " + f + "; known: " + ALL);
                        }
                        figures.add(f);
                        if (f.equals("2")) {
                            figures.add("2b");
                        }
                    }
                } else if (option.equals("--quick")) {
                    quick = true;
                } else if (option.startsWith("--heap=")) {
                    heap = option.substring("--heap=".length());
                } else if (option.equals("--in-process")) {
                    inProcess = true;
                } else {
                    throw new IllegalArgumentException("unknown option " + option
                            + "; known: --size-mb=N --figures=1,2,... --quick --heap=6g --in-process");
                }
            }
        }
        List<String> ordered = new ArrayList<>();
        for (String f : ALL) {
            if (figures.contains(f)) {
                ordered.add(f);
            }
        }
        return new BenchSettings(quick ? Math.min(size, 4) : size, ordered, quick, heap, inProcess);
    }

    /** @return the options that a figure's JVM needs to reproduce these settings */
    public List<String> childArguments() {
        List<String> out = new ArrayList<>();
        out.add("--size-mb=" + sizeMb);
        if (quick) {
            out.add("--quick");
        }
        return out;
    }

    /** @return the number of doubles in the dense feature array: sizeMb MB, a multiple of 1000 so d = 10, 100, 1000 all divide it */
    public int denseEntries() {
        long entries = (long) sizeMb * 1_000_000L / Double.BYTES;
        entries -= entries % 1000;
        if (entries > Integer.MAX_VALUE - 8) {
            throw new IllegalArgumentException("--size-mb (" + sizeMb + ") exceeds the largest Java array");
        }
        return (int) Math.max(1000, entries);
    }

    /** @return how many times a timed case is repeated (the median is reported) */
    public int repetitions() {
        return quick ? 1 : 5;
    }
}
