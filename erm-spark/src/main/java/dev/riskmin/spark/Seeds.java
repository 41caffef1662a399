package dev.riskmin.spark;

import java.util.random.RandomGenerator;
import java.util.random.RandomGeneratorFactory;

/**
 * The seeds of a distributed fit. Every random choice on an executor comes from a generator seeded by
 * s(seed, stream, r, k) = seed ⊕ mix(stream·2<sup>63</sup> + r·2<sup>32</sup> + k) for round r &lt; 2<sup>31</sup>
 * and partition k &lt; 2<sup>32</sup>, where mix is the bijective 64-bit finalizer of SplitMix64 (Steele, Lea
 * &amp; Flood, "Fast splittable pseudorandom number generators", OOPSLA 2014; the constants are Stafford's
 * "Mix13", from memory). Because the key is distinct for distinct (stream, r, k) and mix is a bijection
 * with mix(0) = 0:
 * <ul>
 * <li>distinct (stream, round, partition) triples get distinct seeds, so no two partitions or rounds
 * share a stream of draws;</li>
 * <li>partition 0 in round 0 of the fit stream gets the fit's seed itself, so a one-partition,
 * one-round local SGD run draws exactly what {@code Minimizer.fit} draws with the same seed.</li>
 * </ul>
 * A generator is made from a seed as the core's {@code Minimizer} makes its own: an
 * {@value #GENERATOR} created from the seed, of which the sampler gets the first split.
 */
final class Seeds {
    /** The algorithm of the core's {@code Minimizer}. */
    static final String GENERATOR = "L64X128MixRandom";
    /** The stream of the fit's own draws (batches and local runs). */
    static final int FIT = 0;
    /** The stream of the probe's independent batches. */
    static final int PROBE = 1;

    private Seeds() {
    }

    /**
     * @throws IllegalArgumentException if the round is outside [0, 2<sup>31</sup>) or the partition is negative
     */
    static long derive(long seed, int stream, long round, int partition) {
        if (round < 0 || round > Integer.MAX_VALUE) {
            throw new IllegalArgumentException("round (" + round + ") must be in [0, " + Integer.MAX_VALUE + "]");
        }
        if (partition < 0) {
            throw new IllegalArgumentException("partition (" + partition + ") must be >= 0");
        }
        long key = ((long) stream << 63) | (round << 32) | partition;
        return seed ^ mix(key);
    }

    /** The SplitMix64 finalizer: a bijection of the 64-bit integers with mix(0) = 0. */
    static long mix(long z) {
        z = (z ^ (z >>> 30)) * 0xbf58476d1ce4e5b9L;
        z = (z ^ (z >>> 27)) * 0x94d049bb133111ebL;
        return z ^ (z >>> 31);
    }

    /** @return the sampler's generator for a derived seed, made as the core's {@code Minimizer} makes its own */
    static RandomGenerator samplerGenerator(long derivedSeed) {
        RandomGenerator.SplittableGenerator master =
                RandomGeneratorFactory.<RandomGenerator.SplittableGenerator>of(GENERATOR).create(derivedSeed);
        return master.split();
    }
}
