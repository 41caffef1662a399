package dev.riskmin.diagnostics;

import java.util.EnumSet;
import java.util.Set;

/**
 * Which events a subscriber receives: a set of kinds, and a cadence — every k-th event of each
 * kind (the first one included). Verdict events always pass the cadence. Immutable.
 */
public final class EventFilter {
    private static final EventFilter ALL = new EventFilter(EnumSet.allOf(EventKind.class), 1);

    private final Set<EventKind> kinds;
    private final int every;

    private EventFilter(Set<EventKind> kinds, int every) {
        this.kinds = kinds;
        this.every = every;
    }

    /** Every event of every kind. */
    public static EventFilter all() {
        return ALL;
    }

    /** Every event of the given kinds. */
    public static EventFilter of(EventKind first, EventKind... rest) {
        return new EventFilter(EnumSet.of(first, rest), 1);
    }

    /**
     * @return this filter passing only every k-th event of each kind
     * @throws IllegalArgumentException if k &lt; 1
     */
    public EventFilter every(int k) {
        if (k < 1) {
            throw new IllegalArgumentException("event cadence (" + k + ") must be >= 1");
        }
        return new EventFilter(kinds.isEmpty() ? EnumSet.noneOf(EventKind.class) : EnumSet.copyOf(kinds), k);
    }

    /** @return whether the kind is selected */
    public boolean accepts(EventKind kind) {
        return kinds.contains(kind);
    }

    /** @return the cadence k */
    public int cadence() {
        return every;
    }

    @Override
    public String toString() {
        return "EventFilter" + kinds + (every > 1 ? " every " + every : "");
    }
}
