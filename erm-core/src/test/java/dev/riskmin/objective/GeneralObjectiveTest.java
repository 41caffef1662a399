package dev.riskmin.objective;

import dev.riskmin.data.Dataset;
import dev.riskmin.loss.Losses;
import dev.riskmin.testing.Cases;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.random.RandomGenerator;

import static dev.riskmin.objective.LinearCase.relativeDifference;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

class GeneralObjectiveTest {

    /** Least squares written by hand: ℓ_i(h) = (x_i·w + b − y_i)²/2, the intercept unpenalized. */
    private static final class HandWrittenLeastSquares implements SampleFunction {
        private final double[][] x;
        private final double[] y;
        private final boolean intercept;

        HandWrittenLeastSquares(double[][] x, double[] y, boolean intercept) {
            this.x = x;
            this.y = y;
            this.intercept = intercept;
        }

        private double residual(double[] h, int i) {
            double z = intercept ? h[x[i].length] : 0.0;
            for (int j = 0; j < x[i].length; j++) {
                z += x[i][j] * h[j];
            }
            return z - y[i];
        }

        @Override
        public int size() {
            return y.length;
        }

        @Override
        public int dimension() {
            return x[0].length + (intercept ? 1 : 0);
        }

        @Override
        public double loss(double[] h, int i) {
            double r = residual(h, i);
            return 0.5 * r * r;
        }

        @Override
        public double addGradient(double[] h, int i, double scale, double[] g) {
            double r = residual(h, i);
            for (int j = 0; j < x[i].length; j++) {
                g[j] += scale * r * x[i][j];
            }
            if (intercept) {
                g[x[i].length] += scale * r;
            }
            return 0.5 * r * r;
        }

        @Override
        public boolean penalized(int j) {
            return j < x[0].length;
        }
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void handWrittenLeastSquaresAgreesWithLinearObjective(long seed) {
        // Two implementations of the same documented objective (1/n) Σ ω_i ℓ_i + R must agree to rounding.
        LinearCase c = LinearCase.of(seed);
        double[] y = new double[c.n];
        RandomGenerator rng = Cases.rng(seed + 3);
        for (int i = 0; i < c.n; i++) {
            y[i] = 2 * rng.nextGaussian();
        }
        Dataset.Builder b = Dataset.builder().features(c.x).targets(y);
        if (c.weights != null) {
            b.weights(c.weights);
        }
        LinearObjective linear = LinearObjective.of(b.build(), Losses.squared(), c.penalty, c.intercept);
        GeneralObjective general = GeneralObjective.of(new HandWrittenLeastSquares(c.x, y, c.intercept), c.weights,
                c.penalty);
        int p = c.dimension();
        assertEquals(linear.dimension(), general.dimension());

        double[] gl = new double[p];
        double[] gg = new double[p];
        double vl = linear.gradient(c.h, gl);
        double vg = general.gradient(c.h, gg);
        assertEquals(vl, vg, 1e-12 * Math.abs(vl), "value " + c);
        assertEquals(linear.value(c.h), general.value(c.h), 1e-12 * Math.abs(vl), "value() " + c);
        assertTrue(relativeDifference(gl, gg) <= 1e-12, "gradient " + c);
        for (int i = 0; i < c.n; i++) {
            double[] sl = new double[p];
            double[] sg = new double[p];
            double ll = linear.addSampleGradient(c.h, i, 0.3, sl);
            double lg = general.addSampleGradient(c.h, i, 0.3, sg);
            assertEquals(ll, lg, 1e-12 * Math.max(Math.abs(ll), 1e-300), "sample loss " + i);
            assertEquals(linear.sampleLoss(c.h, i), general.sampleLoss(c.h, i), 1e-12 * Math.max(Math.abs(ll), 1e-300));
            assertTrue(relativeDifference(sl, sg) <= 1e-12, "sample gradient " + i + " " + c);
        }
        int length = 1 + rng.nextInt(c.n);
        int[] batch = new int[length];
        double[] scales = new double[length];
        for (int k = 0; k < length; k++) {
            batch[k] = rng.nextInt(c.n);
            scales[k] = 0.5 + rng.nextDouble();
        }
        double bl = linear.batchGradient(c.h, batch, scales, 0, length, gl);
        double bg = general.batchGradient(c.h, batch, scales, 0, length, gg);
        assertEquals(bl, bg, 1e-12 * Math.abs(bl), "batch loss " + c);
        assertTrue(relativeDifference(gl, gg) <= 1e-12, "batch gradient " + c);

        for (int j = 0; j < p; j++) {
            assertEquals(linear.penalized(j), general.penalized(j), "penalized(" + j + ")");
        }
        double[] hl = c.h.clone();
        double[] hg = c.h.clone();
        linear.proximalStep(hl, 0.4);
        general.proximalStep(hg, 0.4);
        assertTrue(relativeDifference(hl, hg) == 0, "proximal step " + c);
        linear.fullProximalStep(hl, 0.4);
        general.fullProximalStep(hg, 0.4);
        assertTrue(relativeDifference(hl, hg) == 0, "full proximal step " + c);
    }
}
