package dev.riskmin.method;

import dev.riskmin.objective.Objective;
import dev.riskmin.util.Arguments;

/**
 * Stochastic variance-reduced gradient (Johnson &amp; Zhang, NIPS 2013). Every m steps the rule
 * takes a snapshot h̃ ← h and its full gradient μ = ∇L(h̃); each step then moves along
 * d = g<sub>B</sub>(h) − g<sub>B</sub>(h̃) + μ, an unbiased estimate of ∇L(h) whose variance
 * vanishes as h and h̃ approach the optimum, so a constant step converges linearly on strongly
 * convex objectives (METHODS §7). Cost: 2B gradient evaluations per step plus n per snapshot.
 * The listener sees g<sub>B</sub>(h), the plain stochastic gradient; the step uses d.
 */
final class Svrg implements UpdateRule {
    private final double epochsPerSnapshot;

    Svrg(double epochsPerSnapshot) {
        this.epochsPerSnapshot = Arguments.positive("epochsPerSnapshot", epochsPerSnapshot);
    }

    @Override
    public Updater start(Objective objective, double[] h0, int stepsPerEpoch) {
        long m = Math.max(1L, Math.round(epochsPerSnapshot * stepsPerEpoch));
        return new State(objective, h0.length, m);
    }

    @Override
    public boolean varianceReduced() {
        return true;
    }

    @Override
    public String name() {
        return "svrg(epochsPerSnapshot=" + epochsPerSnapshot + ")";
    }

    @Override
    public String toString() {
        return name();
    }

    /** Johnson &amp; Zhang's experiments use steps of order 0.1/L (from memory); a conservative choice. */
    @Override
    public double defaultStepSize(double lipschitz) {
        return 0.1 / lipschitz;
    }

    private static final class State implements Updater {
        private final Objective objective;
        private final long innerSteps;
        private final double[] snapshot;
        private final double[] snapshotGradient;
        private final double[] anchorBatch;
        private final double[] direction;
        private long steps;
        private long evaluations;

        State(Objective objective, int p, long innerSteps) {
            this.objective = objective;
            this.innerSteps = innerSteps;
            this.snapshot = new double[p];
            this.snapshotGradient = new double[p];
            this.anchorBatch = new double[p];
            this.direction = new double[p];
        }

        @Override
        public double gradient(double[] h, int[] batch, double[] scales, int length, double[] gradient) {
            if (steps % innerSteps == 0) {
                System.arraycopy(h, 0, snapshot, 0, h.length);
                objective.gradient(snapshot, snapshotGradient);
                evaluations += objective.size();
            }
            steps++;
            evaluations += 2L * length;
            double loss = objective.batchGradient(h, batch, scales, 0, length, gradient);
            objective.batchGradient(snapshot, batch, scales, 0, length, anchorBatch);
            for (int j = 0; j < h.length; j++) {
                direction[j] = gradient[j] - anchorBatch[j] + snapshotGradient[j];
            }
            return loss;
        }

        @Override
        public void update(double[] h, double[] gradient, double stepSize) {
            Moves.proximalDescent(h, direction, stepSize, objective);
        }

        @Override
        public long gradientEvaluations() {
            return evaluations;
        }
    }
}
