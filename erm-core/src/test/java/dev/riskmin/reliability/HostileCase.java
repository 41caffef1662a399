package dev.riskmin.reliability;

import dev.riskmin.CancellationToken;
import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.StopReason;
import dev.riskmin.data.Dataset;
import dev.riskmin.hook.FitControl;
import dev.riskmin.hook.FitListener;
import dev.riskmin.hook.StepView;
import dev.riskmin.loss.Loss;
import dev.riskmin.loss.Losses;
import dev.riskmin.loss.MulticlassLoss;
import dev.riskmin.method.Averaging;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.objective.GeneralObjective;
import dev.riskmin.objective.SampleFunction;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.sampling.Sampling;
import dev.riskmin.step.StepSchedule;
import dev.riskmin.testing.Cases;

import java.io.IOException;
import java.time.Duration;
import java.util.Arrays;
import java.util.random.RandomGenerator;

/**
 * One generated hostile case: a random configuration of every public option and random data with
 * injected hostile values, fitted through the public API. Everything is drawn from one generator
 * seeded by the case's seed, so a failing case replays exactly with {@code new HostileCase(seed).run()};
 * {@link #description()} lists what was drawn, in order.
 *
 * <p>Rates: each option is invalid in about 2–3 % of cases and extreme-but-valid in about 10–15 %,
 * so that about half of the cases reach the fit loop (common practice for fuzzing configurations,
 * no source: enough refusals to exercise every check, enough fits to exercise the loop).
 */
public final class HostileCase {
    /** Every fit's own time budget: the first bound on a case's running time. */
    static final Duration TIME_LIMIT = Duration.ofMillis(200);
    /** The time budget of the rare cases that ask for an endless epoch budget. */
    static final Duration SHORT_TIME_LIMIT = Duration.ofMillis(20);

    private final long seed;
    private final RandomGenerator r;
    private final StringBuilder log = new StringBuilder();
    private boolean sawNonFiniteView;
    private Loss lastLoss;      // the single-output loss drawn, for the targets' domain
    private boolean intercept;  // drawn with the configuration, for the parameters' layout
    private final FitListener extra;

    public HostileCase(long seed) {
        this(seed, null);
    }

    /**
     * @param extra a listener attached to every fit of the case (e.g. diagnostics), or null; with
     *              one, the entry points without options go through {@code fit(Dataset, FitOptions)}
     *              on the same data
     */
    public HostileCase(long seed, FitListener extra) {
        this.seed = seed;
        this.r = Cases.rng(seed);
        this.extra = extra;
    }

    public long seed() {
        return seed;
    }

    /** @return what the case drew so far, in order */
    public String description() {
        return log.toString();
    }

    /** @return whether the probing listener saw a NaN batch loss or step size through the view */
    boolean sawNonFiniteView() {
        return sawNonFiniteView;
    }

    /** The extra listener alone, for the entry points that take no options. */
    private FitOptions extraOnly() {
        return extra == null ? FitOptions.none() : FitOptions.listeners(extra);
    }

    private HostileCase note(String what) {
        if (log.length() > 0) {
            log.append("; ");
        }
        log.append(what);
        return this;
    }

    private boolean chance(double p) {
        return r.nextDouble() < p;
    }

    private double pick(double... values) {
        return values[r.nextInt(values.length)];
    }

    // ---- option values ----------------------------------------------------------------------------

    /** A positive real option around {@code typical}: sometimes extreme, rarely invalid. */
    private double positive(String name, double typical) {
        double v;
        if (chance(0.03)) {
            v = pick(Double.NaN, -1, 0, -0.0, Double.POSITIVE_INFINITY, Double.NEGATIVE_INFINITY, -Double.MIN_VALUE);
        } else if (chance(0.12)) {
            v = pick(Double.MIN_VALUE, 1e-300, 1e-12, 1e6, 1e100, 1e300, Double.MAX_VALUE);
        } else {
            v = typical * (0.05 + 2 * r.nextDouble());
        }
        note(name + "=" + v);
        return v;
    }

    /** A penalty strength: zero, extreme, typical, rarely invalid. */
    private double strength(String name) {
        double v;
        if (chance(0.03)) {
            v = pick(Double.NaN, -1e-3, Double.POSITIVE_INFINITY);
        } else if (chance(0.15)) {
            v = pick(0, Double.MIN_VALUE, 1e-300, 1e3, 1e300, Double.MAX_VALUE);
        } else {
            v = Math.pow(10, -6 + 6 * r.nextDouble());
        }
        note(name + "=" + v);
        return v;
    }

