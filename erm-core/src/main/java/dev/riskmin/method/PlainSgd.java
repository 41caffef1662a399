package dev.riskmin.method;

import dev.riskmin.objective.Objective;

/**
 * Proximal stochastic gradient descent: h ← prox<sub>εR<sub>prox</sub></sub>(h − ε g<sub>B</sub>)
 * (Robbins &amp; Monro, Ann. Math. Statist. 22, 1951; the proximal form as in Bottou, Curtis &amp;
 * Nocedal, SIAM Review 60(2), 2018, §8). The smooth part of the penalty is inside g<sub>B</sub>.
 */
final class PlainSgd implements UpdateRule {
    static final PlainSgd INSTANCE = new PlainSgd();

    private PlainSgd() {
    }

    @Override
    public Updater start(Objective objective, double[] h0, int stepsPerEpoch) {
        if (LinearSgd.applies(objective)) {
            return new LinearSgd(objective, objective.linearStructure(), h0);
        }
        return new State(objective);
    }

    /** The general path, for any objective: what {@link LinearSgd} must agree with. */
    static Updater general(Objective objective) {
        return new State(objective);
    }

    @Override
    public String name() {
        return "sgd";
    }

    @Override
    public String toString() {
        return name();
    }

    private static final class State implements Updater {
        private final Objective objective;
        private long evaluations;

        State(Objective objective) {
            this.objective = objective;
        }

        @Override
        public double gradient(double[] h, int[] batch, double[] scales, int length, double[] gradient) {
            evaluations += length;
            return objective.batchGradient(h, batch, scales, 0, length, gradient);
        }

        @Override
        public void update(double[] h, double[] gradient, double stepSize) {
            Moves.proximalDescent(h, gradient, stepSize, objective);
        }

        @Override
        public long gradientEvaluations() {
            return evaluations;
        }
    }
}
