package dev.riskmin.examples;

import dev.riskmin.Minimizer;
import dev.riskmin.data.Dataset;
import dev.riskmin.diagnostics.verdict.HealthVerdict;
import dev.riskmin.loss.Losses;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.model.LinearModel;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.sampling.Sampling;

import java.io.IOException;
import java.io.PrintStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.random.RandomGenerator;
import java.util.random.RandomGeneratorFactory;

/**
 * An invented scenario with generated data: a cooperative of neighbourhood bakeries runs its own
 * delivery vans and wants two models from its (made-up) delivery log.
 *
 * <ol>
 * <li><b>Will a delivery be late?</b> About 3 % of deliveries are, so the classes are imbalanced.
 * A logistic classifier is fitted with <i>stratified sampling</i>: every batch of 64 keeps the
 * late/on-time mix of the data within one delivery (Cochran, <i>Sampling Techniques</i>, 1977, ch. 5,
 * chapter from memory), instead of swinging between batches with no late delivery and batches
 * with several. A fifth of the deliveries is held out; the fit reports its loss on them.</li>
 * <li><b>How many minutes will a delivery take?</b> A faulty van clock garbles some records by an
 * hour or more — gross outliers, more frequent on long routes. The same data are fitted twice: with
 * the Huber loss (Huber, Ann. Math. Statist. 35(1), 1964), which grows only linearly beyond δ, and
 * with the squared loss, which lets each outlier pull with its full residual. The demo prints both
 * fits beside the coefficients that generated the data.</li>
 * </ol>
 *
 * Each fit runs with the standard diagnostics ({@link DiagnosedFit}): one line per epoch through
 * SLF4J, then the stop reason and the health verdict, and an HTML report per fit written to the
 * directory named by the system property {@code riskmin.demo.dir} (the Maven build sets it to
 * {@code erm-examples/target/demo}), else to {@code riskmin-demo} in the system's temporary
 * directory. The last line printed is that directory's absolute path.
 *
 * <p>The data are invented and seeded: nothing here describes a real business.
 */
public final class DeliveryDemo {
    /** The system property naming the report directory. */
    public static final String DIRECTORY_PROPERTY = "riskmin.demo.dir";
    /** Deliveries generated for each model by {@link #main}. */
    public static final int DEFAULT_DELIVERIES = 100_000;

    static final String[] FEATURES = {"distance (km)", "stops on the route", "rain", "early slot", "driver years"};
    static final double[] LATE_COEFFICIENTS = {0.10, 0.22, 0.9, -0.7, -0.15};
    static final double LATE_INTERCEPT = -6.0;
    static final double[] MINUTES_COEFFICIENTS = {2.2, 3.5, 6.0, -4.0, -0.3};
    static final double MINUTES_INTERCEPT = 8.0;
    /** The standard deviation of ordinary noise in delivery minutes. */
    static final double MINUTES_NOISE = 3.0;
    /**
     * Huber's δ: 1.345 σ keeps 95 % of the least-squares efficiency when the noise is normal (Huber,
     * <i>Robust Statistics</i>, 1981, from memory); σ = 3 minutes here, so δ = 4 minutes.
     */
    static final double HUBER_DELTA = 4.0;
    /**
     * The loss monitor may spend a quarter of the fit's gradient evaluations on the exact objective and
     * as much on the held-out loss: a measurement every few epochs, so the report plots both and the
     * verdict reads an exact trend. (The library's default, 1 %, suits long unattended fits.)
     */
    static final double MEASUREMENT_SHARE = 0.25;

    private DeliveryDemo() {
    }

    public static void main(String[] args) throws IOException {
        String property = System.getProperty(DIRECTORY_PROPERTY);
        Path directory = property != null && !property.isBlank()
                ? Path.of(property) : Path.of(System.getProperty("java.io.tmpdir"), "riskmin-demo");
        run(DEFAULT_DELIVERIES, 2026, directory, System.out);
    }