    /** A value in [0, 1) (momentum, decay rates): sometimes at the edges, rarely outside. */
    private double unit(String name, double typical) {
        double v;
        if (chance(0.03)) {
            v = pick(Double.NaN, -0.1, 1.0, 1.5, Double.POSITIVE_INFINITY);
        } else if (chance(0.1)) {
            v = pick(0, Double.MIN_VALUE, 0.999999, 1 - 1e-16);
        } else {
            v = typical * r.nextDouble();
        }
        note(name + "=" + v);
        return v;
    }

    /** A step size: typical 1e-4 … 10, sometimes absurd, rarely invalid. */
    private double stepSize(String name) {
        double v;
        if (chance(0.03)) {
            v = pick(0, -1, Double.NaN, Double.POSITIVE_INFINITY);
        } else if (chance(0.2)) {
            v = pick(Double.MIN_VALUE, 1e-300, 1e-12, 1e3, 1e6, 1e100, 1e300, Double.MAX_VALUE);
        } else {
            v = Math.pow(10, -4 + 5 * r.nextDouble());
        }
        note(name + "=" + v);
        return v;
    }

    /** A whole-number option ≥ 1: sometimes huge, rarely invalid. */
    private long count(String name, int typical) {
        long v;
        if (chance(0.03)) {
            v = chance(0.5) ? -1 : 0;
        } else if (chance(0.05)) {
            v = Long.MAX_VALUE;
        } else {
            v = 1 + r.nextInt(typical);
        }
        note(name + "=" + v);
        return v;
    }

    // ---- configuration ----------------------------------------------------------------------------

    private Loss loss() {
        switch (r.nextInt(10)) {
            case 0:
                note("loss=squared");
                return Losses.squared();
            case 1:
                note("loss=absolute");
                return Losses.absolute();
            case 2:
                note("loss=huber");
                return Losses.huber(positive("delta", 1));
            case 3: {
                double tau = chance(0.04) ? pick(0, 1, Double.NaN, -0.5, 1.5, Double.MIN_VALUE, 1 - 1e-16)
                        : r.nextDouble();
                note("loss=pinball tau=" + tau);
                return Losses.pinball(tau);
            }
            case 4:
                note("loss=epsilonInsensitive");
                return Losses.epsilonInsensitive(chance(0.2) ? 0 : positive("epsilon", 0.5));
            case 5:
                note("loss=poisson");
                return Losses.poisson();
            case 6:
                note("loss=logistic");
                return Losses.logistic();
            case 7:
                note("loss=hinge");
                return Losses.hinge();
            case 8:
                note("loss=squaredHinge");
                return Losses.squaredHinge();
            default:
                note("loss=smoothedHinge");
                return Losses.smoothedHinge(positive("gamma", 1));
        }
    }

    private MulticlassLoss multiclassLoss() {
        if (r.nextBoolean()) {
            note("loss=softmax");
            return Losses.softmax();
        }
        note("loss=multiclassHinge");
        return Losses.multiclassHinge();
    }

    private Penalty penalty() {
        switch (r.nextInt(4)) {
            case 0:
                note("penalty=none");
                return Penalty.none();
            case 1:
                note("penalty=l2");
                return Penalty.l2(strength("l2"));
            case 2:
                note("penalty=l1");
                return Penalty.l1(strength("l1"));
            default:
                note("penalty=elasticNet");
                return Penalty.elasticNet(strength("l1"), strength("l2"));
        }
    }

    private UpdateRule rule() {
        switch (r.nextInt(9)) {
            case 0:
            case 1:
                note("rule=sgd");
                return UpdateRule.sgd();
            case 2:
                note("rule=heavyBall");
                return UpdateRule.heavyBall(unit("momentum", 0.99));
            case 3:
                note("rule=nesterov");
                return UpdateRule.nesterov(unit("momentum", 0.99));
            case 4:
                note("rule=adaGrad");
                return r.nextBoolean() ? UpdateRule.adaGrad() : UpdateRule.adaGrad(positive("delta", 1e-8));
            case 5:
                note("rule=adam");
                return r.nextBoolean() ? UpdateRule.adam()
                        : UpdateRule.adam(unit("beta1", 0.95), unit("beta2", 0.9999), positive("delta", 1e-8),
                        chance(0.5) ? 0 : strength("decoupledDecay"));
            case 6:
                note("rule=svrg");
                return r.nextBoolean() ? UpdateRule.svrg() : UpdateRule.svrg(positive("epochsPerSnapshot", 1));
            default:
                note("rule=saga");
                return UpdateRule.saga();
        }
    }

