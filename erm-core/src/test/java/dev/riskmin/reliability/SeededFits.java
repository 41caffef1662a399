package dev.riskmin.reliability;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.data.Dataset;
import dev.riskmin.loss.Losses;
import dev.riskmin.method.Averaging;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.objective.GeneralObjective;
import dev.riskmin.objective.SampleFunction;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.sampling.Sampling;
import dev.riskmin.testing.Cases;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.random.RandomGenerator;

/**
 * Seeded fits that cover every update rule, every sampling, the lazy sparse path, averaging,
 * standardization, the calibrated default schedule, a multiclass loss and a general objective, each
 * summarized as one line of the parameters' raw IEEE-754 bits. {@link #main} prints the lines, so a
 * second JVM can be compared with this one bit for bit.
 */
public final class SeededFits {
    private SeededFits() {
    }

    /** Prints {@link #lines()}, one per fit. */
    public static void main(String[] args) {
        for (String line : lines()) {
            System.out.println(line);
        }
    }

    /** @return "name reason steps bits…" for every fit, the bits of each parameter in hexadecimal */
    public static List<String> lines() {
        RandomGenerator r = Cases.rng(20240611L);
        int n = 300;
        int d = 8;
        double[][] x = Cases.gaussianMatrix(r, n, d);
        double[] w = Cases.gaussianVector(r, d, 1.0);
        double[] y = Cases.linearTargets(r, x, w, 0.5, 0.3);
        double[] binary = Cases.asDoubles(Cases.logisticLabels(r, x, w, 0.0));
        int[] classes = new int[n];
        double[] counts = new double[n];
        for (int i = 0; i < n; i++) {
            classes[i] = (int) Math.floorMod((long) Math.floor(y[i]), 3);
            counts[i] = Math.floor(Math.exp(0.3 * y[i]) * 2 * r.nextDouble());
        }
        Dataset dense = Dataset.of(x, y);
        Dataset sparse = sparse(x, y, r);
        Dataset labels = Dataset.builder().features(x).labels(classes, 3).build();

        List<String> out = new ArrayList<>();
        out.add(line("sgd-default", Minimizer.builder().seed(11).epochs(3).build().fit(dense)));
        out.add(line("adam-with-replacement-l2", Minimizer.builder().updateRule(UpdateRule.adam())
                .sampling(Sampling.withReplacement()).batchSize(5).penalty(Penalty.l2(1e-3)).stepSize(0.01).seed(12)
                .epochs(3).build().fit(dense)));
        out.add(line("saga-l1-sparse", Minimizer.builder().updateRule(UpdateRule.saga()).penalty(Penalty.l1(1e-2))
                .seed(13).epochs(3).build().fit(sparse)));
        out.add(line("sgd-lazy-elastic-net-sparse", Minimizer.builder().penalty(Penalty.elasticNet(1e-3, 1e-2))
                .batchSize(4).seed(14).epochs(3).build().fit(sparse)));
        out.add(line("svrg-importance", Minimizer.builder().updateRule(UpdateRule.svrg())
                .sampling(Sampling.importance()).batchSize(3).seed(15).epochs(3).build().fit(dense)));
        out.add(line("huber-tail-average-standardized", Minimizer.builder().loss(Losses.huber(0.5))
                .averaging(Averaging.tail(0.5)).standardize(true).seed(16).epochs(3).build().fit(dense)));
        out.add(line("hinge-calibrated-sequential", Minimizer.builder().loss(Losses.hinge())
                .sampling(Sampling.sequential()).penalty(Penalty.l2(1e-3)).seed(17).epochs(3).build()
                .fit(x, binary)));
        out.add(line("logistic-adagrad-polyak", Minimizer.builder().loss(Losses.logistic())
                .updateRule(UpdateRule.adaGrad()).stepSize(0.1).averaging(Averaging.polyakRuppert()).seed(18)
                .epochs(3).build().fit(x, binary)));
        out.add(line("poisson-heavy-ball", Minimizer.builder().loss(Losses.poisson())
                .updateRule(UpdateRule.heavyBall(0.5)).stepSize(1e-3).seed(19).epochs(3).build().fit(x, counts)));
        out.add(line("softmax-nesterov-stratified", Minimizer.builder().loss(Losses.softmax())
                .updateRule(UpdateRule.nesterov(0.5)).sampling(Sampling.stratified()).batchSize(6).seed(20)
                .epochs(3).build().fit(labels)));
        out.add(line("multiclass-hinge-exponential-average", Minimizer.builder().loss(Losses.multiclassHinge())
                .averaging(Averaging.exponential(0.9)).seed(21).epochs(3).build().fit(labels)));
        out.add(line("general-objective-sgd", Minimizer.builder().stepSize(0.01).seed(22).epochs(3).build()
                .fit(GeneralObjective.of(new Squares(x, y), Penalty.l2(1e-3)), FitOptions.none())));
        return out;
    }

    static String line(String name, Fit fit) {
        StringBuilder s = new StringBuilder(name).append(' ').append(fit.stopReason()).append(' ')
                .append(fit.steps());
        for (double v : fit.parameters()) {
            s.append(' ').append(Long.toHexString(Double.doubleToRawLongBits(v)));
        }
        s.append(String.format(Locale.ROOT, " objective=%s", Long.toHexString(Double.doubleToRawLongBits(
                fit.finalObjective()))));
        return s.toString();
    }

    private static Dataset sparse(double[][] x, double[] y, RandomGenerator r) {
        int n = x.length;
        int d = x[0].length;
        int[] rowStart = new int[n + 1];
        int[] columns = new int[n * d];
        double[] values = new double[n * d];
        int k = 0;
        for (int i = 0; i < n; i++) {
            for (int j = 0; j < d; j++) {
                if (r.nextInt(3) == 0) {
                    columns[k] = j;
                    values[k++] = x[i][j];
                }
            }
            rowStart[i + 1] = k;
        }
        return Dataset.builder().sparseFeatures(n, d, rowStart, java.util.Arrays.copyOf(columns, k),
                java.util.Arrays.copyOf(values, k)).targets(y).build();
    }

    /** (1/2)(x<sub>i</sub>·h − y<sub>i</sub>)², a user's model through the general contract. */
    private record Squares(double[][] x, double[] y) implements SampleFunction {
        @Override
        public int size() {
            return x.length;
        }

        @Override
        public int dimension() {
            return x[0].length;
        }

        @Override
        public double loss(double[] h, int i) {
            double e = residual(h, i);
            return 0.5 * e * e;
        }

        @Override
        public double addGradient(double[] h, int i, double scale, double[] g) {
            double e = residual(h, i);
            for (int j = 0; j < h.length; j++) {
                g[j] += scale * e * x[i][j];
            }
            return 0.5 * e * e;
        }

        private double residual(double[] h, int i) {
            double z = 0;
            for (int j = 0; j < h.length; j++) {
                z += x[i][j] * h[j];
            }
            return z - y[i];
        }
    }
}
