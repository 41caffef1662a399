/**
 * Stopping tests: {@link dev.riskmin.diagnostics.Monitor}s that watch a fit, publish a
 * {@link dev.riskmin.diagnostics.StoppingEvent} (statistic, threshold, decision, figures) every time
 * they evaluate, and act through the fit's control — halt with a reason, cut the step size, grow
 * the batch, restore the best parameters.
 *
 * <p>Each test is an immutable configuration built by static factories ({@code defaults()} and
 * named options, each validated with a message naming the option and value) together with the
 * state of one fit, reset when the fit starts: an instance serves one fit at a time, on the fitting
 * thread. Per-step work allocates nothing; anything costly (full gradients, per-sample gradients,
 * quantiles) runs at the test's documented cadence. Arguments must not be null.
 */
package dev.riskmin.diagnostics.stopping;
