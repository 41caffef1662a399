/**
 * Estimators that watch a fit through the diagnostics host: the gradient-noise variance and the
 * noise scale ({@link dev.riskmin.diagnostics.estimator.NoiseMonitor}, with the formulas in
 * {@link dev.riskmin.diagnostics.estimator.NoiseStatistics}), descent-angle statistics
 * ({@link dev.riskmin.diagnostics.estimator.AngleMonitor}) and loss traces
 * ({@link dev.riskmin.diagnostics.estimator.LossMonitor}), each paying for its costly measurements
 * at a {@link dev.riskmin.diagnostics.estimator.Cadence}.
 *
 * <p>Null policy: no method accepts null unless its documentation says so; a null argument gives a
 * {@link java.lang.NullPointerException} naming it. Thread safety: {@code NoiseStatistics} and
 * {@code Cadence} are stateless or immutable and safe to share; a monitor holds the state of one
 * fit and is used on that fit's thread only (its configuration methods return new monitors).
 */
package dev.riskmin.diagnostics.estimator;
