package dev.riskmin.step;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import java.util.stream.Stream;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.function.Executable;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.Arguments;
import org.junit.jupiter.params.provider.MethodSource;

/** Bad parameters are refused with a message naming the option and the value. */
class ScheduleValidationTest {
    private static final double NAN = Double.NaN;
    private static final double INF = Double.POSITIVE_INFINITY;

    private static Arguments bad(String message, Executable call) {
        return Arguments.of(message, call);
    }

    static Stream<Arguments> badParameters() {
        return Stream.of(
                bad("stepSize (-0.1) must be finite and > 0", () -> StepSchedule.constant(-0.1)),
                bad("stepSize (NaN) must be finite and > 0", () -> StepSchedule.constant(NAN)),
                bad("stepSize (0.0) must be finite and > 0", () -> StepSchedule.constant(0)),
                bad("stepSize (Infinity) must be finite and > 0", () -> StepSchedule.constant(INF)),
                bad("initialStepSize (NaN) must be finite and > 0", () -> StepSchedule.inverseTime(NAN, 1)),
                bad("initialStepSize (-1.0) must be finite and > 0", () -> StepSchedule.inverseTime(-1, 1)),
                bad("lambda (-1.0) must be finite and >= 0", () -> StepSchedule.inverseTime(1, -1)),
                bad("lambda (NaN) must be finite and >= 0", () -> StepSchedule.inverseTime(1, NAN)),
                bad("initialStepSize (-2.0) must be finite and > 0", () -> StepSchedule.polynomial(-2, 1, 1)),
                bad("t0 (0.0) must be finite and > 0", () -> StepSchedule.polynomial(1, 0, 1)),
                bad("t0 (Infinity) must be finite and > 0", () -> StepSchedule.polynomial(1, INF, 1)),
                bad("power (-0.5) must be finite and >= 0", () -> StepSchedule.polynomial(1, 1, -0.5)),
                bad("power (NaN) must be finite and >= 0", () -> StepSchedule.polynomial(1, 1, NAN)),
                bad("initialStepSize (0.0) must be finite and > 0", () -> StepSchedule.stepDecay(0, 0.5, 10)),
                bad("factor (1.5) must be in (0, 1]", () -> StepSchedule.stepDecay(1, 1.5, 10)),
                bad("factor (0.0) must be in (0, 1]", () -> StepSchedule.stepDecay(1, 0, 10)),
                bad("factor (NaN) must be in (0, 1]", () -> StepSchedule.stepDecay(1, NAN, 10)),
                bad("every (0) must be >= 1", () -> StepSchedule.stepDecay(1, 0.5, 0)),
                bad("maxStepSize (NaN) must be finite and > 0", () -> StepSchedule.cosineRestarts(NAN, 0, 10, 1)),
                bad("minStepSize (0.2) must be in [0, maxStepSize (0.1)]",
                        () -> StepSchedule.cosineRestarts(0.1, 0.2, 10, 1)),
                bad("minStepSize (-0.01) must be in [0, maxStepSize (0.1)]",
                        () -> StepSchedule.cosineRestarts(0.1, -0.01, 10, 1)),
                bad("minStepSize (NaN) must be in [0, maxStepSize (0.1)]",
                        () -> StepSchedule.cosineRestarts(0.1, NAN, 10, 1)),
                bad("period (0) must be >= 1", () -> StepSchedule.cosineRestarts(0.1, 0, 0, 1)),
                bad("periodGrowth (0.5) must be finite and >= 1", () -> StepSchedule.cosineRestarts(0.1, 0, 10, 0.5)),
                bad("periodGrowth (NaN) must be finite and >= 1", () -> StepSchedule.cosineRestarts(0.1, 0, 10, NAN)),
                bad("periodGrowth (Infinity) must be finite and >= 1",
                        () -> StepSchedule.cosineRestarts(0.1, 0, 10, INF)),
                bad("steps (0) must be >= 1", () -> StepSchedule.warmUp(StepSchedule.constant(1), 0)),
                bad("t (-1) must be >= 0", () -> StepSchedule.constant(1).stepSize(-1)),
                bad("t (-5) must be >= 0", () -> StepSchedule.inverseTime(1, 1).stepSize(-5)),
                bad("t (-1) must be >= 0", () -> StepSchedule.polynomial(1, 1, 1).stepSize(-1)),
                bad("t (-1) must be >= 0", () -> StepSchedule.stepDecay(1, 0.5, 3).stepSize(-1)),
                bad("t (-1) must be >= 0", () -> StepSchedule.cosineRestarts(1, 0, 3, 2).stepSize(-1)),
                bad("t (-1) must be >= 0", () -> StepSchedule.warmUp(StepSchedule.constant(1), 3).stepSize(-1)));
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("badParameters")
    void refusesWithTheOptionNamed(String message, Executable call) {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, call);
        assertEquals(message, e.getMessage());
    }

    @Test
    void refusesNullInnerSchedule() {
        NullPointerException e = assertThrows(NullPointerException.class, () -> StepSchedule.warmUp(null, 5));
        assertEquals("inner must not be null", e.getMessage());
    }
}