    private StepSchedule schedule() {
        switch (r.nextInt(6)) {
            case 0:
                note("schedule=constant");
                return StepSchedule.constant(stepSize("stepSize"));
            case 1:
                note("schedule=inverseTime");
                return StepSchedule.inverseTime(stepSize("initialStepSize"), chance(0.2) ? 0 : strength("lambda"));
            case 2: {
                note("schedule=polynomial");
                double eps = stepSize("initialStepSize");
                double t0 = positive("t0", 10);
                double power = chance(0.03) ? pick(-1, Double.NaN, Double.POSITIVE_INFINITY) : 1.5 * r.nextDouble();
                note("power=" + power);
                return StepSchedule.polynomial(eps, t0, power);
            }
            case 3: {
                note("schedule=stepDecay");
                double eps = stepSize("initialStepSize");
                double factor = chance(0.03) ? pick(0, 1.5, Double.NaN) : chance(0.1) ? Double.MIN_VALUE : r.nextDouble() + 1e-3;
                note("factor=" + factor);
                return StepSchedule.stepDecay(eps, Math.min(factor, 1.5), count("every", 50));
            }
            case 4: {
                note("schedule=cosineRestarts");
                double max = stepSize("maxStepSize");
                double min = chance(0.03) ? pick(-1, 2 * max, Double.NaN) : max * r.nextDouble() * 0.5;
                note("minStepSize=" + min);
                double growth = chance(0.03) ? pick(0.5, Double.NaN, Double.POSITIVE_INFINITY) : 1 + 2 * r.nextDouble();
                note("periodGrowth=" + growth);
                return StepSchedule.cosineRestarts(max, min, count("period", 50), growth);
            }
            default:
                note("schedule=warmUp");
                return StepSchedule.warmUp(StepSchedule.constant(stepSize("stepSize")), count("warmUpSteps", 100));
        }
    }

    private Sampling sampling() {
        switch (r.nextInt(6)) {
            case 0:
                note("sampling=withReplacement");
                return Sampling.withReplacement();
            case 1:
                note("sampling=stratified");
                return Sampling.stratified();
            case 2: {
                double u = chance(0.05) ? pick(0, 1.5, Double.NaN, Double.MIN_VALUE, 1) : r.nextDouble();
                note("sampling=importance uniformShare=" + u);
                return Sampling.importance(u);
            }
            case 3:
                note("sampling=sequential");
                return Sampling.sequential();
            default:
                note("sampling=withoutReplacement");
                return Sampling.withoutReplacement();
        }
    }

    private Averaging averaging() {
        switch (r.nextInt(8)) {
            case 0:
                note("averaging=polyakRuppert");
                return Averaging.polyakRuppert();
            case 1: {
                long start = chance(0.05) ? -1 : r.nextInt(30);
                note("averaging=polyakRuppert(" + start + ")");
                return Averaging.polyakRuppert(start);
            }
            case 2: {
                double f = chance(0.05) ? pick(0, 1.5, Double.NaN) : chance(0.1) ? Double.MIN_VALUE : r.nextDouble() + 1e-9;
                note("averaging=tail(" + f + ")");
                return Averaging.tail(Math.min(f, 1.5));
            }
            case 3: {
                double beta = chance(0.05) ? pick(0, 1, Double.NaN) : r.nextDouble();
                note("averaging=exponential(" + beta + ")");
                return Averaging.exponential(beta);
            }
            default:
                return Averaging.none();
        }
    }

    /** A batch size 1 … n + 1 (every edge included), rarely zero, negative or absurd. */
    private int batchSize(int n) {
        int b;
        if (chance(0.03)) {
            b = (int) pick(0, -1, Integer.MAX_VALUE, 1 << 30, Integer.MIN_VALUE);
        } else if (chance(0.3)) {
            b = (int) pick(1, n, n + 1);
        } else {
            b = 1 + r.nextInt(n + 1);
        }
        note("batchSize=" + b);
        return b;
    }

