package dev.riskmin.diagnostics;

/**
 * Descent-angle figures at one probe (METHODS §3).
 *
 * @param cosine            cos φ = ⟨g<sub>B</sub>, G⟩/(‖g<sub>B</sub>‖ ‖G‖) at this probe (G the full gradient, or an
 *                          independent large-batch estimate when n is large)
 * @param meanCosine        the running mean of cos φ over the probes so far
 * @param descentShare      the share of probes so far with cos φ &gt; 0 (descent directions)
 * @param angleToOptimum    in certified mode, the angle in degrees between the step −g<sub>B</sub> and
 *                          h* − h<sub>t</sub>; NaN otherwise
 * @param suboptimality     in certified mode, L(h<sub>t</sub>) − L*; NaN otherwise
 */
public record AngleEvent(long step, int epoch, double cosine, double meanCosine, double descentShare,
                         double angleToOptimum, double suboptimality) implements DiagnosticEvent {
    @Override
    public EventKind kind() {
        return EventKind.ANGLE;
    }
}
