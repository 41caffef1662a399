package dev.riskmin.method;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.StopReason;
import dev.riskmin.hook.FitControl;
import dev.riskmin.hook.FitListener;
import dev.riskmin.hook.StepView;
import dev.riskmin.testing.LeastSquaresProblem;
import org.apache.commons.math3.stat.regression.SimpleRegression;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

import java.util.ArrayList;
import java.util.List;

import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * SVRG (Johnson &amp; Zhang, NIPS 2013) and SAGA (Defazio, Bach &amp; Lacoste-Julien, NIPS 2014)
 * converge linearly with a constant step on a strongly convex finite sum: the log of the
 * suboptimality falls on a straight line in the epochs, down to 1e-10 relative to L*.
 */
class VarianceReducedRatesTest {

    @ParameterizedTest(name = "{0}")
    @ValueSource(strings = {"svrg", "saga"})
    void reachesTenDigitsLinearly(String name) {
        LeastSquaresProblem problem = LeastSquaresProblem.gaussian(77, 1000, 10, 1.0);
        UpdateRule rule = name.equals("svrg") ? UpdateRule.svrg() : UpdateRule.saga();
        List<Double> logGap = new ArrayList<>();
        double target = 1e-10;
        FitListener recorder = new FitListener() {
            @Override
            public void epochEnded(StepView view, FitControl control) {
                double gap = (view.probe().objective() - problem.optimalObjective) / problem.optimalObjective;
                if (gap > 1e-14) {
                    logGap.add(Math.log10(gap));
                }
                if (gap < target / 10) {
                    control.halt(StopReason.CONVERGED, "relative suboptimality " + gap);
                }
            }
        };
        Fit fit = Minimizer.builder().updateRule(rule).epochs(200).seed(3).build()
                .fit(problem.data, FitOptions.listeners(recorder));
        double gap = problem.relativeSuboptimality(fit.parameters());
        SimpleRegression line = new SimpleRegression();
        for (int e = 0; e < logGap.size(); e++) {
            line.addData(e + 1, logGap.get(e));
        }
        System.out.printf("%s: relative suboptimality %.2e after %.0f epochs; log10 gap falls %.3f per epoch "
                + "(R^2 = %.3f)%n", name, gap, fit.epochs(), -line.getSlope(), line.getRSquare());
        assertTrue(gap <= target, name + " reached only " + gap);
        assertTrue(line.getSlope() < 0 && line.getRSquare() > 0.9,
                "not linear: slope " + line.getSlope() + ", R^2 " + line.getRSquare());
    }
}
