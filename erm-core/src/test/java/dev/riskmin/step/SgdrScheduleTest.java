package dev.riskmin.step;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/**
 * SGDR (Loshchilov &amp; Hutter, ICLR 2017): η = η_min + (η_max − η_min)(1 + cos(π T_cur/T_i))/2, with
 * T_i multiplied by the growth after each restart. Checks from METHODS §5: the endpoints are η_max and
 * η_min, the midpoint is their mean.
 */
class SgdrScheduleTest {
    private static final double MAX = 0.1;
    private static final double MIN = 0.001;

    private static double cosine(double fraction) {
        return MIN + (MAX - MIN) * (1 + Math.cos(Math.PI * fraction)) / 2;
    }

    @Test
    void endpointsAndMidpointOfOneCycle() {
        StepSchedule s = StepSchedule.cosineRestarts(MAX, MIN, 100, 1);
        assertEquals(MAX, s.stepSize(0), 0.0);
        assertEquals((MAX + MIN) / 2, s.stepSize(50), 1e-16);
        // The last step of a cycle sits just above η_min, which is the limit at the restart.
        assertEquals(cosine(0.99), s.stepSize(99), 1e-16);
        assertTrue(s.stepSize(99) - MIN < 1e-3 * (MAX - MIN));
        for (long t = 1; t < 100; t++) {
            assertTrue(s.stepSize(t) < s.stepSize(t - 1), "not decreasing at t=" + t);
            assertTrue(s.stepSize(t) > MIN);
        }
    }

    @Test
    void fixedPeriodRestartsEveryPeriod() {
        StepSchedule s = StepSchedule.cosineRestarts(MAX, MIN, 100, 1);
        for (long cycle = 1; cycle < 5; cycle++) {
            assertEquals(MAX, s.stepSize(100 * cycle), 0.0, "restart " + cycle);
            assertEquals((MAX + MIN) / 2, s.stepSize(100 * cycle + 50), 1e-16);
            assertEquals(s.stepSize(37), s.stepSize(100 * cycle + 37), 0.0);
        }
    }

    @Test
    void doublingPeriodRestartsAtTheGeometricBoundaries() {
        // T_0 = 10, T_mult = 2: cycles of 10, 20, 40, 80 steps start at 0, 10, 30, 70 and 150.
        StepSchedule s = StepSchedule.cosineRestarts(MAX, MIN, 10, 2);
        long[] starts = {0, 10, 30, 70, 150};
        for (int i = 0; i + 1 < starts.length; i++) {
            long length = starts[i + 1] - starts[i];
            assertEquals(MAX, s.stepSize(starts[i]), 0.0, "restart at " + starts[i]);
            assertEquals((MAX + MIN) / 2, s.stepSize(starts[i] + length / 2), 1e-16, "midpoint of cycle " + i);
            assertEquals(cosine((length - 1.0) / length), s.stepSize(starts[i + 1] - 1), 1e-16,
                    "last step of cycle " + i);
            assertEquals(cosine(3.0 / length), s.stepSize(starts[i] + 3), 1e-16);
        }
    }

    @ParameterizedTest(name = "period={0}, growth={1}")
    @CsvSource({"3, 1.5", "4, 1.5", "1, 2", "1, 3", "2, 10", "7, 1", "5, 1.1", "2, 3.7"})
    void matchesCycleByCycleReference(long period, double growth) {
        // Reference: walk the cycles one by one, lengths T_i = T_0 growth^i, boundaries at their sums.
        StepSchedule s = StepSchedule.cosineRestarts(MAX, MIN, period, growth);
        double start = 0;
        double length = period;
        for (long t = 0; t < 5_000; t++) {
            while (t >= start + length) {
                start += length;
                length *= growth;
            }
            double expected = cosine((t - start) / length);
            assertEquals(expected, s.stepSize(t), 1e-12, "t=" + t);
        }
    }

    @Test
    void minimumZeroAndEqualBoundsAreAllowed() {
        assertEquals(0.5, StepSchedule.cosineRestarts(1, 0, 10, 1).stepSize(5), 1e-16);
        assertEquals(0.2, StepSchedule.cosineRestarts(0.2, 0.2, 10, 1).stepSize(7), 0.0);
    }
}
