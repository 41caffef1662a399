package dev.riskmin.method;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.hook.FitControl;
import dev.riskmin.hook.FitListener;
import dev.riskmin.hook.StepView;
import dev.riskmin.sampling.Sampling;
import dev.riskmin.step.StepSchedule;
import dev.riskmin.testing.Cases;
import dev.riskmin.testing.LeastSquaresProblem;
import org.apache.commons.math3.stat.regression.SimpleRegression;
import org.junit.jupiter.api.Test;

import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * SGD's rates on seeded strongly convex least-squares problems, measured against the exact optimum
 * (commons-math3 QR), averaged over seeds because the theorems bound expectations:
 * Bottou, Curtis &amp; Nocedal, "Optimization methods for large-scale machine learning",
 * SIAM Review 60(2), 2018, Theorems 4.6 (fixed step: linear decrease to a noise ball proportional to
 * the step) and 4.7 (ε<sub>t</sub> = β/(γ + t): O(1/t)); Polyak &amp; Juditsky, SIAM J. Control
 * Optim. 30(4), 1992 (averaging).
 */
class SgdRatesTest {
    private static final int N = 2000;
    private static final int D = 5;

    /** Records L(h<sub>t</sub>) − L* at t = 2<sup>k</sup>. */
    static final class PowerOfTwoRecorder implements FitListener {
        final double[] gap = new double[24];
        final double optimum;

        PowerOfTwoRecorder(double optimum) {
            this.optimum = optimum;
        }

        @Override
        public void step(StepView view, FitControl control) {
            long t = view.step();
            if (t >= 1 && (t & (t - 1)) == 0) {
                gap[Long.numberOfTrailingZeros(t)] += view.probe().objective() - optimum;
            }
        }
    }

    @Test
    void inverseTimeStepsGiveSuboptimalityOfOrderOneOverT() {
        int seeds = 30;
        int maxPower = 17;
        double[] meanGap = new double[24];
        for (long seed : Cases.seeds(seeds).toArray()) {
            LeastSquaresProblem problem = LeastSquaresProblem.gaussian(seed, N, D, 1.0);
            PowerOfTwoRecorder recorder = new PowerOfTwoRecorder(problem.optimalObjective);
            // ε_t = β/(γ + t) with β = 2 > 1/(c μ) (μ ≈ 1 for standard normal features) and γ = 40,
            // written as ε0/(1 + λ ε0 t) with λ = 1/β and ε0 = β/γ.
            Minimizer.builder().sampling(Sampling.withReplacement()).schedule(StepSchedule.inverseTime(0.05, 0.5))
                    .maxSteps((1L << maxPower) + 1).seed(seed).build()
                    .fit(problem.data, FitOptions.listeners(recorder));
            for (int k = 0; k <= maxPower; k++) {
                meanGap[k] += recorder.gap[k] / seeds;
            }
        }
        SimpleRegression fit = new SimpleRegression();
        for (int k = 10; k <= maxPower; k++) {
            fit.addData(k * Math.log(2), Math.log(meanGap[k]));
        }
        double slope = fit.getSlope();
        System.out.printf("SGD with eps_t = beta/(gamma+t): log-log slope of suboptimality vs steps = %.3f "
                + "(t = 2^10..2^17, %d seeds)%n", slope, seeds);
        assertTrue(slope >= -1.2 && slope <= -0.8, "slope " + slope);
    }

    private static double plateau(double step, int seeds) {
        double sum = 0;
        int count = 0;
        for (long seed : Cases.seeds(seeds).toArray()) {
            LeastSquaresProblem problem = LeastSquaresProblem.gaussian(seed, N, D, 1.0);
            double[] acc = {0};
            int[] samples = {0};
            long steps = 120_000;
            FitListener tail = new FitListener() {
                @Override
                public void step(StepView view, FitControl control) {
                    if (view.step() >= steps / 2 && view.step() % 500 == 0) {
                        acc[0] += view.probe().objective() - problem.optimalObjective;
                        samples[0]++;
                    }
                }
            };
            Minimizer.builder().sampling(Sampling.withReplacement()).stepSize(step).maxSteps(steps).seed(seed)
                    .build().fit(problem.data, FitOptions.listeners(tail));
            sum += acc[0];
            count += samples[0];
        }
        return sum / count;
    }

    @Test
    void constantStepPlateausAndHalvingTheStepRoughlyHalvesThePlateau() {
        double large = plateau(0.02, 8);
        double small = plateau(0.01, 8);
        double ratio = large / small;
        System.out.printf("SGD constant step: plateau %.3e at eps = 0.02, %.3e at eps = 0.01, ratio %.3f%n",
                large, small, ratio);
        assertTrue(large > 0 && small > 0);
        // Thm 4.6: the noise ball is a L M / (2 c mu), linear in the step a.
        assertTrue(ratio > 1.6 && ratio < 2.5, "plateau ratio " + ratio);
    }

    @Test
    void polyakRuppertAverageBeatsTheLastIterate() {
        int seeds = 20;
        double last = 0;
        double averaged = 0;
        for (long seed : Cases.seeds(seeds).toArray()) {
            LeastSquaresProblem problem = LeastSquaresProblem.gaussian(seed, N, D, 1.0);
            // Steps t^(-0.6), p in (1/2, 1), the regime of Polyak & Juditsky's theorem.
            Fit fit = Minimizer.builder().sampling(Sampling.withReplacement())
                    .schedule(StepSchedule.polynomial(0.05, 10, 0.6)).averaging(Averaging.polyakRuppert(1000))
                    .maxSteps(40_000).seed(seed).build().fit(problem.data);
            last += problem.objective().value(fit.lastIterate()) - problem.optimalObjective;
            averaged += fit.finalObjective() - problem.optimalObjective;
        }
        System.out.printf("Polyak-Ruppert: mean suboptimality %.3e averaged vs %.3e last iterate (%d seeds)%n",
                averaged / seeds, last / seeds, seeds);
        assertTrue(averaged < last / 2, "averaged " + averaged / seeds + " vs last " + last / seeds);
    }
}
