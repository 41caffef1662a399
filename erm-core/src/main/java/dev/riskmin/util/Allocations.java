package dev.riskmin.util;

import java.util.Locale;

/**
 * Refuses, before anything is allocated, a request whose buffers could never fit: more entries
 * than the largest Java array, or more bytes than this JVM's maximum heap
 * ({@link Runtime#maxMemory()}). A request that passes may still fail for want of free memory;
 * one that fails here would have ended in an {@link OutOfMemoryError} (or a long collection before
 * it), so it is refused with the size named instead. The rule: refuse when entries &gt; 2<sup>31</sup> − 9
 * or entries × bytes per entry &gt; the maximum heap (common practice, no source).
 */
public final class Allocations {
    /** The largest array length every common JVM allows (a few entries below Integer.MAX_VALUE). */
    public static final int MAX_ARRAY_LENGTH = Integer.MAX_VALUE - 8;
    /**
     * The least a fit keeps per parameter: eight vectors of doubles (the start, the iterate, its
     * gradient, the last finite iterate, the average, the result and its copies), before any state
     * of the update rule.
     */
    public static final int BYTES_PER_PARAMETER = 64;
    /** The per-draw buffers of a batch: the loop's index and scale, and the update rule's value per draw. */
    public static final int BYTES_PER_DRAW = 24;

    private Allocations() {
    }

    /**
     * @param what          names the request and its value for the message, e.g. "batchSize (1073741824)"
     * @param entries       the length of the largest array the request needs
     * @param bytesPerEntry the bytes all of the request's buffers hold per entry
     * @throws IllegalArgumentException naming the request, its size and the limit it exceeds
     */
    public static void require(String what, long entries, long bytesPerEntry) {
        if (entries > MAX_ARRAY_LENGTH) {
            throw new IllegalArgumentException(what + " needs arrays of " + entries
                    + " entries, more than the largest Java array (" + MAX_ARRAY_LENGTH + ")");
        }
        long heap = Runtime.getRuntime().maxMemory();
        if (heap != Long.MAX_VALUE && entries > 0 && bytesPerEntry > 0 && entries > heap / bytesPerEntry) {
            throw new IllegalArgumentException(what + " needs " + entries + " entries of " + bytesPerEntry
                    + " bytes (" + bytes((double) entries * bytesPerEntry) + "), more than this JVM's maximum heap ("
                    + bytes(heap) + ")");
        }
    }

    /** Refuses a parameter vector of length p that a fit could never hold (see {@link #BYTES_PER_PARAMETER}). */
    public static void requireParameters(String what, long p) {
        require(what, p, BYTES_PER_PARAMETER);
    }

    private static String bytes(double b) {
        return String.format(Locale.ROOT, "%.1f MiB", b / (1 << 20));
    }
}
