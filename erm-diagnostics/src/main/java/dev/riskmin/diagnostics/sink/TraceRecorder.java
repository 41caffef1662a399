package dev.riskmin.diagnostics.sink;

import dev.riskmin.diagnostics.AngleEvent;
import dev.riskmin.diagnostics.DiagnosticEvent;
import dev.riskmin.diagnostics.EventKind;
import dev.riskmin.diagnostics.EventListener;
import dev.riskmin.diagnostics.LossEvent;
import dev.riskmin.diagnostics.NoiseEvent;
import dev.riskmin.diagnostics.StoppingEvent;
import dev.riskmin.diagnostics.VerdictEvent;
import dev.riskmin.util.Arguments;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Optional;

/**
 * Keeps the events it receives in memory, for a report drawn after the fit, with typed accessors by
 * kind.
 *
 * <p><b>Capacity policy</b> ({@link #bounded(int)}): each kind is kept apart, with at most
 * {@code capacity} events, so that a frequent kind never crowds out a rare one. Number the events of
 * one kind 0, 1, 2, … as they arrive. A kind keeps exactly the events whose number is a multiple of
 * its stride s, which starts at 1; when keeping the next one would exceed the capacity, every second
 * kept event is dropped and s doubles. Hence the kept events are evenly spaced over the whole run,
 * the first event of each kind is always kept, s is the smallest power of two with
 * ⌈arrived/s⌉ ≤ capacity, and a full kind holds between ⌈capacity/2⌉ and capacity events. Memory is
 * O(capacity) per kind however long the fit; the cost per event is O(1) amortized. The latest verdict
 * is kept apart as well ({@link #latestVerdict()}), whatever the thinning did.
 *
 * <p>Thread-safe: the fitting thread records while another thread may read snapshots.
 */
public final class TraceRecorder implements EventListener {
    private final int capacity;
    private final Lane[] lanes = new Lane[EventKind.values().length];
    private long sequence;
    private VerdictEvent latestVerdict;

    private TraceRecorder(int capacity) {
        this.capacity = capacity;
        for (int k = 0; k < lanes.length; k++) {
            lanes[k] = new Lane();
        }
    }

    /** Keeps every event (memory grows with the fit). */
    public static TraceRecorder unbounded() {
        return new TraceRecorder(Integer.MAX_VALUE);
    }

    /**
     * Keeps at most {@code capacity} events of each kind, thinned as the class documentation says.
     *
     * @throws IllegalArgumentException if capacity &lt; 2
     */
    public static TraceRecorder bounded(int capacity) {
        if (capacity < 2) {
            throw new IllegalArgumentException("capacity (" + capacity + ") must be >= 2");
        }
        return new TraceRecorder(capacity);
    }

    @Override
    public synchronized void onEvent(DiagnosticEvent event) {
        Arguments.notNull("event", event);
        if (event instanceof VerdictEvent v) {
            latestVerdict = v;
        }
        lanes[event.kind().ordinal()].offer(event, sequence++, capacity);
    }

    /** @return the kept events of every kind, in the order they arrived (a snapshot) */
    public synchronized List<DiagnosticEvent> events() {
        List<DiagnosticEvent> all = new ArrayList<>();
        int[] next = new int[lanes.length];
        while (true) {
            int best = -1;
            for (int k = 0; k < lanes.length; k++) {
                if (next[k] < lanes[k].size && (best < 0 || lanes[k].order[next[k]] < lanes[best].order[next[best]])) {
                    best = k;
                }
            }
            if (best < 0) {
                return all;
            }
            all.add(lanes[best].events.get(next[best]++));
        }
    }

    /** @return the kept events of one kind, in the order they arrived (a snapshot) */
    public synchronized List<DiagnosticEvent> events(EventKind kind) {
        return List.copyOf(lanes[Arguments.notNull("kind", kind).ordinal()].events);
    }

    /** @return the kept noise events */
    public List<NoiseEvent> noise() {
        return typed(EventKind.NOISE, NoiseEvent.class);
    }

    /** @return the kept angle events */
    public List<AngleEvent> angles() {
        return typed(EventKind.ANGLE, AngleEvent.class);
    }

    /** @return the kept loss events */
    public List<LossEvent> losses() {
        return typed(EventKind.LOSS, LossEvent.class);
    }

    /** @return the kept stopping-test events */
    public List<StoppingEvent> stopping() {
        return typed(EventKind.STOPPING, StoppingEvent.class);
    }

    /** @return the kept verdict events */
    public List<VerdictEvent> verdicts() {
        return typed(EventKind.VERDICT, VerdictEvent.class);
    }

    /** @return the latest verdict event received, kept even when thinning dropped it from {@link #verdicts()} */
    public synchronized Optional<VerdictEvent> latestVerdict() {
        return Optional.ofNullable(latestVerdict);
    }

    /** @return how many events of the kind arrived (kept or not) */
    public synchronized long arrived(EventKind kind) {
        return lanes[Arguments.notNull("kind", kind).ordinal()].arrived;
    }

    /** @return the kind's current stride s: it keeps the events numbered 0, s, 2s, … */
    public synchronized long stride(EventKind kind) {
        return lanes[Arguments.notNull("kind", kind).ordinal()].stride;
    }

    /** @return the capacity per kind ({@link Integer#MAX_VALUE} when unbounded) */
    public int capacity() {
        return capacity;
    }

    /** Forgets every event, to record another fit. */
    public synchronized void clear() {
        for (int k = 0; k < lanes.length; k++) {
            lanes[k] = new Lane();
        }
        latestVerdict = null;
        sequence = 0;
    }

    private synchronized <T extends DiagnosticEvent> List<T> typed(EventKind kind, Class<T> type) {
        List<T> out = new ArrayList<>(lanes[kind.ordinal()].size);
        for (DiagnosticEvent e : lanes[kind.ordinal()].events) {
            out.add(type.cast(e));
        }
        return List.copyOf(out);
    }

    /** One kind's kept events with their arrival order across kinds. */
    private static final class Lane {
        final ArrayList<DiagnosticEvent> events = new ArrayList<>();
        long[] order = new long[16];
        int size;
        long arrived;
        long stride = 1;

        void offer(DiagnosticEvent event, long seq, int capacity) {
            long number = arrived++;
            if (number % stride != 0) {
                return;
            }
            if (size == capacity) {
                thin();
                if (number % stride != 0) {
                    return;
                }
            }
            if (size == order.length) {
                order = Arrays.copyOf(order, (int) Math.min(Integer.MAX_VALUE - 8, 2L * size));
            }
            order[size++] = seq;
            events.add(event);
        }

        /** Keeps the events at even positions (numbers that are multiples of 2s) and doubles s. */
        private void thin() {
            int kept = 0;
            for (int i = 0; i < size; i += 2) {
                order[kept] = order[i];
                events.set(kept, events.get(i));
                kept++;
            }
            events.subList(kept, size).clear();
            size = kept;
            stride *= 2;
        }
    }
}
