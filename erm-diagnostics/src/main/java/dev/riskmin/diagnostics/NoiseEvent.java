package dev.riskmin.diagnostics;

/**
 * Gradient-noise figures at one probe (METHODS §1–2). NaN marks a figure that could not be formed
 * (e.g. a batch of one has no sample variance).
 *
 * @param batchSize          B at the probe
 * @param traceCovariance    the one-batch estimate T = (1/(B−1)) Σ<sub>j</sub> ‖g<sub>j</sub> − g<sub>B</sub>‖² of tr Σ
 *                           (with replacement) or tr S² (without)
 * @param batchMeanVariance  the estimated E‖g<sub>B</sub> − G‖² for the fit's sampling: tr Σ/B with
 *                           replacement, (1 − B/n) tr S²/B without (finite-population correction)
 * @param gradientNormSquared the estimate of ‖G‖² used in the noise scale
 * @param noiseScale         B<sub>simple</sub> = tr Σ / ‖G‖² from the separately smoothed numerator and denominator
 * @param suggestedBatchSize the batch size the noise scale suggests (B<sub>simple</sub> rounded up, at least 1)
 */
public record NoiseEvent(long step, int epoch, int batchSize, double traceCovariance, double batchMeanVariance,
                         double gradientNormSquared, double noiseScale, int suggestedBatchSize)
        implements DiagnosticEvent {
    @Override
    public EventKind kind() {
        return EventKind.NOISE;
    }
}
