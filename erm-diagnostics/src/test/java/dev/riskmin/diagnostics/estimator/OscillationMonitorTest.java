package dev.riskmin.diagnostics.estimator;

import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.testing.LeastSquaresProblem;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.EigenDecomposition;
import org.apache.commons.math3.linear.RealMatrix;
import org.junit.jupiter.api.Test;

import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * On a quadratic, gradient descent with ε·λ<sub>max</sub> &gt; 1 flips the gradient's top component
 * each step (the factor 1 − ελ is negative), so successive gradients point against each other; with
 * ε·λ<sub>max</sub> &lt; 1 they agree. λ<sub>max</sub> of the Hessian from commons-math3's
 * EigenDecomposition.
 */
class OscillationMonitorTest {
    private static final LeastSquaresProblem PROBLEM = LeastSquaresProblem.gaussian(8, 200, 5, 0.3);

    private static double largestCurvature() {
        int n = PROBLEM.x.length;
        double[][] h = new double[6][6];
        for (double[] row : PROBLEM.x) {
            double[] r = {row[0], row[1], row[2], row[3], row[4], 1.0};
            for (int a = 0; a < 6; a++) {
                for (int b = 0; b < 6; b++) {
                    h[a][b] += r[a] * r[b] / n;
                }
            }
        }
        RealMatrix m = new Array2DRowRealMatrix(h);
        double max = 0;
        for (double e : new EigenDecomposition(m).getRealEigenvalues()) {
            max = Math.max(max, e);
        }
        return max;
    }

    private static double successiveCosine(double stepTimesCurvature) {
        Diagnostics diagnostics = Diagnostics.builder().monitor(OscillationMonitor.every(2)).build();
        Minimizer.builder().batchSize(200).stepSize(stepTimesCurvature / largestCurvature()).epochs(40).build()
                .fit(PROBLEM.data, FitOptions.listeners(diagnostics));
        return diagnostics.summary().successiveCosine;
    }

    @Test
    void overshootingStepsGiveNegativeSuccessiveCosines() {
        double over = successiveCosine(1.6);
        double under = successiveCosine(0.2);
        assertTrue(over < -0.5, "step 1.6/lambda_max: mean successive cosine " + over);
        assertTrue(under > 0.5, "step 0.2/lambda_max: mean successive cosine " + under);
    }

    @Test
    void spacingMustAllowAPair() {
        assertThrows(IllegalArgumentException.class, () -> OscillationMonitor.every(1));
    }
}
