package dev.riskmin.sampling;

import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

import dev.riskmin.testing.Cases;
import java.lang.management.ManagementFactory;
import java.util.stream.Stream;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

/**
 * BatchSource.next must allocate nothing: the thread's allocated-bytes counter
 * (com.sun.management.ThreadMXBean, a HotSpot extension) must not move over 100,000 calls after a
 * warm-up, beyond a small allowance for the measurement itself.
 */
class SamplingAllocationTest {
    private static final long ALLOWANCE_BYTES = 256;

    static Stream<Sampling> samplings() {
        return SamplingContractTest.samplings();
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("samplings")
    void nextAllocatesNothing(Sampling sampling) {
        java.lang.management.ThreadMXBean bean = ManagementFactory.getThreadMXBean();
        assumeTrue(bean instanceof com.sun.management.ThreadMXBean, "no HotSpot thread allocation counter");
        com.sun.management.ThreadMXBean threads = (com.sun.management.ThreadMXBean) bean;
        assumeTrue(threads.isThreadAllocatedMemorySupported() && threads.isThreadAllocatedMemoryEnabled(),
                "thread allocation counter disabled");

        BatchSource source = sampling.start(SamplingContractTest.context(), Cases.rng(9));
        int[] batch = new int[16];
        double[] scales = new double[16];
        long checksum = 0;
        for (int k = 0; k < 100_000; k++) { // warm-up: let the JIT compile next()
            source.next(batch, scales, 1 + k % 16);
            checksum += batch[0];
        }
        long before = threads.getCurrentThreadAllocatedBytes();
        for (int k = 0; k < 100_000; k++) {
            source.next(batch, scales, 1 + k % 16);
            checksum += batch[0];
        }
        long after = threads.getCurrentThreadAllocatedBytes();
        long allocated = after - before;
        assertTrue(checksum >= 0);
        assertTrue(allocated <= ALLOWANCE_BYTES,
                sampling.name() + ": next() allocated " + allocated + " bytes over 100,000 calls");
    }
}
