package dev.riskmin.spark;

import org.junit.jupiter.api.Test;

import java.util.HashSet;
import java.util.Set;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** The seed derivation documented on {@link DistributedMinimizer#partitionSeed}. */
class SeedsTest {

    @Test
    void partitionZeroOfRoundZeroGetsTheFitsSeed() {
        for (long seed : new long[] {0, 1, -1, 42, Long.MIN_VALUE, Long.MAX_VALUE}) {
            assertEquals(seed, DistributedMinimizer.partitionSeed(seed, 0, 0));
        }
    }

    @Test
    void distinctRoundsPartitionsAndStreamsGetDistinctSeeds() {
        Set<Long> seen = new HashSet<>();
        for (int stream : new int[] {Seeds.FIT, Seeds.PROBE}) {
            for (long r = 0; r < 100; r++) {
                for (int k = 0; k < 100; k++) {
                    seen.add(Seeds.derive(7, stream, r, k));
                }
            }
        }
        // A bijective mix of distinct keys cannot collide (the keys differ, so do their images).
        assertEquals(2 * 100 * 100, seen.size());
        seen.clear();
        for (int k = 0; k < 1000; k++) {
            seen.add(Seeds.derive(7, Seeds.FIT, Integer.MAX_VALUE, k));
        }
        assertEquals(1000, seen.size());
    }

    @Test
    void theMixIsTheSplitMix64Finalizer() {
        assertEquals(0L, Seeds.mix(0));
        // Known value: the SplitMix64 stream seeded with 0 starts with mix(0x9e3779b97f4a7c15)
        // = 0xe220a8397b1dcdaf (Steele, Lea & Flood 2014; the value from memory of the reference code).
        assertEquals(0xe220a8397b1dcdafL, Seeds.mix(0x9e3779b97f4a7c15L));
    }

    @Test
    void roundsAndPartitionsOutsideTheKeyAreRefused() {
        String round = assertThrows(IllegalArgumentException.class,
                () -> DistributedMinimizer.partitionSeed(1, -1, 0)).getMessage();
        assertEquals("round (-1) must be in [0, 2147483647]", round);
        String partition = assertThrows(IllegalArgumentException.class,
                () -> DistributedMinimizer.partitionSeed(1, 0, -2)).getMessage();
        assertEquals("partition (-2) must be >= 0", partition);
        assertTrue(Seeds.derive(1, Seeds.FIT, Integer.MAX_VALUE, Integer.MAX_VALUE) != 1);
    }
}
