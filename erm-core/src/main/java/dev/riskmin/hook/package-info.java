/**
 * The hook through which a running fit is observed and steered: {@link dev.riskmin.hook.FitListener}
 * receives, at every step, a read-only {@link dev.riskmin.hook.StepView}, an on-demand
 * {@link dev.riskmin.hook.Probe} and a {@link dev.riskmin.hook.FitControl}. The views are the fit
 * loop itself seen through narrow interfaces: nothing is allocated per step, and they are valid only
 * during the call. Listeners run on the fitting thread.
 */
package dev.riskmin.hook;
