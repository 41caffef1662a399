package dev.riskmin.objective;

import dev.riskmin.penalty.Penalty;

/**
 * What every objective does with its penalty: it applies the penalty on the coordinates its
 * {@link PenaltyLayout} marks (never intercepts). The single abstract class between
 * {@link Objective} and its implementations.
 */
abstract class PenalizedObjective implements Objective {
    final PenaltyLayout layout;

    PenalizedObjective(PenaltyLayout layout) {
        this.layout = layout;
    }

    @Override
    public final Penalty penalty() {
        return layout.penalty();
    }

    @Override
    public final double penaltyValue(double[] h) {
        return layout.value(h);
    }

    @Override
    public final void addPenaltyGradient(double[] h, double scale, double[] g) {
        layout.addGradient(h, scale, g);
    }

    @Override
    public final void proximalStep(double[] h, double step) {
        layout.proximalStep(h, step);
    }

    @Override
    public final void fullProximalStep(double[] h, double step) {
        layout.fullProximalStep(h, step);
    }

    @Override
    public final boolean penalized(int j) {
        return layout.penalized(j);
    }
}
