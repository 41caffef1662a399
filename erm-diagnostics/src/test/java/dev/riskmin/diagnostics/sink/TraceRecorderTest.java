package dev.riskmin.diagnostics.sink;

import dev.riskmin.diagnostics.AngleEvent;
import dev.riskmin.diagnostics.Decision;
import dev.riskmin.diagnostics.DiagnosticEvent;
import dev.riskmin.diagnostics.EventKind;
import dev.riskmin.diagnostics.LossEvent;
import dev.riskmin.diagnostics.NoiseEvent;
import dev.riskmin.diagnostics.StoppingEvent;
import dev.riskmin.diagnostics.VerdictEvent;
import dev.riskmin.diagnostics.verdict.Condition;
import dev.riskmin.diagnostics.verdict.HealthVerdict;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

import java.util.ArrayList;
import java.util.List;
import java.util.Map;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** The in-memory recorder keeps every event, or a bounded, evenly thinned share of each kind. */
class TraceRecorderTest {

    static LossEvent loss(long step) {
        return new LossEvent(step, 0, step, Double.NaN, Double.NaN, Double.NaN, Double.NaN, 0.1, 8);
    }

    static VerdictEvent verdict(long step) {
        return new VerdictEvent(step, 0, new HealthVerdict(Condition.CONVERGED, "s" + step, "a", Map.of()));
    }

    static List<Long> steps(List<? extends DiagnosticEvent> events) {
        List<Long> steps = new ArrayList<>();
        events.forEach(e -> steps.add(e.step()));
        return steps;
    }

    /** The policy's promise: the multiples of the smallest power-of-two stride s with ⌈arrived/s⌉ ≤ capacity. */
    static List<Long> expected(long arrived, int capacity) {
        long s = 1;
        while ((arrived + s - 1) / s > capacity) {
            s *= 2;
        }
        List<Long> kept = new ArrayList<>();
        for (long i = 0; i < arrived; i += s) {
            kept.add(i);
        }
        return kept;
    }

    @ParameterizedTest(name = "capacity={0}")
    @ValueSource(ints = {2, 3, 8, 13, 64})
    void boundedKindKeepsEvenlySpacedEventsFromTheFirstAfterEveryArrival(int capacity) {
        TraceRecorder recorder = TraceRecorder.bounded(capacity);
        for (long i = 0; i < 1500; i++) {
            recorder.onEvent(loss(i));
            List<Long> kept = steps(recorder.losses());
            assertEquals(expected(i + 1, capacity), kept, "after " + (i + 1) + " arrivals");
            assertTrue(kept.size() <= capacity);
            if (i + 1 >= capacity) {
                assertTrue(kept.size() >= (capacity + 1) / 2, "at least half full: " + kept.size());
            }
        }
        assertEquals(1500, recorder.arrived(EventKind.LOSS));
        long stride = recorder.stride(EventKind.LOSS);
        assertEquals(Long.bitCount(stride), 1, "stride " + stride + " is a power of two");
    }

    @Test
    void aFrequentKindDoesNotCrowdOutARareOneAndArrivalOrderIsKept() {
        TraceRecorder recorder = TraceRecorder.bounded(4);
        List<DiagnosticEvent> stopping = new ArrayList<>();
        for (long i = 0; i < 300; i++) {
            recorder.onEvent(loss(i));
            if (i % 100 == 50) {
                StoppingEvent e = new StoppingEvent(i, 0, "t", 1, 2, Decision.CONTINUE, "");
                stopping.add(e);
                recorder.onEvent(e);
            }
        }
        assertEquals(stopping, recorder.stopping());
        assertEquals(1, recorder.stride(EventKind.STOPPING));
        assertEquals(List.of(0L, 128L, 256L), steps(recorder.losses()));
        // All kept events in arrival order: loss 0, stopping 50, loss 128, stopping 150 and 250, loss 256.
        assertEquals(List.of(0L, 50L, 128L, 150L, 250L, 256L), steps(recorder.events()));
    }

    @Test
    void theLatestVerdictSurvivesThinning() {
        TraceRecorder recorder = TraceRecorder.bounded(2);
        for (long i = 0; i < 6; i++) {
            recorder.onEvent(verdict(i));
        }
        assertEquals(List.of(0L, 4L), steps(recorder.verdicts())); // stride 4
        assertEquals(5L, recorder.latestVerdict().orElseThrow().step());
    }

    @Test
    void unboundedKeepsEverythingWithTypedAccessors() {
        TraceRecorder recorder = TraceRecorder.unbounded();
        List<DiagnosticEvent> all = new ArrayList<>(TraceFixtures.allKinds());
        for (int i = 0; i < 5000; i++) {
            all.add(loss(i));
        }
        all.forEach(recorder::onEvent);
        assertEquals(all, recorder.events());
        assertEquals(2, recorder.noise().size());
        assertEquals(2, recorder.angles().size());
        assertEquals(5002, recorder.losses().size());
        assertEquals(3, recorder.stopping().size());
        assertEquals(2, recorder.verdicts().size());
        NoiseEvent first = recorder.noise().get(0);
        assertEquals(14.2, first.noiseScale());
        AngleEvent angle = recorder.angles().get(1);
        assertEquals(37.5, angle.angleToOptimum());
        assertEquals(recorder.verdicts().get(1), recorder.latestVerdict().orElseThrow());
        assertEquals(Integer.MAX_VALUE, recorder.capacity());
    }

    @Test
    void snapshotsAreImmutableAndClearForgetsTheRun() {
        TraceRecorder recorder = TraceRecorder.bounded(4);
        recorder.onEvent(loss(1));
        List<LossEvent> snapshot = recorder.losses();
        assertThrows(UnsupportedOperationException.class, () -> snapshot.add(loss(2)));
        recorder.onEvent(loss(2));
        assertEquals(1, snapshot.size());
        recorder.clear();
        assertTrue(recorder.events().isEmpty());
        assertEquals(0, recorder.arrived(EventKind.LOSS));
        assertTrue(recorder.latestVerdict().isEmpty());
    }

    @Test
    void capacityBelowTwoIsRefusedNamingTheValue() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> TraceRecorder.bounded(1));
        assertEquals("capacity (1) must be >= 2", e.getMessage());
    }
}
