package dev.riskmin.examples.bench;

import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.data.Dataset;
import dev.riskmin.loss.Losses;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.sampling.Sampling;

import java.lang.reflect.Method;
import java.lang.reflect.Modifier;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

/**
 * Figure 2: the cost of visiting rows in random order. Plain SGD, logistic loss, batch 1, on the
 * dense features of figure 1 viewed as n × 100 (the target case) and n × 10 (reported for
 * information: an 80-byte row is one or two cache lines, so each step waits on memory). The median
 * epoch time (epochs 2 onwards) under a sampler is divided by that under sequential sampling, the
 * two fits alternating so that both see the same machine load; the figure is the median of these
 * paired ratios. Target ≤ 1.5.
 *
 * <p>The block-shuffled sampler is looked up by reflection ({@link #blockShuffled()}) because it is
 * being added on another branch; once it is merged, call {@code Sampling.blockShuffled()} directly.
 */
final class SamplingLocality {
    private static final int[] DIMENSIONS = {100, 10};
    private static final Target TARGET = Target.atMost(1.5);
    /** The static factory looked up on {@link Sampling}; SWITCH: replace the reflection once it exists. */
    static final String BLOCK_SHUFFLED_FACTORY = "blockShuffled";

    private SamplingLocality() {
    }

    /** Sequential against without replacement, then the control loop of {@link LocalityProbe}. */
    static List<ResultRow> runWithoutReplacement(BenchSettings s) {
        List<ResultRow> rows = new ArrayList<>(run(s, Sampling.withoutReplacement(), "without replacement"));
        double[] x = SyntheticData.gaussian(s.denseEntries(), 1);
        for (int d : DIMENSIONS) {
            rows.addAll(LocalityProbe.run(s, x, d));
        }
        return rows;
    }

    /** Sequential against block-shuffled, or a row saying the sampler is not there. */
    static List<ResultRow> runBlockShuffled(BenchSettings s) {
        Sampling block = blockShuffled();
        if (block == null) {
            Timing.log("[2] Sampling.%s() not found: skipped", BLOCK_SHUFFLED_FACTORY);
            return List.of(ResultRow.unavailable("2 block-shuffled / sequential",
                    "block-shuffled epoch", TARGET, "Sampling." + BLOCK_SHUFFLED_FACTORY + "() not available"));
        }
        return run(s, block, "block-shuffled (" + block.name() + ")");
    }

    /** @return Sampling.blockShuffled() if the core has it, else null */
    static Sampling blockShuffled() {
        try {
            Method m = Sampling.class.getMethod(BLOCK_SHUFFLED_FACTORY);
            if (!Modifier.isStatic(m.getModifiers())) {
                return null;
            }
            return (Sampling) m.invoke(null);
        } catch (NoSuchMethodException e) {
            return null;
        } catch (ReflectiveOperationException e) {
            throw new IllegalStateException("Sampling." + BLOCK_SHUFFLED_FACTORY + "() failed: " + e, e);
        }
    }

    private static List<ResultRow> run(BenchSettings s, Sampling other, String label) {
        int entries = s.denseEntries();
        double[] x = SyntheticData.gaussian(entries, 1);
        int epochs = s.quick() ? 2 : 4;
        List<ResultRow> rows = new ArrayList<>();
        for (int d : DIMENSIONS) {
            int n = entries / d;
            Dataset data = SyntheticData.denseLabels(x, n, d, d);
            double[] sequential = new double[s.repetitions()];
            double[] shuffled = new double[s.repetitions()];
            for (int r = 0; r < s.repetitions(); r++) {
                sequential[r] = epochNanos(data, Sampling.sequential(), d, epochs, r);
                shuffled[r] = epochNanos(data, other, d, epochs, r);
            }
            double seq = Timing.median(sequential);
            double rnd = Timing.median(shuffled);
            double ratio = Timing.pairedRatio(shuffled, sequential);
            Timing.log("[2] d=%d n=%d: %s epoch %s, sequential %s, ratio %.3f", d, n, label, Timing.duration(rnd),
                    Timing.duration(seq), ratio);
            rows.add(new ResultRow(String.format(Locale.ROOT, "2 %s / sequential d=%d B=1",
                    other == Sampling.withoutReplacement() ? "w/o replacement" : "block-shuffled", d),
                    label + " epoch " + Timing.duration(rnd), "sequential epoch " + Timing.duration(seq),
                    ratio, d >= 100 ? TARGET : null,
                    String.format(Locale.ROOT, "%d MB, n=%d", entries / 125_000, n)));
        }
        return rows;
    }

    private static double epochNanos(Dataset data, Sampling sampling, int d, int epochs, long seed) {
        Minimizer m = Minimizer.builder()
                .loss(Losses.logistic())
                .updateRule(UpdateRule.sgd())
                .sampling(sampling)
                .stepSize(2.0 / (d + 1))
                .epochs(epochs)
                .seed(seed)
                .build();
        EpochClock clock = new EpochClock(epochs);
        EpochClock.requireBudgetSpent(m.fit(data, FitOptions.listeners(clock)));
        return clock.medianEpochNanos(1);
    }
}
