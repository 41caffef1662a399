/**
 * Penalties R(w) on the coefficients (never the intercepts), applied through their gradient where
 * smooth and through a proximal operator where not, so that L1 yields exact zeros. Immutable and
 * thread-safe; every method is allocation-free.
 */
package dev.riskmin.penalty;
