package dev.riskmin.examples.service;

import dev.riskmin.StopReason;
import dev.riskmin.diagnostics.verdict.Condition;

import java.nio.file.Path;

/**
 * What one retraining round did.
 *
 * @param number     the round, counted from 1
 * @param stopReason why its fit stopped, or null when the round failed before or during the fit
 * @param condition  the health verdict's condition, or null when the round failed
 * @param summary    the verdict's summary, or the failure
 * @param advice     the verdict's advice (empty when the round failed)
 * @param published  whether the round's model was published
 * @param model      the file published to, or null when this round published nothing
 */
public record Round(int number, StopReason stopReason, Condition condition, String summary, String advice,
                   boolean published, Path model) {
}