    private Minimizer.Builder minimizer(int n, boolean multiclass) {
        Minimizer.Builder b = Minimizer.builder();
        if (multiclass) {
            b.loss(multiclassLoss());
        } else {
            lastLoss = loss();
            b.loss(lastLoss);
        }
        b.penalty(penalty()).updateRule(rule()).sampling(sampling()).batchSize(batchSize(n)).averaging(averaging());
        if (chance(0.6)) {
            b.schedule(schedule());
        } else {
            note("schedule=default");
        }
        b.seed(r.nextLong());
        intercept = chance(0.8);
        boolean standardize = chance(0.25);
        note("intercept=" + intercept + " standardize=" + standardize);
        b.intercept(intercept).standardize(standardize);
        if (chance(0.05)) {
            double f = pick(1, 1e300, 0.5, Double.NaN);
            note("explosionFactor=" + f);
            b.explosionFactor(f);
        }
        int budget = r.nextInt(100);
        if (budget < 2) {
            double e = pick(0, -1, Double.NaN, Double.POSITIVE_INFINITY);
            note("epochs=" + e);
            b.epochs(e);
        } else if (budget < 3) {
            note("epochs=1e9 with a short time limit");
            return b.epochs(1e9).timeLimit(SHORT_TIME_LIMIT);
        } else if (budget < 20) {
            long steps = 1 + r.nextInt(300);
            note("maxSteps=" + steps);
            b.maxSteps(steps);
        } else if (budget < 25) {
            long evaluations = 1 + r.nextInt(500);
            note("maxGradientEvaluations=" + evaluations + " and 3 epochs");
            b.maxGradientEvaluations(evaluations).epochs(3);
        } else {
            double e = 0.1 + 3 * r.nextDouble();
            note("epochs=" + e);
            b.epochs(e);
        }
        return b.timeLimit(TIME_LIMIT);
    }

    // ---- data -------------------------------------------------------------------------------------

    private double extreme() {
        return pick(1e308, -1e308, Double.MAX_VALUE, -Double.MAX_VALUE, Double.MIN_VALUE, -Double.MIN_VALUE,
                Double.MIN_NORMAL / 3, 1e-310, -0.0, 1e154, -1e154);
    }

    private double nonFinite() {
        return pick(Double.NaN, Double.POSITIVE_INFINITY, Double.NEGATIVE_INFINITY);
    }

    /** Features: Gaussian, then empty, constant and duplicated columns, duplicate rows and hostile values. */
    private double[][] features(double[][] clean) {
        int n = clean.length;
        int d = clean[0].length;
        double[][] x = new double[n][];
        for (int i = 0; i < n; i++) {
            x[i] = clean[i].clone();
        }
        if (chance(0.05)) {
            double s = pick(1e150, 1e-160, 1e300, 1e-300);
            note("features scaled by " + s);
            for (double[] row : x) {
                for (int j = 0; j < d; j++) {
                    row[j] *= s;
                }
            }
        }
        if (chance(0.2)) {
            int j = r.nextInt(d);
            note("empty column " + j);
            for (double[] row : x) {
                row[j] = 0;
            }
        }
        if (chance(0.2)) {
            int j = r.nextInt(d);
            double c = pick(1, -3, 1e308, Double.MIN_VALUE, 1e-200);
            note("constant column " + j + "=" + c);
            for (double[] row : x) {
                row[j] = c;
            }
        }
        if (chance(0.15) && d > 1) {
            int from = r.nextInt(d);
            int to = r.nextInt(d);
            note("column " + to + " duplicates column " + from);
            for (double[] row : x) {
                row[to] = row[from];
            }
        }
        if (chance(0.15)) {
            int from = r.nextInt(n);
            int copies = 1 + r.nextInt(n);
            note(copies + " copies of row " + from);
            for (int c = 0; c < copies; c++) {
                x[r.nextInt(n)] = x[from].clone();
            }
        }
        if (chance(0.04)) {
            note("all rows equal");
            for (int i = 1; i < n; i++) {
                x[i] = x[0].clone();
            }
        }
        if (chance(0.2)) {
            int k = 1 + r.nextInt(3);
            for (int c = 0; c < k; c++) {
                int i = r.nextInt(n);
                int j = r.nextInt(d);
                x[i][j] = extreme();
                note("x[" + i + ", " + j + "]=" + x[i][j]);
            }
        }
        if (chance(0.03)) {
            int i = r.nextInt(n);
            int j = r.nextInt(d);
            x[i][j] = nonFinite();
            note("x[" + i + ", " + j + "]=" + x[i][j]);
        }
        return x;
    }

