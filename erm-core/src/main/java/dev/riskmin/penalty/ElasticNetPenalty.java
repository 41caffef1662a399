package dev.riskmin.penalty;

import dev.riskmin.util.Arguments;

/**
 * The elastic-net family R(w) = λ<sub>1</sub>‖w‖<sub>1</sub> + (λ<sub>2</sub>/2)‖w‖², which holds none
 * (λ<sub>1</sub> = λ<sub>2</sub> = 0), L2 (ridge), L1 (lasso) and the elastic net proper
 * (Zou &amp; Hastie, "Regularization and variable selection via the elastic net", JRSS-B 67(2), 2005).
 *
 * <p>Proximal operators (METHODS §8): L1 part, soft thresholding
 * prox(v)<sub>j</sub> = sign(v<sub>j</sub>) max(|v<sub>j</sub>| − ελ<sub>1</sub>, 0); whole penalty,
 * prox(v)<sub>j</sub> = sign(v<sub>j</sub>) max(|v<sub>j</sub>| − ελ<sub>1</sub>, 0)/(1 + ελ<sub>2</sub>).
 * The L2 part is smooth, gradient λ<sub>2</sub> w, and enters the stochastic gradient.
 */
public final class ElasticNetPenalty implements Penalty {
    static final ElasticNetPenalty NONE = new ElasticNetPenalty(0, 0);

    private final double l1;
    private final double l2;

    private ElasticNetPenalty(double l1, double l2) {
        this.l1 = l1;
        this.l2 = l2;
    }

    /**
     * @throws IllegalArgumentException naming the strength if either is negative, NaN or infinite
     */
    static ElasticNetPenalty of(double l1Strength, double l2Strength) {
        Arguments.nonNegative("l1Strength", l1Strength);
        Arguments.nonNegative("l2Strength", l2Strength);
        if (l1Strength == 0 && l2Strength == 0) {
            return NONE;
        }
        return new ElasticNetPenalty(l1Strength, l2Strength);
    }

    @Override
    public double value(double[] w, int from, int to) {
        double abs = 0;
        double sq = 0;
        for (int j = from; j < to; j++) {
            abs += Math.abs(w[j]);
            sq += w[j] * w[j];
        }
        return l1 * abs + 0.5 * l2 * sq;
    }

    @Override
    public void addSmoothGradient(double[] w, int from, int to, double scale, double[] g) {
        if (l2 == 0) {
            return;
        }
        double c = scale * l2;
        for (int j = from; j < to; j++) {
            g[j] += c * w[j];
        }
    }

    @Override
    public void proximalStep(double[] w, int from, int to, double step) {
        if (l1 == 0) {
            return;
        }
        softThreshold(w, from, to, step * l1);
    }

    @Override
    public void fullProximal(double[] w, int from, int to, double step) {
        if (l1 > 0) {
            softThreshold(w, from, to, step * l1);
        }
        if (l2 > 0) {
            double shrink = 1.0 / (1.0 + step * l2);
            for (int j = from; j < to; j++) {
                w[j] *= shrink;
            }
        }
    }

    private static void softThreshold(double[] w, int from, int to, double t) {
        for (int j = from; j < to; j++) {
            double v = w[j];
            if (v > t) {
                w[j] = v - t;
            } else if (v < -t) {
                w[j] = v + t;
            } else {
                w[j] = 0.0;
            }
        }
    }

    @Override
    public boolean elasticNetForm() {
        return true;
    }

    @Override
    public double l1Strength() {
        return l1;
    }

    @Override
    public double l2Strength() {
        return l2;
    }

    @Override
    public String name() {
        if (l1 == 0 && l2 == 0) {
            return "none";
        }
        if (l1 == 0) {
            return "l2(" + l2 + ")";
        }
        if (l2 == 0) {
            return "l1(" + l1 + ")";
        }
        return "elastic-net(l1=" + l1 + ", l2=" + l2 + ")";
    }

    @Override
    public String toString() {
        return name();
    }
}
