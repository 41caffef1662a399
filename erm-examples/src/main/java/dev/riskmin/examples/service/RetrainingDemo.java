package dev.riskmin.examples.service;

import dev.riskmin.Minimizer;
import dev.riskmin.data.Dataset;
import dev.riskmin.examples.DeliveryDemo;
import dev.riskmin.loss.Losses;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.model.LinearModel;
import dev.riskmin.model.ModelFile;
import dev.riskmin.step.StepSchedule;

import java.io.IOException;
import java.io.PrintStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;
import java.util.random.RandomGenerator;
import java.util.random.RandomGeneratorFactory;

/**
 * An invented scenario with generated data: a ferry operator's service re-fits its model of
 * crossing delays (minutes) from wind speed, passengers, vehicles and the tide, on a schedule. As
 * the season turns, the wind's effect drifts from round to round; each round fits the latest
 * crossings with the standard diagnostics and publishes the model only if the verdict is CONVERGED.
 * A second, misconfigured service (plain SGD with a step far too large, on unscaled features) then
 * tries once and is refused, leaving the published file as it was.
 *
 * <p>Run it from the command-line jar: {@code java -cp erm-examples/target/erm-examples-<version>-cli.jar
 * dev.riskmin.examples.service.RetrainingDemo}. The model goes to {@code retraining/crossing-delay.model}
 * under the directory of {@link DeliveryDemo#DIRECTORY_PROPERTY}, else under {@code riskmin-demo} in
 * the system's temporary directory. The data are invented: nothing here describes a real ferry.
 */
public final class RetrainingDemo {
    static final String[] FEATURES = {"wind (m/s)", "passengers (hundreds)", "vehicles (tens)", "ebb tide"};
    static final double INTERCEPT = 2.0;
    static final double[] OTHER_EFFECTS = {Double.NaN, 0.8, 1.1, 3.0};

    private RetrainingDemo() {
    }

    public static void main(String[] args) throws IOException, InterruptedException {
        String property = System.getProperty(DeliveryDemo.DIRECTORY_PROPERTY);
        Path base = property != null && !property.isBlank()
                ? Path.of(property) : Path.of(System.getProperty("java.io.tmpdir"), "riskmin-demo");
        run(base.resolve("retraining").toAbsolutePath().normalize(), 4, System.out);
    }

    /** The wind's effect on delay in round k (minutes per m/s): it grows as the season turns. */
    static double windEffect(int round) {
        return 0.5 + 0.1 * (round - 1);
    }

    /**
     * The crossings of round k: n rows drawn from the model with the round's wind effect and normal
     * noise of 2 minutes; the last fifth is held out.
     */
    static TrainingData crossings(int round, int n, long seed) {
        RandomGenerator rng = RandomGeneratorFactory.of("L64X128MixRandom").create(seed * 1_000_003L + round);
        double[][] x = new double[n][FEATURES.length];
        double[] y = new double[n];
        for (int i = 0; i < n; i++) {
            x[i][0] = 12 * rng.nextDouble();
            x[i][1] = 6 * rng.nextDouble();
            x[i][2] = Math.floor(8 * rng.nextDouble());
            x[i][3] = rng.nextDouble() < 0.5 ? 1 : 0;
            y[i] = INTERCEPT + windEffect(round) * x[i][0] + OTHER_EFFECTS[1] * x[i][1] + OTHER_EFFECTS[2] * x[i][2]
                    + OTHER_EFFECTS[3] * x[i][3] + 2 * rng.nextGaussian();
        }
        int fitted = n - n / 5;
        return new TrainingData(Dataset.of(Arrays.copyOf(x, fitted), Arrays.copyOf(y, fitted)),
                Dataset.of(Arrays.copyOfRange(x, fitted, n), Arrays.copyOfRange(y, fitted, n)));
    }

    /** A configuration that converges on these data: SAGA on standardized features, 20 epochs. */
    static Minimizer sound() {
        return Minimizer.builder().loss(Losses.squared()).updateRule(UpdateRule.saga()).standardize(true)
                .epochs(20).seed(11).build();
    }

    /** A misconfiguration: plain SGD with a constant step of 0.5 on unscaled features (curvature up to ~200). */
    static Minimizer stepTooLarge() {
        return Minimizer.builder().loss(Losses.squared()).updateRule(UpdateRule.sgd())
                .schedule(StepSchedule.constant(0.5)).epochs(5).seed(11).build();
    }

    static void run(Path directory, int rounds, PrintStream out) throws IOException, InterruptedException {
        Files.createDirectories(directory);
        Path model = directory.resolve("crossing-delay.model");
        Files.deleteIfExists(model);
        out.println("riskmin retraining demo — an invented ferry operator re-fits its crossing-delay model every"
                + " 200 ms; the wind's effect drifts from round to round.");
        try (RetrainingService service = RetrainingService.builder()
                .name("crossing-delay")
                .minimizer(sound())
                .data(k -> crossings(k, 20_000, 7))
                .publishTo(model)
                .every(Duration.ofMillis(200))
                .rounds(rounds)
                .build()) {
            service.start();
            if (!service.awaitRounds(rounds, Duration.ofMinutes(2))) {
                out.println("the rounds did not finish within two minutes");
            }
            for (Round r : service.rounds()) {
                out.printf(Locale.ROOT, "round %d: %s, %s (wind effect %.2f)%n", r.number(), r.condition(),
                        r.published() ? "published" : "refused", windEffect(r.number()));
            }
        }
        LinearModel published = ModelFile.defaults().readLinear(model);
        out.printf(Locale.ROOT, "published model: wind %.3f min per m/s (round %d generated %.2f)%n",
                published.coefficient(0), rounds, windEffect(rounds));

        byte[] before = Files.readAllBytes(model);
        out.println("a misconfigured service (plain SGD, step 0.5, unscaled features) tries one round:");
        try (RetrainingService misconfigured = RetrainingService.builder()
                .name("crossing-delay-misconfigured")
                .minimizer(stepTooLarge())
                .data(k -> crossings(rounds + k, 20_000, 7))
                .publishTo(model)
                .every(Duration.ofMillis(200))
                .rounds(1)
                .build()) {
            misconfigured.start();
            misconfigured.awaitRounds(1, Duration.ofMinutes(1));
            List<Round> tried = misconfigured.rounds();
            Round r = tried.get(0);
            out.println("round 1: " + r.condition() + ", " + (r.published() ? "published" : "refused") + " — "
                    + r.summary() + " Advice: " + r.advice());
        }
        out.println("the published file is " + (Arrays.equals(before, Files.readAllBytes(model)) ? "unchanged"
                : "CHANGED") + ": " + model);
    }
}