    /** Real targets for the loss's domain (from clean decision values), with hostile entries. */
    private double[] targets(Loss loss, double[] z) {
        int n = z.length;
        double[] y = new double[n];
        switch (loss.domain()) {
            case NON_NEGATIVE:
                for (int i = 0; i < n; i++) {
                    y[i] = Math.floor(Math.exp(Math.min(z[i], 5)) * r.nextDouble() * 2);
                }
                break;
            case BINARY:
            case PROPORTION: {
                boolean plusMinus = r.nextBoolean();
                boolean proportions = loss.domain() == dev.riskmin.loss.TargetDomain.PROPORTION && chance(0.2);
                for (int i = 0; i < n; i++) {
                    boolean positive = z[i] + 0.5 * r.nextGaussian() > 0;
                    y[i] = proportions ? r.nextDouble() : positive ? 1 : plusMinus ? -1 : 0;
                }
                if (chance(0.1)) {
                    double only = pick(1, 0, -1);
                    note("single class y=" + only);
                    Arrays.fill(y, only);
                }
                break;
            }
            default:
                for (int i = 0; i < n; i++) {
                    y[i] = z[i] + 0.3 * r.nextGaussian();
                }
        }
        if (chance(0.1)) {
            int i = r.nextInt(n);
            y[i] = pick(1e308, -1e308, Double.MIN_VALUE, 1e-310, 0.5, 2, -2, 1e15);
            note("y[" + i + "]=" + y[i]);
        }
        if (chance(0.02)) {
            int i = r.nextInt(n);
            y[i] = nonFinite();
            note("y[" + i + "]=" + y[i]);
        }
        return y;
    }

    private static int[] roundedLabels(double[] y) {
        int[] labels = new int[y.length];
        for (int i = 0; i < y.length; i++) {
            labels[i] = (int) Math.round(y[i]);
        }
        return labels;
    }

    private int[] labels(double[] z, int classes) {
        int n = z.length;
        int[] labels = new int[n];
        for (int i = 0; i < n; i++) {
            double u = z[i] + 0.5 * r.nextGaussian();
            labels[i] = (int) Math.floorMod((long) Math.floor(u * classes), classes);
        }
        if (chance(0.1)) {
            int only = r.nextInt(classes);
            note("single class " + only);
            Arrays.fill(labels, only);
        }
        if (chance(0.04)) {
            int i = r.nextInt(n);
            labels[i] = (int) pick(-1, Integer.MAX_VALUE, 1_000_000_000, 50_000_000, Integer.MIN_VALUE);
            note("labels[" + i + "]=" + labels[i]);
        }
        return labels;
    }

    private double[] weights(int n) {
        double[] w = new double[n];
        for (int i = 0; i < n; i++) {
            w[i] = chance(0.2) ? 0 : r.nextDouble() * 3;
        }
        if (chance(0.15)) {
            int i = r.nextInt(n);
            w[i] = pick(1e308, Double.MAX_VALUE, Double.MIN_VALUE, 1e-310);
            note("weights[" + i + "]=" + w[i]);
        }
        if (chance(0.05)) {
            note("zero weights but one");
            Arrays.fill(w, 0);
            w[r.nextInt(n)] = 1;
        }
        if (chance(0.03)) {
            int kind = r.nextInt(4);
            if (kind == 0) {
                note("all weights zero");
                Arrays.fill(w, 0);
            } else if (kind == 1) {
                note("weights of length n + 1");
                return Arrays.copyOf(w, n + 1);
            } else {
                int i = r.nextInt(n);
                w[i] = kind == 2 ? -1 : nonFinite();
                note("weights[" + i + "]=" + w[i]);
            }
        }
        return w;
    }

    private int[] strata(int n) {
        int s = 1 + r.nextInt(Math.min(n, 4));
        int[] strata = new int[n];
        for (int i = 0; i < n; i++) {
            strata[i] = i % s;
        }
        for (int i = n - 1; i > 0; i--) {
            int j = r.nextInt(i + 1);
            int t = strata[i];
            strata[i] = strata[j];
            strata[j] = t;
        }
        if (chance(0.05)) {
            int kind = r.nextInt(3);
            if (kind == 0) {
                note("strata with a gap");
                for (int i = 0; i < n; i++) {
                    strata[i] *= 2;
                }
            } else if (kind == 1) {
                strata[r.nextInt(n)] = -1;
                note("a negative stratum");
            } else {
                note("strata of length n - 1");
                return Arrays.copyOf(strata, n - 1);
            }
        }
        note(s + " strata");
        return strata;
    }

