package dev.riskmin.examples.service;

import dev.riskmin.data.Dataset;
import dev.riskmin.util.Arguments;

/**
 * The data of one retraining round: the rows to fit and, optionally, rows kept out of the fit on
 * which the diagnostics measure the held-out loss.
 *
 * @param training the rows fitted
 * @param heldOut  rows kept out of the fit, or null
 */
public record TrainingData(Dataset training, Dataset heldOut) {
    public TrainingData {
        Arguments.notNull("training", training);
    }
}
