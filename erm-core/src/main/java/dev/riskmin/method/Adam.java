package dev.riskmin.method;

import dev.riskmin.objective.Objective;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.util.Arguments;

/**
 * Adam (Kingma &amp; Ba, ICLR 2015) with decoupled decay (Loshchilov &amp; Hutter, ICLR 2019):
 * m ← β<sub>1</sub>m + (1−β<sub>1</sub>)g, v ← β<sub>2</sub>v + (1−β<sub>2</sub>)g², m̂ = m/(1−β<sub>1</sub><sup>t</sup>),
 * v̂ = v/(1−β<sub>2</sub><sup>t</sup>), h ← h − ε (m̂/(√v̂ + δ) + λ h). The moments see only the
 * objective's gradient; the decay λ acts on every coordinate the penalty acts on (never intercepts),
 * so with a zero gradient h shrinks by exactly (1 − ελ) per step (METHODS §7). A non-smooth penalty
 * is applied per coordinate with the effective step ε/(√v̂ + δ) (a heuristic; no published rate).
 */
final class Adam implements UpdateRule {
    private final double beta1;
    private final double beta2;
    private final double delta;
    private final double decay;

    Adam(double beta1, double beta2, double delta, double decay) {
        this.beta1 = Arguments.inClosedRange("beta1", beta1, 0.0, 0.999999);
        this.beta2 = Arguments.inClosedRange("beta2", beta2, 0.0, 0.99999999);
        this.delta = Arguments.positive("delta", delta);
        this.decay = Arguments.nonNegative("decoupledDecay", decay);
    }

    @Override
    public Updater start(Objective objective, double[] h0, int stepsPerEpoch) {
        return new State(objective, h0.length);
    }

    @Override
    public String name() {
        return "adam(beta1=" + beta1 + ", beta2=" + beta2 + ", delta=" + delta + ", decay=" + decay + ")";
    }

    @Override
    public String toString() {
        return name();
    }

    /** Adam's steps are normalized, ~ε per coordinate; 1e-3 is the published default (from memory). */
    @Override
    public double defaultStepSize(double lipschitz) {
        return 1e-3;
    }

    private final class State implements Updater {
        private final Objective objective;
        private final double[] m;
        private final double[] v;
        private final boolean[] penalized;
        private final boolean proximal;
        private double beta1Power = 1.0;
        private double beta2Power = 1.0;
        private long evaluations;

        State(Objective objective, int p) {
            this.objective = objective;
            this.m = new double[p];
            this.v = new double[p];
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
            beta1Power *= beta1;
            beta2Power *= beta2;
            double c1 = 1.0 / (1.0 - beta1Power);
            double c2 = 1.0 / (1.0 - beta2Power);
            Penalty penalty = objective.penalty();
            for (int j = 0; j < h.length; j++) {
                double g = gradient[j];
                double mj = beta1 * m[j] + (1 - beta1) * g;
                double vj = beta2 * v[j] + (1 - beta2) * g * g;
                m[j] = mj;
                v[j] = vj;
                double denom = Math.sqrt(vj * c2) + delta;
                double shrink = penalized[j] ? decay * h[j] : 0.0;
                h[j] -= stepSize * (mj * c1 / denom + shrink);
                if (proximal && penalized[j]) {
                    penalty.proximalStep(h, j, j + 1, stepSize / denom);
                }
            }
        }

        @Override
        public long gradientEvaluations() {
            return evaluations;
        }
    }
}
