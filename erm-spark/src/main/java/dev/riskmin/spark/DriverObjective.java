package dev.riskmin.spark;

import dev.riskmin.objective.Objective;
import dev.riskmin.penalty.Penalty;

/**
 * The objective as the mini-batch strategy's update rule sees it on the driver: the core's
 * {@link dev.riskmin.method.UpdateRule}s evaluate their gradients through this object, and each
 * evaluation is a Spark job. {@link #batchGradient} ignores the indices it is given and returns the
 * round's distributed batch gradient at the point asked for (the look-ahead point for Nesterov momentum;
 * the snapshot for SVRG, over the same partition batches, because a round's batches depend only on
 * (seed, round, partition)); {@link #gradient} and {@link #value} aggregate over all rows. Per-row
 * gradients are not kept on the driver: a rule that asks for them (SAGA) is refused with a clear error.
 * The penalty acts on the coefficients h[0 .. d), never on the intercept.
 */
final class DriverObjective implements Objective {
    private final RoundLoop loop;
    private final Penalty penalty;
    private final int d;
    private final int p;
    private final String rule;

    DriverObjective(RoundLoop loop, Penalty penalty, int d, int p, String rule) {
        this.loop = loop;
        this.penalty = penalty;
        this.d = d;
        this.p = p;
        this.rule = rule;
    }

    @Override
    public int size() {
        return loop.sampleCount();
    }

    @Override
    public int dimension() {
        return p;
    }

    @Override
    public double sampleLoss(double[] h, int i) {
        throw perRow(i);
    }

    @Override
    public double addSampleGradient(double[] h, int i, double scale, double[] g) {
        throw perRow(i);
    }

    private IllegalStateException perRow(int i) {
        return new IllegalStateException("update rule " + rule + " asks the driver for row " + i + "'s own gradient, "
                + "which the distributed mini-batch strategy does not keep on the driver; use SGD, momentum, "
                + "AdaGrad, Adam or SVRG, or the local SGD strategy (where each partition runs the rule itself)");
    }

    @Override
    public double batchGradient(double[] h, int[] batch, double[] scales, int from, int length, double[] g) {
        return loop.batchGradientAt(h, g);
    }

    @Override
    public double value(double[] h) {
        return loop.objectiveAt(h);
    }

    @Override
    public double gradient(double[] h, double[] g) {
        return loop.fullGradientAt(h, g);
    }

    @Override
    public Penalty penalty() {
        return penalty;
    }

    @Override
    public double penaltyValue(double[] h) {
        return penalty.value(h, 0, d);
    }

    @Override
    public void addPenaltyGradient(double[] h, double scale, double[] g) {
        penalty.addSmoothGradient(h, 0, d, scale, g);
    }

    @Override
    public void proximalStep(double[] h, double step) {
        penalty.proximalStep(h, 0, d, step);
    }

    @Override
    public void fullProximalStep(double[] h, double step) {
        penalty.fullProximal(h, 0, d, step);
    }

    @Override
    public boolean penalized(int j) {
        return j < d;
    }

    @Override
    public double sampleSmoothness(int i) {
        return Double.POSITIVE_INFINITY;
    }
}
