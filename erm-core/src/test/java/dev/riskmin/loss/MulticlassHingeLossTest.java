package dev.riskmin.loss;

import org.junit.jupiter.api.Test;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;

class MulticlassHingeLossTest extends MulticlassLossContract {

    @Override
    MulticlassLoss loss() {
        return Losses.multiclassHinge();
    }

    @Override
    Response expectedResponse() {
        return Response.ARGMAX;
    }

    /** Away from the kink (margin 0) and from ties for the runner-up. */
    @Override
    boolean differentiableAround(double[] z, int y, double margin) {
        double top = Double.NEGATIVE_INFINITY;
        double second = Double.NEGATIVE_INFINITY;
        for (int k = 0; k < z.length; k++) {
            if (k == y) {
                continue;
            }
            if (z[k] > top) {
                second = top;
                top = z[k];
            } else if (z[k] > second) {
                second = z[k];
            }
        }
        // Perturbing two coordinates by the margin moves a difference by up to twice the margin.
        return Math.abs(1 + top - z[y]) > 4 * margin && top - second > 4 * margin;
    }

    @Test
    void knownValues() {
        // Crammer & Singer (2001): max(0, 1 + max_{k≠y} z_k − z_y) with subgradient e_j − e_y.
        double[] z = {1, 2, 0.5};
        assertEquals(2.0, value(z, 0), 0.0);
        assertArrayEquals(new double[] {-1, 1, 0}, gradient(z, 0), 0.0);
        assertEquals(2.5, value(z, 2), 0.0);
        assertArrayEquals(new double[] {0, 1, -1}, gradient(z, 2), 0.0);
        // y = 1 leads by exactly the margin 1: the kink, where the least-norm subgradient 0 is returned.
        assertEquals(0.0, value(z, 1), 0.0);
        assertArrayEquals(new double[] {0, 0, 0}, gradient(z, 1), 0.0);
        assertEquals(0.0, value(new double[] {0, 3, 1}, 1), 0.0);
    }

    @Test
    void tiesForTheRunnerUpGoToTheSmallestIndex() {
        // Documented choice within the subdifferential conv{e_1 − e_0, e_2 − e_0}.
        double[] z = {0, 1, 1};
        assertEquals(2.0, value(z, 0), 0.0);
        assertArrayEquals(new double[] {-1, 1, 0}, gradient(z, 0), 0.0);
    }

    @Test
    void singleClassHasNoLoss() {
        assertEquals(0.0, value(new double[] {5}, 0), 0.0);
        assertArrayEquals(new double[] {0}, gradient(new double[] {5}, 0), 0.0);
    }
}