    /** Puts the features into a builder: rows, a flat array, or CSR (sometimes corrupted). */
    private void putFeatures(Dataset.Builder b, double[][] x) {
        int n = x.length;
        int d = x[0].length;
        int form = r.nextInt(10);
        if (form < 3) {
            note("flat features");
            double[] flat = new double[n * d];
            for (int i = 0; i < n; i++) {
                System.arraycopy(x[i], 0, flat, i * d, d);
            }
            b.flatFeatures(flat, n, d, r.nextBoolean());
        } else if (form < 6) {
            note("sparse features");
            int[] rowStart = new int[n + 1];
            int[] columns = new int[n * d];
            double[] values = new double[n * d];
            int k = 0;
            for (int i = 0; i < n; i++) {
                for (int j = 0; j < d; j++) {
                    if (x[i][j] != 0 && chance(0.6)) {
                        columns[k] = j;
                        values[k++] = x[i][j];
                    }
                }
                rowStart[i + 1] = k;
            }
            columns = Arrays.copyOf(columns, k);
            values = Arrays.copyOf(values, k);
            if (chance(0.03) && k > 0) {
                int e = r.nextInt(k);
                int kind = r.nextInt(3);
                if (kind == 0) {
                    columns[e] = d + r.nextInt(3);
                } else if (kind == 1) {
                    columns[e] = -1;
                } else {
                    rowStart[1 + r.nextInt(n)] = k + 1;
                }
                note("corrupted CSR (kind " + kind + ")");
            }
            b.sparseFeatures(n, d, rowStart, columns, values);
        } else {
            b.features(x);
        }
    }

    // ---- the case -----------------------------------------------------------------------------------

    /**
     * Draws the case and fits it.
     *
     * @return the fit
     * @throws RuntimeException whatever the library throws (the caller judges it)
     */
    public Fit run() {
        int n = 1 + r.nextInt(50);
        int d = 1 + r.nextInt(20);
        boolean multiclass = chance(0.2);
        note("n=" + n + " d=" + d + (multiclass ? " multiclass" : ""));
        double[][] clean = Cases.gaussianMatrix(r, n, d);
        double[] w = Cases.gaussianVector(r, d, 1.0);
        double[] z = new double[n];
        for (int i = 0; i < n; i++) {
            for (int j = 0; j < d; j++) {
                z[i] += clean[i][j] * w[j];
            }
        }
        Minimizer.Builder builder = minimizer(n, multiclass);
        Loss loss = null;
        double[] y = null;
        int[] labels = null;
        int classes = 0;
        if (multiclass) {
            classes = 2 + r.nextInt(4);
            labels = labels(z, classes);
        } else {
            // The loss is needed for the target domain; rebuild it the same way from the builder's choice.
            loss = lastLoss;
            y = targets(loss, z);
        }
        double[][] x = features(clean);
        Minimizer minimizer = builder.build();

        int entry = r.nextInt(100);
        if (entry < 15) {
            note("fit(x, " + (multiclass ? "labels)" : "y)"));
            if (extra != null) {
                return minimizer.fit(multiclass ? Dataset.of(x, labels) : Dataset.of(x, y), extraOnly());
            }
            return multiclass ? minimizer.fit(x, labels) : minimizer.fit(x, y);
        }
        if (entry < 17) {
            // The other array form: class labels to a single-output loss, real targets to a multiclass one.
            note(multiclass ? "fit(x, labels as doubles)" : "fit(x, y rounded to int labels)");
            if (extra != null) {
                Dataset data = multiclass ? Dataset.of(x, Cases.asDoubles(labels))
                        : Dataset.builder().features(x).targets(Cases.asDoubles(roundedLabels(y))).build();
                return minimizer.fit(data, extraOnly());
            }
            return multiclass ? minimizer.fit(x, Cases.asDoubles(labels)) : minimizer.fit(x, roundedLabels(y));
        }
        if (entry < 23 && !multiclass) {
            return generalFit(minimizer, x, y);
        }
        Dataset.Builder b = Dataset.builder();
        putFeatures(b, x);
        if (multiclass) {
            if (chance(0.1)) {
                int k = (int) pick(classes, classes - 1, 1, 0, classes + 2);
                note("labels(int[], " + k + ")");
                b.labels(labels, k);
            } else {
                b.labels(labels);
            }
        } else if (chance(0.15) && loss.domain() == dev.riskmin.loss.TargetDomain.BINARY) {
            int[] asLabels = new int[n];
            for (int i = 0; i < n; i++) {
                asLabels[i] = y[i] > 0 ? 1 : 0;
            }
            if (chance(0.2)) {
                asLabels[r.nextInt(n)] = 2; // a third class for a binary loss
            }
            note("binary labels as class labels " + Arrays.toString(asLabels));
            b.labels(asLabels);
        } else {
            b.targets(y);
        }
        if (chance(0.3)) {
            b.weights(weights(n));
        }
        if (chance(0.15)) {
            b.strata(strata(n));
        }
        Dataset data = b.build();
        if (entry < 35) {
            note("fit(data)");
            return extra == null ? minimizer.fit(data) : minimizer.fit(data, extraOnly());
        }
        return minimizer.fit(data, options(data, x, multiclass ? classes : 0));
    }


