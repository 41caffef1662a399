package dev.riskmin.reliability;

import dev.riskmin.Minimizer;
import dev.riskmin.data.Dataset;
import dev.riskmin.loss.Loss;
import dev.riskmin.loss.Losses;
import dev.riskmin.loss.MulticlassLoss;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.testing.Cases;

import java.util.ArrayList;
import java.util.List;
import java.util.random.RandomGenerator;

/**
 * Every loss of {@link Losses} with a small noisy dataset in its target domain (labels flipped at
 * random, so no class is separable and no loss can reach zero), and every update rule: the grid
 * on which the reliability tests check a promise "for every loss and every update rule".
 */
public final class EveryLoss {
    private EveryLoss() {
    }

    /** A loss with data it accepts. */
    public record Case(String name, Loss loss, MulticlassLoss multiclassLoss, Dataset data) {
        /** @return a builder with this loss */
        public Minimizer.Builder builder() {
            return multiclassLoss != null ? Minimizer.builder().loss(multiclassLoss) : Minimizer.builder().loss(loss);
        }

        @Override
        public String toString() {
            return name;
        }
    }

    /** @return the twelve losses, each with n = 80 rows of d = 3 features drawn from {@code seed} */
    public static List<Case> cases(long seed) {
        RandomGenerator r = Cases.rng(seed);
        int n = 80;
        double[][] x = Cases.gaussianMatrix(r, n, 3);
        double[] w = {1.0, -0.5, 0.25};
        double[] z = new double[n];
        for (int i = 0; i < n; i++) {
            z[i] = 0.3 + x[i][0] * w[0] + x[i][1] * w[1] + x[i][2] * w[2];
        }
        double[] real = new double[n];
        double[] counts = new double[n];
        double[] binary = new double[n];
        int[] classes = new int[n];
        for (int i = 0; i < n; i++) {
            real[i] = z[i] + 0.5 * r.nextGaussian();
            counts[i] = Math.floor(Math.exp(0.5 * z[i]) * 2 * r.nextDouble());
            boolean positive = z[i] + r.nextGaussian() > 0;
            binary[i] = positive ? 1 : -1;
            classes[i] = (int) Math.floorMod((long) Math.floor(z[i] + r.nextGaussian()), 3);
        }
        Dataset realData = Dataset.of(x, real);
        Dataset countData = Dataset.of(x, counts);
        Dataset binaryData = Dataset.of(x, binary);
        Dataset classData = Dataset.builder().features(x).labels(classes, 3).build();
        List<Case> out = new ArrayList<>();
        out.add(new Case("squared", Losses.squared(), null, realData));
        out.add(new Case("absolute", Losses.absolute(), null, realData));
        out.add(new Case("huber", Losses.huber(1.0), null, realData));
        out.add(new Case("pinball", Losses.pinball(0.3), null, realData));
        out.add(new Case("epsilonInsensitive", Losses.epsilonInsensitive(0.1), null, realData));
        out.add(new Case("poisson", Losses.poisson(), null, countData));
        out.add(new Case("logistic", Losses.logistic(), null, binaryData));
        out.add(new Case("hinge", Losses.hinge(), null, binaryData));
        out.add(new Case("squaredHinge", Losses.squaredHinge(), null, binaryData));
        out.add(new Case("smoothedHinge", Losses.smoothedHinge(0.5), null, binaryData));
        out.add(new Case("softmax", null, Losses.softmax(), classData));
        out.add(new Case("multiclassHinge", null, Losses.multiclassHinge(), classData));
        return out;
    }

    /** @return every update rule, at its factory's defaults (momentum 0.9) */
    public static List<UpdateRule> rules() {
        return List.of(UpdateRule.sgd(), UpdateRule.heavyBall(0.9), UpdateRule.nesterov(0.9), UpdateRule.adaGrad(),
                UpdateRule.adam(), UpdateRule.svrg(), UpdateRule.saga());
    }
}
