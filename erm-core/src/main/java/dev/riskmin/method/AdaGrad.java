package dev.riskmin.method;

import dev.riskmin.objective.Objective;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.util.Arguments;

/**
 * AdaGrad, diagonal form (Duchi, Hazan &amp; Singer, JMLR 12:2121–2159, 2011):
 * s<sub>j</sub> ← s<sub>j</sub> + g<sub>j</sub>², h<sub>j</sub> ← h<sub>j</sub> − η<sub>j</sub> g<sub>j</sub> with
 * η<sub>j</sub> = ε/(√s<sub>j</sub> + δ); the non-smooth penalty is applied per coordinate with step
 * η<sub>j</sub>, the proximal step in AdaGrad's diagonal metric (composite mirror descent, same paper).
 */
final class AdaGrad implements UpdateRule {
    private final double delta;

    AdaGrad(double delta) {
        this.delta = Arguments.positive("delta", delta);
    }

    @Override
    public Updater start(Objective objective, double[] h0, int stepsPerEpoch) {
        return new State(objective, h0.length);
    }

    @Override
    public String name() {
        return "adagrad(delta=" + delta + ")";
    }

    @Override
    public String toString() {
        return name();
    }

    /** Steps are normalized by the gradient's scale, so the default does not depend on L. */
    @Override
    public double defaultStepSize(double lipschitz) {
        return 0.1;
    }

    private final class State implements Updater {
        private final Objective objective;
        private final double[] sumSquares;
        private final boolean proximal;
        private final boolean[] penalized;
        private long evaluations;

        State(Objective objective, int p) {
            this.objective = objective;
            this.sumSquares = new double[p];
            this.proximal = !objective.penalty().smooth();
            this.penalized = Moves.penalizedMask(objective);
        }

        @Override
        public double gradient(double[] h, int[] batch, double[] scales, int length, double[] gradient) {
            evaluations += length;
            return objective.batchGradient(h, batch, scales, 0, length, gradient);
        }

        @Override
        public void update(double[] h, double[] gradient, double stepSize) {
            Penalty penalty = objective.penalty();
            for (int j = 0; j < h.length; j++) {
                double g = gradient[j];
                double s = sumSquares[j] + g * g;
                sumSquares[j] = s;
                double eta = stepSize / (Math.sqrt(s) + delta);
                h[j] -= eta * g;
                if (proximal && penalized[j]) {
                    penalty.proximalStep(h, j, j + 1, eta);
                }
            }
        }

        @Override
        public long gradientEvaluations() {
            return evaluations;
        }
    }
}