    private FitOptions options(Dataset data, double[][] x, int classes) {
        FitOptions.Builder o = FitOptions.builder();
        if (chance(0.5)) {
            note("probing listener");
            o.listener(new ProbingListener(r.nextLong()));
        }
        if (extra != null) {
            o.listener(extra);
        }
        if (chance(0.05)) {
            CancellationToken token = new CancellationToken();
            token.cancel();
            note("token cancelled before the fit");
            o.cancellation(token);
        }
        if (chance(0.15)) {
            int p = Math.max(1, classes) * (data.dimension() + (intercept ? 1 : 0));
            int length = chance(0.1) ? p + 1 : p;
            double[] h0 = Cases.gaussianVector(r, length, pick(1, 1e150, 1e300));
            if (chance(0.05)) {
                h0[0] = nonFinite();
            }
            note("initialParameters of length " + length + " scale " + Math.abs(h0[0]));
            o.initialParameters(h0);
        }
        if (chance(0.1)) {
            int m = Math.max(1, x.length / 2);
            int dHeld = chance(0.1) ? x[0].length + 1 : x[0].length;
            double[][] rows = new double[m][dHeld];
            for (int i = 0; i < m; i++) {
                System.arraycopy(x[i], 0, rows[i], 0, Math.min(dHeld, x[i].length));
            }
            note("heldOut of " + m + " rows, " + dHeld + " columns");
            if (classes > 0) {
                int[] labels = new int[m];
                for (int i = 0; i < m; i++) {
                    labels[i] = (int) data.target(i);
                }
                o.heldOut(Dataset.builder().features(rows).labels(labels, Math.max(2, classes)).build());
            } else {
                double[] y = new double[m];
                for (int i = 0; i < m; i++) {
                    y[i] = data.target(i);
                }
                o.heldOut(Dataset.of(rows, y));
            }
        }
        return o.build();
    }

    /** A user's least-squares model through the general contract, sometimes returning non-finite values. */
    private Fit generalFit(Minimizer minimizer, double[][] x, double[] y) {
        boolean hostile = chance(0.2);
        note("general objective" + (hostile ? " that returns NaN at large parameters" : ""));
        SampleFunction f = new LeastSquaresFunction(x, y, hostile);
        double[] weights = chance(0.3) ? weights(x.length) : null;
        GeneralObjective objective = GeneralObjective.of(f, weights, penaltyAgain());
        return minimizer.fit(objective, listenerOnly());
    }

    private Penalty penaltyAgain() {
        return chance(0.5) ? Penalty.none() : Penalty.l2(strength("general l2"));
    }

    /** Options for a general objective: at most the probing listener (no starting point, no held-out data). */
    private FitOptions listenerOnly() {
        FitOptions.Builder o = FitOptions.builder();
        if (chance(0.5)) {
            note("probing listener");
            o.listener(new ProbingListener(r.nextLong()));
        }
        if (extra != null) {
            o.listener(extra);
        }
        return o.build();
    }

    /** (1/2)(x<sub>i</sub>·h − y<sub>i</sub>)² over the rows (features may be hostile). */
    private static final class LeastSquaresFunction implements SampleFunction {
        private final double[][] x;
        private final double[] y;
        private final boolean hostile;

