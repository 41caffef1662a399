package dev.riskmin.step;

import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

import java.lang.management.ManagementFactory;
import java.util.stream.Stream;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

/**
 * StepSchedule.stepSize must allocate nothing: the thread's allocated-bytes counter
 * (com.sun.management.ThreadMXBean, a HotSpot extension) must not move over 100,000 calls after a
 * warm-up, beyond a small allowance for the measurement itself.
 */
class ScheduleAllocationTest {
    private static final long ALLOWANCE_BYTES = 256;

    static Stream<StepSchedule> schedules() {
        return Stream.of(StepSchedule.constant(0.1), StepSchedule.inverseTime(0.5, 1e-3),
                StepSchedule.polynomial(1, 100, 0.75), StepSchedule.stepDecay(1, 0.5, 1000),
                StepSchedule.cosineRestarts(0.1, 0.001, 100, 1), StepSchedule.cosineRestarts(0.1, 0.001, 7, 1.5),
                StepSchedule.warmUp(StepSchedule.inverseTime(0.5, 1e-3), 5_000));
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("schedules")
    void stepSizeAllocatesNothing(StepSchedule schedule) {
        java.lang.management.ThreadMXBean bean = ManagementFactory.getThreadMXBean();
        assumeTrue(bean instanceof com.sun.management.ThreadMXBean, "no HotSpot thread allocation counter");
        com.sun.management.ThreadMXBean threads = (com.sun.management.ThreadMXBean) bean;
        assumeTrue(threads.isThreadAllocatedMemorySupported() && threads.isThreadAllocatedMemoryEnabled(),
                "thread allocation counter disabled");
        double sum = 0;
        for (long t = 0; t < 100_000; t++) {
            sum += schedule.stepSize(t);
        }
        long before = threads.getCurrentThreadAllocatedBytes();
        for (long t = 100_000; t < 200_000; t++) {
            sum += schedule.stepSize(t);
        }
        long allocated = threads.getCurrentThreadAllocatedBytes() - before;
        assertTrue(sum > 0);
        assertTrue(allocated <= ALLOWANCE_BYTES,
                schedule.name() + ": stepSize allocated " + allocated + " bytes over 100,000 calls");
    }
}
