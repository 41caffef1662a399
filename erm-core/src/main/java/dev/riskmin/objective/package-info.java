/**
 * Objectives L(h) = (1/n) Σ<sub>i</sub> ω<sub>i</sub> ℓ<sub>i</sub>(h) + R(h): per-sample losses and
 * gradients on demand, batch and full gradients into caller-owned buffers. The linear
 * specializations serve dense and sparse data; {@link dev.riskmin.objective.SampleFunction} lets a
 * user plug in any differentiable parametric model.
 *
 * <p>Objectives hold scratch buffers: one instance serves one thread at a time (the fit loop makes
 * its own). A {@link dev.riskmin.objective.LinearObjective} built with
 * {@link dev.riskmin.objective.GradientThreads} splits large batch gradients across worker threads
 * of its own, with a fixed reduction order; it is still called from one thread at a time. Null is
 * never a valid argument.
 */
package dev.riskmin.objective;
