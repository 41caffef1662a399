/**
 * Samplers: which samples form each batch. A {@link dev.riskmin.sampling.Sampling} is an immutable
 * configuration; {@link dev.riskmin.sampling.Sampling#start} gives one fit its own
 * {@link dev.riskmin.sampling.BatchSource}, which draws from a seeded generator (same seed, same
 * batches) and allocates nothing per batch. Null is never a valid argument.
 */
package dev.riskmin.sampling;
