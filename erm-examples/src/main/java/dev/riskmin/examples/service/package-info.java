/**
 * A service-style retraining example: {@link dev.riskmin.examples.service.RetrainingService} fits on
 * a schedule and publishes a model file only when the health verdict is CONVERGED (see
 * {@code docs/integration.md}); {@link dev.riskmin.examples.service.RetrainingDemo} runs it on
 * invented, drifting data. Null is never a valid argument.
 */
package dev.riskmin.examples.service;
