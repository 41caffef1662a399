package dev.riskmin.spark;

import dev.riskmin.sampling.Sampling;
import org.junit.jupiter.api.Test;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;

/**
 * Proportional allocation by largest remainders (Cochran, Sampling Techniques, 1977, ch. 5, from memory;
 * the largest-remainder rule is common practice, no source), with every non-empty partition drawn at
 * least once and no more rows than it holds without replacement.
 */
class AllocationTest {

    @Test
    void exactQuotasAreKept() {
        assertArrayEquals(new int[] {1, 2, 3, 4},
                Allocation.proportional(10, new int[] {10, 20, 30, 40}, Sampling.withoutReplacement()));
    }

    @Test
    void leftoverDrawsGoToTheLargestRemainders() {
        // Quotas 3.33, 3.33, 3.33 for B = 10: one left over, to the first of the tied remainders.
        assertArrayEquals(new int[] {4, 3, 3},
                Allocation.proportional(10, new int[] {100, 100, 100}, Sampling.withoutReplacement()));
        // Quotas 2.5, 7.5 -> floors 2, 7, one left over: both remainders are 0.5, the lower index wins.
        assertArrayEquals(new int[] {3, 7},
                Allocation.proportional(10, new int[] {25, 75}, Sampling.withoutReplacement()));
    }

    @Test
    void everyFilledPartitionIsDrawnAndEmptyOnesAreNot() {
        // Quotas 0.1, 0, 0.1, 9.8: the leftover draw goes to the 0.8 remainder, then the small ones get one each.
        assertArrayEquals(new int[] {1, 0, 1, 10},
                Allocation.proportional(10, new int[] {1, 0, 1, 98}, Sampling.withoutReplacement()));
    }

    @Test
    void aSmallPartitionGivesAllItsRowsWithoutReplacementOnly() {
        assertArrayEquals(new int[] {2, 48},
                Allocation.proportional(100, new int[] {2, 48}, Sampling.withoutReplacement()));
        assertArrayEquals(new int[] {4, 96},
                Allocation.proportional(100, new int[] {2, 48}, Sampling.withReplacement()));
    }
}
