/**
 * Diagnostics as Micrometer meters: {@link dev.riskmin.diagnostics.metrics.MeterBridge} publishes a
 * fit's events and progress as gauges and counters under this library's own names.
 *
 * <p>Micrometer is an optional dependency of this module: only this package refers to it, so an
 * application without Micrometer on its class path uses the rest of the module and never loads a
 * Micrometer class. An application that wants the bridge declares {@code io.micrometer:micrometer-core}
 * itself (it usually has it already).
 *
 * <p>Null is never a valid argument. The bridge is thread-safe; see its documentation for what its
 * gauges show when several fits feed one bridge.
 */
package dev.riskmin.diagnostics.metrics;
