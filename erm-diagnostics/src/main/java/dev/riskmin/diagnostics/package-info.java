/**
 * Convergence diagnostics that attach to a fit through the hook of {@code dev.riskmin.hook}:
 * gradient-noise and descent-angle estimators, stopping tests, a health verdict and sinks.
 * This module depends on the core; the core never depends on it.
 */
package dev.riskmin.diagnostics;
