/**
 * Training data: feature matrices (dense row-major or compressed sparse rows), targets, sample
 * weights and strata, validated once at construction, and feature standardization.
 *
 * <p>Null is never a valid argument. Every type here is immutable after construction (arrays handed
 * in are copied unless a method documents that it wraps them), and therefore safe to share across
 * threads.
 */
package dev.riskmin.data;
