package dev.riskmin.examples;

import dev.riskmin.Fit;
import dev.riskmin.Minimizer;
import dev.riskmin.data.Dataset;
import dev.riskmin.loss.Losses;
import dev.riskmin.method.Averaging;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.model.LinearModel;
import dev.riskmin.penalty.Penalty;

import java.util.Locale;
import java.util.random.RandomGenerator;
import java.util.random.RandomGeneratorFactory;

/**
 * An invented scenario with generated data: a cooperative of neighbourhood bakeries wants to know,
 * each evening, (1) how many sourdough loaves each shop will sell tomorrow and (2) whether a shop
 * will sell out before noon. Six made-up store-day features drive both; the demo draws 200,000
 * store-days from known coefficients, fits a Poisson regression (SVRG) and a logistic classifier
 * (SAGA with an L2 penalty), and prints what each fit found beside the coefficients that generated
 * the data.
 *
 * <p>The data are invented: nothing here describes a real business.
 */
public final class DemandForecastDemo {
    private static final String[] FEATURES = {
        "temperature (standardized)", "weekend", "market day", "rain", "promotion", "days since new recipe (scaled)"
    };
    private static final double[] TRUE_LOG_RATE = {0.15, 0.40, 0.25, -0.30, 0.35, -0.10};
    private static final double TRUE_LOG_RATE_INTERCEPT = 3.2;
    private static final double[] TRUE_SELL_OUT = {-0.4, 1.1, 0.8, -0.9, 1.3, -0.2};
    private static final double TRUE_SELL_OUT_INTERCEPT = -1.0;

    private DemandForecastDemo() {
    }

    public static void main(String[] args) {
        int n = 200_000;
        long seed = 2026;
        RandomGenerator rng = RandomGeneratorFactory.of("L64X128MixRandom").create(seed);
        double[][] x = new double[n][FEATURES.length];
        double[] loaves = new double[n];
        double[] soldOut = new double[n];
        for (int i = 0; i < n; i++) {
            x[i][0] = rng.nextGaussian();
            x[i][1] = rng.nextDouble() < 2.0 / 7 ? 1 : 0;
            x[i][2] = rng.nextDouble() < 0.15 ? 1 : 0;
            x[i][3] = rng.nextDouble() < 0.3 ? 1 : 0;
            x[i][4] = rng.nextDouble() < 0.1 ? 1 : 0;
            x[i][5] = rng.nextDouble();
            loaves[i] = poisson(rng, Math.exp(TRUE_LOG_RATE_INTERCEPT + dot(TRUE_LOG_RATE, x[i])));
            double p = 1 / (1 + Math.exp(-(TRUE_SELL_OUT_INTERCEPT + dot(TRUE_SELL_OUT, x[i]))));
            soldOut[i] = rng.nextDouble() < p ? 1 : 0;
        }
        System.out.println("riskmin demo (invented scenario, generated data): " + n + " store-days, "
                + FEATURES.length + " features");

        Minimizer poisson = Minimizer.builder()
                .loss(Losses.poisson())
                .updateRule(UpdateRule.svrg())
                .batchSize(16)
                .standardize(true)
                .epochs(8)
                .seed(seed)
                .build();
        Fit demand = poisson.fit(Dataset.of(x, loaves));
        report("Loaves sold tomorrow (Poisson regression, log link, SVRG)", demand, TRUE_LOG_RATE,
                TRUE_LOG_RATE_INTERCEPT);

        Minimizer logistic = Minimizer.builder()
                .loss(Losses.logistic())
                .penalty(Penalty.l2(1e-5))
                .updateRule(UpdateRule.saga())
                .averaging(Averaging.none())
                .standardize(true)
                .epochs(8)
                .seed(seed)
                .build();
        Fit sellOut = logistic.fit(Dataset.of(x, soldOut));
        report("Sold out before noon (logistic regression, L2 1e-5, SAGA)", sellOut, TRUE_SELL_OUT,
                TRUE_SELL_OUT_INTERCEPT);
        double[] busySaturday = {1.0, 1, 1, 0, 1, 0.1};
        System.out.printf(Locale.ROOT, "  P(sell-out) on a warm market Saturday with a promotion: %.3f%n",
                sellOut.model().probability(busySaturday));
        System.out.println();
        System.out.println("A converged fit is not a validated model: check it on held-out data, and keep decisions"
                + " about people, money or safety under the domain's own review.");
    }

    private static void report(String title, Fit fit, double[] truth, double trueIntercept) {
        LinearModel model = fit.model();
        System.out.println();
        System.out.println(title);
        System.out.printf(Locale.ROOT, "  stopped: %s (%s) after %d steps, %.1f epochs, %d gradient evaluations,"
                        + " %d ms; objective %.6f%n", fit.stopReason(), fit.stopDetail(), fit.steps(), fit.epochs(),
                fit.gradientEvaluations(), fit.wallTime().toMillis(), fit.finalObjective());
        System.out.printf(Locale.ROOT, "  %-32s %10s %10s%n", "coefficient", "fitted", "generating");
        System.out.printf(Locale.ROOT, "  %-32s %10.4f %10.4f%n", "intercept", model.intercept(), trueIntercept);
        for (int j = 0; j < truth.length; j++) {
            System.out.printf(Locale.ROOT, "  %-32s %10.4f %10.4f%n", FEATURES[j], model.coefficient(j), truth[j]);
        }
    }

    private static double dot(double[] w, double[] x) {
        double s = 0;
        for (int j = 0; j < w.length; j++) {
            s += w[j] * x[j];
        }
        return s;
    }

    /** Knuth's multiplication method (TAOCP vol. 2, §3.4.1), fine for the small means used here. */
    private static int poisson(RandomGenerator rng, double mean) {
        double limit = Math.exp(-mean);
        double product = rng.nextDouble();
        int k = 0;
        while (product > limit) {
            product *= rng.nextDouble();
            k++;
        }
        return k;
    }
}
