/**
 * Sinks for diagnostic events: a line reporter through SLF4J, trace writers (CSV and JSON lines)
 * with a reader that loads their traces back, and an in-memory recorder. Each sink is an
 * {@link dev.riskmin.diagnostics.EventListener} subscribed through
 * {@link dev.riskmin.diagnostics.Diagnostics.Builder#subscribe}; which events it receives, and at
 * what cadence, is set by the subscription's {@link dev.riskmin.diagnostics.EventFilter}.
 *
 * <p>A sink never throws into a fit: a trace writer whose stream fails records the failure, reports
 * it once at WARN and drops later events. Null is never a valid argument. The writers and the
 * recorder may be read or closed from another thread than the fitting one; the reporter is
 * immutable.
 */
package dev.riskmin.diagnostics.sink;
