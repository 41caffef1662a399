/**
 * Pointwise losses ℓ(z, y) of a prediction z and a target y: value, derivative in z, smoothness
 * constant, convexity and accepted target domain. Each implementation is immutable and
 * thread-safe; every method is allocation-free, and stable for |z| up to 1e300 (never NaN; a value
 * is +∞ only where the true value exceeds the largest double).
 */
package dev.riskmin.loss;
