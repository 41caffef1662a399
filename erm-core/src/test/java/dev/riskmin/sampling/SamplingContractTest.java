package dev.riskmin.sampling;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.riskmin.testing.Cases;
import java.util.Arrays;
import java.util.stream.Stream;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

/** What every sampler promises: determinism per seed, batch-size checks, names. */
class SamplingContractTest {
    static final int N = 45;

    static Stream<Sampling> samplings() {
        return Stream.of(Sampling.withReplacement(), Sampling.withoutReplacement(), Sampling.stratified(),
                Sampling.importance(), Sampling.importance(0.2), Sampling.sequential(), Sampling.blockShuffled(),
                Sampling.blockShuffled(4));
    }

    static SamplingContext context() {
        int[] strata = new int[N];
        for (int i = 0; i < N; i++) {
            strata[i] = i % 7 == 0 ? 2 : i % 3 == 0 ? 1 : 0;
        }
        return SamplingContext.of(N, strata, i -> 1.0 + (i % 5) * (i % 5));
    }

    /** Draws batches of varying size (a listener may change B between calls). */
    static int[] stream(Sampling sampling, long seed, double[] scalesOut) {
        BatchSource source = sampling.start(context(), Cases.rng(seed));
        int[] sizes = {5, 1, 9, 13, 4};
        int total = 0;
        int[] all = new int[40 * 13];
        int[] batch = new int[13];
        double[] scales = new double[13];
        for (int b = 0; b < 40; b++) {
            int size = sizes[b % sizes.length];
            source.next(batch, scales, size);
            System.arraycopy(batch, 0, all, total, size);
            System.arraycopy(scales, 0, scalesOut, total, size);
            total += size;
        }
        return Arrays.copyOf(all, total);
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("samplings")
    void sameSeedGivesIdenticalBatches(Sampling sampling) {
        double[] scalesA = new double[40 * 13];
        double[] scalesB = new double[40 * 13];
        int[] a = stream(sampling, 77, scalesA);
        int[] b = stream(sampling, 77, scalesB);
        assertArrayEquals(a, b);
        assertArrayEquals(scalesA, scalesB);
        for (int i : a) {
            assertTrue(i >= 0 && i < N, "index " + i + " outside [0, " + N + ")");
        }
        int[] other = stream(sampling, 78, scalesB);
        if (sampling == Sampling.sequential()) {
            assertArrayEquals(a, other, "sequential order draws nothing from the generator");
        } else {
            assertFalse(Arrays.equals(a, other), "another seed gave the same batches");
        }
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("samplings")
    void refusesBatchSizeBelowOne(Sampling sampling) {
        IllegalArgumentException check = assertThrows(IllegalArgumentException.class, () -> sampling.checkBatchSize(0, N));
        assertEquals("batchSize (0) must be >= 1", check.getMessage());
        BatchSource source = sampling.start(context(), Cases.rng(1));
        IllegalArgumentException next = assertThrows(IllegalArgumentException.class,
                () -> source.next(new int[4], new double[4], -2));
        assertEquals("batchSize (-2) must be >= 1", next.getMessage());
        sampling.checkBatchSize(N, N);
        assertFalse(sampling.name().isEmpty());
        assertEquals(sampling == Sampling.stratified(), sampling.needsStrata());
    }

    @Test
    void batchLargerThanNIsAllowedOnlyWithReplacement() {
        Sampling.withReplacement().checkBatchSize(N + 1, N);
        Sampling.importance().checkBatchSize(N + 1, N);
        Sampling.sequential().checkBatchSize(N + 1, N);
        assertThrows(IllegalArgumentException.class, () -> Sampling.withoutReplacement().checkBatchSize(N + 1, N));
        assertThrows(IllegalArgumentException.class, () -> Sampling.stratified().checkBatchSize(N + 1, N));
        assertThrows(IllegalArgumentException.class, () -> Sampling.blockShuffled().checkBatchSize(N + 1, N));
    }

    @Test
    void sequentialRunsInStorageOrderAndWraps() {
        BatchSource source = Sampling.sequential().start(SamplingContext.of(5, null, null), Cases.rng(1));
        assertTrue(source.uniformScales());
        int[] batch = new int[3];
        double[] scales = new double[3];
        int[][] expected = {{0, 1, 2}, {3, 4, 0}, {1, 2, 3}, {4, 0, 1}};
        for (int[] want : expected) {
            source.next(batch, scales, 3);
            assertArrayEquals(want, batch);
            assertArrayEquals(new double[] {1, 1, 1}, scales);
        }
        int[] seven = new int[7];
        source.next(seven, new double[7], 7); // B > n wraps more than once
        assertArrayEquals(new int[] {2, 3, 4, 0, 1, 2, 3}, seven);
    }

    @Test
    void importanceSamplingsCompareByUniformShare() {
        assertEquals(Sampling.importance(), Sampling.importance(0.5));
        assertNotEquals(Sampling.importance(), Sampling.importance(0.25));
        assertEquals(Sampling.importance().hashCode(), Sampling.importance(0.5).hashCode());
    }

    @Test
    void refusesNullArguments() {
        assertThrows(NullPointerException.class, () -> Sampling.withReplacement().start(null, Cases.rng(1)));
        assertThrows(NullPointerException.class, () -> Sampling.withoutReplacement().start(context(), null));
    }
}
