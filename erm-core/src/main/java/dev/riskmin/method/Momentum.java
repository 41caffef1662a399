package dev.riskmin.method;

import dev.riskmin.objective.Objective;
import dev.riskmin.util.Arguments;

/**
 * Momentum SGD with velocity v: v ← μ v − ε g<sub>B</sub>, h ← h + v, then the proximal step of the
 * non-smooth penalty with step ε.
 * <ul>
 * <li>Heavy ball (Polyak, USSR Comput. Math. Math. Phys. 4(5), 1964): g<sub>B</sub> at h, which is
 * h<sub>+</sub> = h − ε g + μ(h − h<sub>prev</sub>) (METHODS §7).</li>
 * <li>Nesterov (Nesterov, Soviet Math. Dokl. 27, 1983), in the velocity form of Sutskever, Martens,
 * Dahl &amp; Hinton (ICML 2013): g<sub>B</sub> at the look-ahead point h + μ v.</li>
 * </ul>
 * The proximal step after a momentum step is a common heuristic, not a method with a published rate.
 */
final class Momentum implements UpdateRule {
    private final double mu;
    private final boolean nesterov;

    Momentum(double momentum, boolean nesterov) {
        Arguments.inClosedRange("momentum", momentum, 0.0, 0.999999);
        this.mu = momentum;
        this.nesterov = nesterov;
    }

    @Override
    public Updater start(Objective objective, double[] h0, int stepsPerEpoch) {
        return new State(objective, h0.length);
    }

    @Override
    public String name() {
        return (nesterov ? "nesterov(" : "heavy-ball(") + mu + ")";
    }

    @Override
    public String toString() {
        return name();
    }

    /** Momentum amplifies a step by up to 1/(1 − μ), so the default step shrinks by that factor. */
    @Override
    public double defaultStepSize(double lipschitz) {
        return (1.0 - mu) / lipschitz;
    }

    private final class State implements Updater {
        private final Objective objective;
        private final double[] velocity;
        private final double[] lookAhead;
        private long evaluations;

        State(Objective objective, int p) {
            this.objective = objective;
            this.velocity = new double[p];
            this.lookAhead = nesterov ? new double[p] : null;
        }

        @Override
        public double gradient(double[] h, int[] batch, double[] scales, int length, double[] gradient) {
            evaluations += length;
            if (!nesterov) {
                return objective.batchGradient(h, batch, scales, 0, length, gradient);
            }
            for (int j = 0; j < h.length; j++) {
                lookAhead[j] = h[j] + mu * velocity[j];
            }
            return objective.batchGradient(lookAhead, batch, scales, 0, length, gradient);
        }

        @Override
        public void update(double[] h, double[] gradient, double stepSize) {
            for (int j = 0; j < h.length; j++) {
                double v = mu * velocity[j] - stepSize * gradient[j];
                velocity[j] = v;
                h[j] += v;
            }
            objective.proximalStep(h, stepSize);
        }

        @Override
        public long gradientEvaluations() {
            return evaluations;
        }
    }
}
