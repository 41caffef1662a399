package dev.riskmin.method;

import dev.riskmin.objective.Objective;

/** The moves several update rules share. */
final class Moves {
    private Moves() {
    }

    /** h ← prox<sub>εR<sub>prox</sub></sub>(h − ε d): a proximal step along −d. */
    static void proximalDescent(double[] h, double[] direction, double stepSize, Objective objective) {
        for (int j = 0; j < h.length; j++) {
            h[j] -= stepSize * direction[j];
        }
        objective.proximalStep(h, stepSize);
    }

    /** @return which coordinates the objective's penalty acts on (false for intercepts) */
    static boolean[] penalizedMask(Objective objective) {
        boolean[] mask = new boolean[objective.dimension()];
        for (int j = 0; j < mask.length; j++) {
            mask[j] = objective.penalized(j);
        }
        return mask;
    }
}