    /**
     * Runs the whole demo.
     *
     * @param deliveries the deliveries generated for each model (at least 1,000)
     * @param directory  where the reports go (created if missing)
     * @param out        where the tables and verdicts are printed
     */
    public static Result run(int deliveries, long seed, Path directory, PrintStream out) throws IOException {
        if (deliveries < 1000) {
            throw new IllegalArgumentException("deliveries (" + deliveries + ") must be >= 1000");
        }
        Path dir = directory.toAbsolutePath().normalize();
        Files.createDirectories(dir);
        RandomGenerator.SplittableGenerator master =
                RandomGeneratorFactory.<RandomGenerator.SplittableGenerator>of("L64X128MixRandom").create(seed);
        out.println("riskmin demo — an invented scenario with generated data: a bakery cooperative's delivery vans,"
                + " " + deliveries + " deliveries per model, " + FEATURES.length + " features.");

        // 1. Late deliveries: imbalanced classes, stratified sampling.
        double[][] x = features(deliveries, master.split());
        double[] late = lateLabels(x, master.split());
        int heldOutCount = deliveries / 5;
        Dataset training = Dataset.of(Arrays.copyOfRange(x, heldOutCount, deliveries),
                Arrays.copyOfRange(late, heldOutCount, deliveries));
        Dataset heldOut = Dataset.of(Arrays.copyOfRange(x, 0, heldOutCount), Arrays.copyOfRange(late, 0, heldOutCount));
        double lateShare = Arrays.stream(late).sum() / deliveries;
        out.println();
        out.printf(Locale.ROOT, "1. Will a delivery be late? %.1f%% of deliveries are late. Logistic loss, L2 1e-6,"
                + " SAGA, stratified batches of 64; %d deliveries held out.%n", 100 * lateShare, heldOutCount);
        Minimizer classifier = Minimizer.builder()
                .loss(Losses.logistic())
                .penalty(Penalty.l2(1e-6))
                .updateRule(UpdateRule.saga())
                .sampling(Sampling.stratified())
                .batchSize(64)
                .standardize(true)
                .epochs(12)
                .seed(seed)
                .build();
        DiagnosedFit.Outcome lateFit = DiagnosedFit.labelled("late deliveries").withMeasurementShare(MEASUREMENT_SHARE)
                .run(classifier, training, heldOut, null);
        LinearModel lateModel = lateFit.fit().model();
        verdict(out, lateFit);
        table(out, new String[] {"generating", "fitted"}, LATE_INTERCEPT, LATE_COEFFICIENTS,
                new LinearModel[] {lateModel});
        double auc = rankAgreement(lateModel, heldOut);
        out.printf(Locale.ROOT, "  held out: a late delivery outranks an on-time one in %.1f%% of pairs (AUC %.3f).%n",
                100 * auc, auc);
        Path lateReport = dir.resolve("late-deliveries.html");
        lateFit.writeReport(lateReport, facts("late deliveries (invented)", "late (3 % positive)"));

        // 2. Delivery minutes with gross outliers: Huber against squared loss on the same data.
        double[][] routes = features(deliveries, master.split());
        double[] minutes = minutes(routes, master.split());
        long outliers = Arrays.stream(minutes).filter(m -> m < 0).count();
        for (int i = 0; i < minutes.length; i++) {
            minutes[i] = Math.abs(minutes[i]); // the sign only marked the garbled records
        }
        out.println();
        out.printf(Locale.ROOT, "2. How many minutes will a delivery take? %d of %d records (%.1f%%) are garbled by a"
                        + " faulty clock (60-240 extra minutes, more often on long routes). SAGA, 20 epochs.%n",
                outliers, deliveries, 100.0 * outliers / deliveries);
        Dataset routeData = Dataset.of(routes, minutes);
        Minimizer.Builder regression = Minimizer.builder()
                .updateRule(UpdateRule.saga())
                .batchSize(16)
                .standardize(true)
                .epochs(20)
                .seed(seed);
        DiagnosedFit.Outcome huber = DiagnosedFit.labelled("delivery minutes, Huber")
                .withMeasurementShare(MEASUREMENT_SHARE)
                .run(regression.loss(Losses.huber(HUBER_DELTA)).build(), routeData, null, null);
        verdict(out, huber);
        DiagnosedFit.Outcome squared = DiagnosedFit.labelled("delivery minutes, squared")
                .withMeasurementShare(MEASUREMENT_SHARE)
                .run(regression.loss(Losses.squared()).build(), routeData, null, null);
        verdict(out, squared);
        LinearModel huberModel = huber.fit().model();
        LinearModel squaredModel = squared.fit().model();
        table(out, new String[] {"generating", "Huber δ=4", "squared"}, MINUTES_INTERCEPT, MINUTES_COEFFICIENTS,
                new LinearModel[] {huberModel, squaredModel});
        double huberError = largestError(huberModel, MINUTES_INTERCEPT, MINUTES_COEFFICIENTS);
        double squaredError = largestError(squaredModel, MINUTES_INTERCEPT, MINUTES_COEFFICIENTS);
        out.printf(Locale.ROOT, "  largest error in a coefficient: Huber %.3f, squared %.3f. Each garbled record"
                + " pulls the squared fit with its whole residual, the Huber fit with at most δ.%n", huberError,
                squaredError);
        if (squared.verdict().condition() == huber.verdict().condition()) {
            out.println("  Both runs are " + squared.verdict().condition() + ": each optimizer found the minimum of its"
                    + " objective. The squared loss's minimum is simply the wrong answer for data with gross outliers;"
                    + " convergence cannot tell you that, only the choice of loss can.");
        }
        Path huberReport = dir.resolve("delivery-minutes-huber.html");
        Path squaredReport = dir.resolve("delivery-minutes-squared.html");
        huber.writeReport(huberReport, facts("delivery minutes (invented, with gross outliers)", "minutes"));
        squared.writeReport(squaredReport, facts("delivery minutes (invented, with gross outliers)", "minutes"));

        out.println();
        out.println("A converged fit is not a validated model: check it on held-out data, and keep decisions about"
                + " people, money or safety under the domain's own review.");
        out.println("Reports (one self-contained HTML file per fit: " + lateReport.getFileName() + ", "
                + huberReport.getFileName() + ", " + squaredReport.getFileName() + ") written to:");
        out.println(dir);
        return new Result(lateFit.verdict(), huber.verdict(), squared.verdict(), auc, huberError, squaredError,
                List.of(lateReport, huberReport, squaredReport));
    }