        LeastSquaresFunction(double[][] x, double[] y, boolean hostile) {
            this.x = x;
            this.y = y;
            this.hostile = hostile;
        }

        @Override
        public int size() {
            return x.length;
        }

        @Override
        public int dimension() {
            return x[0].length;
        }

        private double residual(double[] h, int i) {
            double z = 0;
            for (int j = 0; j < h.length; j++) {
                z += x[i][j] * h[j];
            }
            return z - y[i];
        }

        @Override
        public double loss(double[] h, int i) {
            double e = residual(h, i);
            return hostile && Math.abs(e) > 10 ? Double.NaN : 0.5 * e * e;
        }

        @Override
        public double addGradient(double[] h, int i, double scale, double[] g) {
            double e = residual(h, i);
            for (int j = 0; j < h.length; j++) {
                g[j] += scale * e * x[i][j];
            }
            return hostile && Math.abs(e) > 10 ? Double.NaN : 0.5 * e * e;
        }
    }

    /**
     * A listener that pokes the hook at random steps: probes, hostile step-size factors and batch
     * requests, restores, halts, and exceptions (unchecked and checked).
     */
    private final class ProbingListener implements FitListener {
        private final RandomGenerator own;
        private double[] buffer = new double[0];

        ProbingListener(long seed) {
            this.own = Cases.rng(seed);
        }

        @Override
        public void step(StepView view, FitControl control) {
            if (!(view.batchLoss() < Double.POSITIVE_INFINITY && view.batchLoss() > Double.NEGATIVE_INFINITY)
                    || !(view.stepSize() >= 0) || Double.isInfinite(view.stepSize())) {
                sawNonFiniteView = true;
            }
            if (own.nextInt(8) != 0) {
                return;
            }
            poke(view, control);
        }

        @Override
        public void epochEnded(StepView view, FitControl control) {
            if (own.nextInt(3) == 0) {
                poke(view, control);
            }
        }

        private void poke(StepView view, FitControl control) {
            int p = view.dimension();
            if (buffer.length < p) {
                buffer = new double[p];
            }
            int n = view.sampleCount();
            switch (own.nextInt(14)) {
                case 0:
                    view.probe().sampleGradient(own.nextInt(view.batchLength()), buffer);
                    break;
                case 1:
                    view.probe().fullGradient(buffer);
                    break;
                case 2:
                    view.probe().objective();
                    break;
                case 3: {
                    int size = own.nextInt(30) == 0 ? (int) pick(0, Integer.MAX_VALUE, 1 << 30) : 1 + own.nextInt(2 * n);
                    view.probe().independentBatchGradient(size, buffer);
                    break;
                }
                case 4: {
                    int size = own.nextInt(20) == 0 ? (int) pick(0, -5, Integer.MAX_VALUE, 1 << 30) : 1 + own.nextInt(2 * n);
                    control.requestBatchSize(size);
                    break;
                }
                case 5: {
                    double f = own.nextInt(10) == 0 ? pick(Double.NaN, 0, Double.POSITIVE_INFINITY)
                            : pick(0.5, 2, 1e-300, 1e300, 10);
                    control.scaleStepSize(f);
                    break;
                }
                case 6: {
                    view.copyParameters(buffer);
                    double[] h = Arrays.copyOf(buffer, p);
                    if (own.nextInt(5) == 0) {
                        h[own.nextInt(p)] = Double.NaN;
                    }
                    control.restoreParameters(h);
                    break;
                }
                case 7:
                    control.halt(StopReason.values()[own.nextInt(StopReason.values().length)], "probing listener");
                    break;
                case 8:
                    throw new IllegalStateException("probing listener throws (test)");
                case 9:
                    throw sneaky(new IOException("probing listener throws a checked exception (test)"));
                case 10:
                    if (view.probe().hasHeldOut()) {
                        view.probe().heldOutLoss();
                    }
                    break;
                case 11:
                    view.copyBatchGradient(buffer);
                    break;
                default:
                    view.parameter(own.nextInt(p));
            }
        }
    }

    /** Throws a checked exception from a method that declares none, as code compiled elsewhere may. */
    @SuppressWarnings("unchecked")
    static <E extends Throwable> RuntimeException sneaky(Throwable e) throws E {
        throw (E) e;
    }
}
