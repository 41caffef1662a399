package dev.riskmin.diagnostics;

/**
 * Loss figures at one step. NaN marks a figure not measured at this step.
 *
 * @param batchLoss         the batch's mean data loss at h<sub>t</sub>
 * @param smoothedBatchLoss an exponential moving average of the batch loss
 * @param objective         the full objective L(h<sub>t</sub>), at its cadence
 * @param heldOutLoss       the mean loss on held-out data, at its cadence
 * @param gradientNorm      ‖∇L(h<sub>t</sub>)‖ when the full gradient was computed at this step
 * @param stepSize          ε<sub>t</sub>
 * @param batchSize         B
 */
public record LossEvent(long step, int epoch, double batchLoss, double smoothedBatchLoss, double objective,
                        double heldOutLoss, double gradientNorm, double stepSize, int batchSize)
        implements DiagnosticEvent {
    @Override
    public EventKind kind() {
        return EventKind.LOSS;
    }
}