    /**
     * What the demo found.
     *
     * @param lateVerdict    the verdict on the classifier's run
     * @param huberVerdict   the verdict on the Huber fit's run
     * @param squaredVerdict the verdict on the squared-loss fit's run
     * @param heldOutAuc     the classifier's held-out rank agreement (AUC)
     * @param huberError     the Huber fit's largest absolute coefficient error (intercept included)
     * @param squaredError   the squared-loss fit's largest absolute coefficient error
     * @param reports        the report files, absolute
     */
    public record Result(HealthVerdict lateVerdict, HealthVerdict huberVerdict, HealthVerdict squaredVerdict,
                         double heldOutAuc, double huberError, double squaredError, List<Path> reports) {
    }

    /** Route features of the invented deliveries, in the units of {@link #FEATURES}. */
    static double[][] features(int n, RandomGenerator rng) {
        double[][] x = new double[n][FEATURES.length];
        for (int i = 0; i < n; i++) {
            x[i][0] = 2 + 23 * Math.pow(rng.nextDouble(), 1.5);      // distance, 2-25 km, short routes commoner
            x[i][1] = 1 + rng.nextInt(12);                           // stops, 1-12
            x[i][2] = rng.nextDouble() < 0.3 ? 1 : 0;                // rain
            x[i][3] = rng.nextDouble() < 0.4 ? 1 : 0;                // early slot (before 7 am)
            x[i][4] = Math.floor(10 * rng.nextDouble());             // driver's years of experience
        }
        return x;
    }

    /** Late (1) or on time (0), drawn from the logistic model with the generating coefficients. */
    static double[] lateLabels(double[][] x, RandomGenerator rng) {
        double[] y = new double[x.length];
        for (int i = 0; i < x.length; i++) {
            double z = LATE_INTERCEPT + dot(LATE_COEFFICIENTS, x[i]);
            y[i] = rng.nextDouble() < 1 / (1 + Math.exp(-z)) ? 1 : 0;
        }
        return y;
    }

