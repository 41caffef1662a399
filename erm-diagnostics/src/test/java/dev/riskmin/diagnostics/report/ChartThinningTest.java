package dev.riskmin.diagnostics.report;

import dev.riskmin.testing.Cases;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** The shared point budget of a plot and the even thinning of a long series. */
class ChartThinningTest {

    @Test
    void shortSeriesKeepEverythingAndLongOnesSplitTheRest() {
        assertArrayEquals(new int[] {950, 950, 100, 0}, Chart.allotments(new int[] {10_000, 10_000, 100, 0}, 2000));
        assertArrayEquals(new int[] {3, 5}, Chart.allotments(new int[] {3, 5}, 2000));
        assertArrayEquals(new int[] {0, 2, 5, 7, 9}, Chart.evenlySpaced(10, 5)); // ⌊(9k + 2)/4⌋
        assertArrayEquals(new int[] {0}, Chart.evenlySpaced(10, 1));
        assertArrayEquals(new int[] {0, 1, 2}, Chart.evenlySpaced(3, 7));
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void allotmentsStayWithinTheBudgetAndThinnedIndicesAreEvenFromFirstToLast(long seed) {
        RandomGenerator rng = Cases.rng(seed);
        int[] sizes = new int[rng.nextInt(1, 7)];
        for (int i = 0; i < sizes.length; i++) {
            sizes[i] = rng.nextBoolean() ? rng.nextInt(0, 300) : rng.nextInt(0, 50_000);
        }
        int budget = rng.nextInt(sizes.length, 5000);
        int[] kept = Chart.allotments(sizes, budget);
        long total = 0;
        long all = 0;
        for (int i = 0; i < sizes.length; i++) {
            assertTrue(kept[i] >= 0 && kept[i] <= sizes[i]);
            total += kept[i];
            all += sizes[i];
            if (sizes[i] <= budget / sizes.length) {
                assertEquals(sizes[i], kept[i], "a short series keeps all its points");
            }
        }
        assertTrue(total <= budget, total + " > " + budget);
        assertTrue(total == all || total > budget - sizes.length, "the budget is used: " + total + " of " + budget);
        for (int i = 0; i < sizes.length; i++) {
            int[] idx = Chart.evenlySpaced(sizes[i], kept[i]);
            assertEquals(kept[i], idx.length);
            if (idx.length >= 2) {
                assertEquals(0, idx[0]);
                assertEquals(sizes[i] - 1, idx[idx.length - 1]);
                double gap = (sizes[i] - 1.0) / (idx.length - 1);
                for (int k = 1; k < idx.length; k++) {
                    int d = idx[k] - idx[k - 1];
                    assertTrue(d >= 1 && Math.abs(d - gap) <= 1, "gap " + d + " vs " + gap);
                }
            }
        }
    }
}
