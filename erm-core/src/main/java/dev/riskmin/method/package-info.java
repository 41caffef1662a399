/**
 * Update rules (plain SGD, heavy-ball and Nesterov momentum, AdaGrad, Adam with decoupled decay,
 * SVRG, SAGA) and iterate averaging. An {@link dev.riskmin.method.UpdateRule} is an immutable,
 * thread-safe configuration; {@link dev.riskmin.method.UpdateRule#start} gives one fit its own
 * {@link dev.riskmin.method.Updater}, which keeps its buffers and allocates nothing per step.
 * Null is never a valid argument.
 */
package dev.riskmin.method;