    /**
     * Delivery minutes: the linear model plus normal noise; a garbled record (probability 2 % plus
     * 0.4 % per km) gains 60-240 minutes and is returned negated, so the caller can count them.
     */
    static double[] minutes(double[][] x, RandomGenerator rng) {
        double[] y = new double[x.length];
        for (int i = 0; i < x.length; i++) {
            y[i] = MINUTES_INTERCEPT + dot(MINUTES_COEFFICIENTS, x[i]) + MINUTES_NOISE * rng.nextGaussian();
            if (rng.nextDouble() < 0.02 + 0.004 * x[i][0]) {
                y[i] = -(y[i] + 60 + 180 * rng.nextDouble());
            }
        }
        return y;
    }

    /**
     * The share of (late, on-time) pairs of held-out deliveries in which the late one has the higher
     * decision value, ties counting half: the area under the ROC curve (Hanley &amp; McNeil, Radiology
     * 143(1), 1982), computed from the ranks (the Mann–Whitney statistic).
     */
    static double rankAgreement(LinearModel model, Dataset data) {
        int n = data.size();
        double[] z = new double[n];
        double[] row = new double[data.dimension()];
        Integer[] order = new Integer[n];
        for (int i = 0; i < n; i++) {
            for (int j = 0; j < row.length; j++) {
                row[j] = data.features().get(i, j);
            }
            z[i] = model.decisionValue(row);
            order[i] = i;
        }
        Arrays.sort(order, (a, b) -> Double.compare(z[a], z[b]));
        double rankSum = 0;
        long positives = 0;
        for (int start = 0; start < n; ) {
            int end = start;
            while (end < n && z[order[end]] == z[order[start]]) {
                end++;
            }
            double midRank = (start + 1 + end) / 2.0; // ranks start..end-1, 1-based, tied share the mean
            for (int k = start; k < end; k++) {
                if (data.target(order[k]) > 0) {
                    rankSum += midRank;
                    positives++;
                }
            }
            start = end;
        }
        long negatives = n - positives;
        return (rankSum - positives * (positives + 1) / 2.0) / ((double) positives * negatives);
    }

    private static double largestError(LinearModel model, double intercept, double[] truth) {
        double worst = Math.abs(model.intercept() - intercept);
        for (int j = 0; j < truth.length; j++) {
            worst = Math.max(worst, Math.abs(model.coefficient(j) - truth[j]));
        }
        return worst;
    }

    private static Map<String, String> facts(String data, String target) {
        Map<String, String> facts = new LinkedHashMap<>();
        facts.put("data", data);
        facts.put("target", target);
        facts.put("features", String.join(", ", FEATURES));
        return facts;
    }

    private static void verdict(PrintStream out, DiagnosedFit.Outcome o) {
        out.printf(Locale.ROOT, "  %s: stopped %s (%s) after %d steps, %s epochs, %d ms; objective %s.%n", o.label(),
                o.fit().stopReason(), o.fit().stopDetail(), o.fit().steps(), EpochLog.figure(o.fit().epochs()),
                o.fit().wallTime().toMillis(), EpochLog.figure(o.fit().finalObjective()));
        HealthVerdict v = o.verdict();
        out.println("  verdict: " + v.condition() + " — " + v.summary());
        out.println("  advice: " + v.advice());
    }

    private static void table(PrintStream out, String[] columns, double intercept, double[] truth,
                              LinearModel[] models) {
        StringBuilder head = new StringBuilder(String.format(Locale.ROOT, "  %-22s", "coefficient"));
        for (String c : columns) {
            head.append(String.format(Locale.ROOT, " %11s", c));
        }
        out.println(head);
        List<String> names = new ArrayList<>();
        names.add("intercept");
        names.addAll(List.of(FEATURES));
        for (int j = -1; j < truth.length; j++) {
            StringBuilder line = new StringBuilder(String.format(Locale.ROOT, "  %-22s %11.3f", names.get(j + 1),
                    j < 0 ? intercept : truth[j]));
            for (LinearModel m : models) {
                line.append(String.format(Locale.ROOT, " %11.3f", j < 0 ? m.intercept() : m.coefficient(j)));
            }
            out.println(line);
        }
    }

    private static double dot(double[] w, double[] x) {
        double s = 0;
        for (int j = 0; j < w.length; j++) {
            s += w[j] * x[j];
        }
        return s;
    }
}
