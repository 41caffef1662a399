package dev.riskmin.examples.cli;

import dev.riskmin.Fit;
import dev.riskmin.Minimizer;
import dev.riskmin.StopReason;
import dev.riskmin.data.Dataset;
import dev.riskmin.diagnostics.sink.CsvTraceWriter;
import dev.riskmin.diagnostics.sink.JsonLinesTraceWriter;
import dev.riskmin.diagnostics.sink.TraceWriter;
import dev.riskmin.diagnostics.verdict.Condition;
import dev.riskmin.diagnostics.verdict.HealthVerdict;
import dev.riskmin.examples.DiagnosedFit;
import dev.riskmin.examples.EpochLog;
import dev.riskmin.examples.cli.Choices.LossChoice;
import dev.riskmin.examples.cli.Choices.PenaltyChoice;
import dev.riskmin.examples.cli.Choices.RuleChoice;
import dev.riskmin.examples.cli.Choices.SamplerChoice;
import dev.riskmin.examples.cli.Choices.ScheduleChoice;
import dev.riskmin.examples.cli.Choices.TraceFormat;
import dev.riskmin.loss.Loss;
import dev.riskmin.loss.Losses;
import dev.riskmin.loss.MulticlassLoss;
import dev.riskmin.loss.TargetDomain;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.model.LinearModel;
import dev.riskmin.model.ModelFile;
import dev.riskmin.model.MulticlassModel;
import dev.riskmin.model.SavedModel;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.sampling.Sampling;
import dev.riskmin.step.StepSchedule;
import picocli.CommandLine;
import picocli.CommandLine.ArgGroup;
import picocli.CommandLine.Command;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Option;
import picocli.CommandLine.ParameterException;
import picocli.CommandLine.Parameters;
import picocli.CommandLine.Spec;

import java.io.IOException;
import java.io.PrintWriter;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.concurrent.Callable;

/**
 * The command line: fits a linear model to the rows of a CSV file by empirical-risk minimization,
 * L(h) = (1/n) Σ<sub>i</sub> ℓ(w·x<sub>i</sub> + b, y<sub>i</sub>) + R(w), with the standard diagnostics
 * attached, then writes the fitted model ({@code docs/model-format.md}), the trace of diagnostic
 * events (CSV or JSON lines) and the HTML report, prints the health verdict, and exits with a code
 * that says whether to trust the fit ({@link ExitCodes}). Every option, its default and the exit
 * codes are in {@code --help} and {@code docs/cli.md}.
 *
 * <p>Held-out rows are chosen by a seeded shuffle ({@link RowSplit}): for a classification loss
 * within each class, so the held-out share of every class is the same, else over all rows. They are
 * kept out of the fit and given to the diagnostics as held-out data; the held-out loss and, for
 * classifiers, the share misclassified are printed.
 *
 * <p>Arguments are parsed by picocli, the file by Apache Commons CSV. {@link #main} exits the JVM;
 * {@link #run} returns the exit code instead, for use in-process.
 */
@Command(name = "riskmin-fit", sortOptions = false, usageHelpAutoWidth = true, abbreviateSynopsis = true,
        description = {
            "Fits a linear model to the rows of a CSV file by minimizing the empirical risk",
            "  L(h) = (1/n) sum_i loss(w.x_i + b, y_i) + penalty(w)",
            "with stochastic gradient steps, watched by the standard diagnostics. Writes the model, the trace"
                    + " of diagnostic events and an HTML report, prints the health verdict, and exits with a code"
                    + " that says whether the fit converged (see Exit codes below).",
            "Run it as: java -jar erm-examples-<version>-cli.jar FILE --target COLUMN [OPTIONS]"
        },
        exitCodeListHeading = "%nExit codes:%n",
        footerHeading = "%n",
        footer = {
            "Progress lines (one per epoch) and stopping-test lines go through SLF4J to standard output; add"
                    + " -Dorg.slf4j.simpleLogger.logFile=System.err before -jar to move them, or use --quiet.",
            "More: docs/cli.md. A converged fit is not a validated model: check it on held-out data."
        })
public final class FitCommand implements Callable<Integer> {

    @Spec
    CommandSpec spec;

    @Parameters(index = "0", paramLabel = "FILE",
            description = "The CSV file: a header row naming the columns, then one row per sample.")
    Path file;

    @ArgGroup(validate = false, heading = "%nData:%n", order = 1)
    DataOptions data = new DataOptions();

    @ArgGroup(validate = false, heading = "%nObjective (loss and penalty):%n", order = 2)
    ObjectiveOptions objective = new ObjectiveOptions();

    @ArgGroup(validate = false, heading = "%nMethod (update rule, sampler, batch, step sizes):%n", order = 3)
    MethodOptions method = new MethodOptions();

    @ArgGroup(validate = false, heading = "%nBudgets (the fit stops at the first one spent):%n", order = 4)
    BudgetOptions budget = new BudgetOptions();

    @ArgGroup(validate = false, heading = "%nOutput and diagnostics:%n", order = 5)
    OutputOptions output = new OutputOptions();

    @Option(names = {"-h", "--help"}, usageHelp = true, order = 100, description = "Show this help and exit.")
    boolean help;

    private Result result;

    /** The data options. */
    static final class DataOptions {
        @Option(names = {"-t", "--target"}, paramLabel = "COLUMN", order = 1,
                description = "The column holding the target y (required). Regression losses take any number;"
                        + " binary classifiers 0/1 or -1/+1; multiclass losses whole numbers 0..K-1.")
        String target;

        @Option(names = {"-f", "--features"}, paramLabel = "COLUMN", split = ",", order = 2,
                description = "The feature columns x, in order, comma-separated or repeated"
                        + " (default: every column except the target).")
        List<String> features = new ArrayList<>();

        @Option(names = "--delimiter", paramLabel = "CHAR", defaultValue = ",", order = 3,
                description = "The character between cells; 'tab' for a tab (default: ${DEFAULT-VALUE}).")
        String delimiter;

        @Option(names = "--comment-char", paramLabel = "CHAR", defaultValue = "#", order = 4,
                description = "Lines starting with this character are skipped; 'none' for no comments"
                        + " (default: ${DEFAULT-VALUE}).")
        String commentChar;

        @Option(names = "--held-out-fraction", paramLabel = "F", defaultValue = "0.2", order = 5,
                description = "The share of rows kept out of the fit, in [0, 1), chosen by a shuffle seeded"
                        + " with --seed (within each class for classification losses); the held-out loss is"
                        + " measured on them (default: ${DEFAULT-VALUE}).")
        double heldOutFraction;

        @Option(names = "--standardize", negatable = true, defaultValue = "true", fallbackValue = "true", order = 6,
                description = "Scale each feature to mean 0 and variance 1 for the fit; the model is written on"
                        + " the original scale, the penalty acts on the standardized one (default: ${DEFAULT-VALUE}).")
        boolean standardize;

        @Option(names = "--intercept", negatable = true, defaultValue = "true", fallbackValue = "true", order = 7,
                description = "Fit an unpenalized intercept b (default: ${DEFAULT-VALUE}).")
        boolean intercept;
    }

    /** The objective options. */
    static final class ObjectiveOptions {
        @Option(names = "--loss", paramLabel = "NAME", defaultValue = "squared", order = 1,
                converter = Choices.LossConverter.class, completionCandidates = Choices.LossCandidates.class,
                description = "The pointwise loss: ${COMPLETION-CANDIDATES} (default: ${DEFAULT-VALUE}).")
        LossChoice loss;

        @Option(names = "--huber-delta", paramLabel = "DELTA", defaultValue = "1.0", order = 2,
                description = "Huber loss: the residual beyond which the loss grows linearly, in units of y,"
                        + " > 0 (default: ${DEFAULT-VALUE}).")
        double huberDelta;

        @Option(names = "--quantile", paramLabel = "TAU", defaultValue = "0.5", order = 3,
                description = "Pinball loss: the quantile level tau fitted, in (0, 1) (default: ${DEFAULT-VALUE}).")
        double quantile;

        @Option(names = "--tube-half-width", paramLabel = "EPS", defaultValue = "0.1", order = 4,
                description = "Epsilon-insensitive loss: residuals within this half-width cost nothing, in units"
                        + " of y, >= 0 (default: ${DEFAULT-VALUE}).")
        double tubeHalfWidth;

        @Option(names = "--hinge-smoothing", paramLabel = "GAMMA", defaultValue = "1.0", order = 5,
                description = "Smoothed hinge loss: the width of the smoothed margin interval, > 0"
                        + " (default: ${DEFAULT-VALUE}).")
        double hingeSmoothing;

        @Option(names = "--penalty", paramLabel = "NAME", defaultValue = "none", order = 6,
                converter = Choices.PenaltyConverter.class, completionCandidates = Choices.PenaltyCandidates.class,
                description = "The penalty on w (never on b): none; l1 = lambda |w|_1; l2 = (lambda/2) |w|^2;"
                        + " elastic-net = a lambda |w|_1 + ((1-a) lambda/2) |w|^2 with a = --l1-share"
                        + " (default: ${DEFAULT-VALUE}).")
        PenaltyChoice penalty;

        @Option(names = "--strength", paramLabel = "LAMBDA", defaultValue = "1e-4", order = 7,
                description = "The penalty's strength lambda, >= 0 (default: ${DEFAULT-VALUE}).")
        double strength;

        @Option(names = "--l1-share", paramLabel = "A", defaultValue = "0.5", order = 8,
                description = "Elastic net: the share a of lambda on |w|_1, in [0, 1] (default: ${DEFAULT-VALUE}).")
        double l1Share;
    }

    /** The method options. */
    static final class MethodOptions {
        @Option(names = "--update-rule", paramLabel = "NAME", defaultValue = "saga", order = 1,
                converter = Choices.RuleConverter.class, completionCandidates = Choices.RuleCandidates.class,
                description = "The update rule: ${COMPLETION-CANDIDATES} (default: ${DEFAULT-VALUE}).")
        RuleChoice rule;

        @Option(names = "--momentum", paramLabel = "MU", defaultValue = "0.9", order = 2,
                description = "heavy-ball and nesterov: the momentum mu, in [0, 1) (default: ${DEFAULT-VALUE}).")
        double momentum;

        @Option(names = "--sampler", paramLabel = "NAME", defaultValue = "without-replacement", order = 3,
                converter = Choices.SamplerConverter.class, completionCandidates = Choices.SamplerCandidates.class,
                description = "How batches are drawn: ${COMPLETION-CANDIDATES}; stratified keeps each class's share"
                        + " in every batch and needs a classification loss (default: ${DEFAULT-VALUE}).")
        SamplerChoice sampler;

        @Option(names = {"-b", "--batch-size"}, paramLabel = "B", defaultValue = "1", order = 4,
                description = "Samples per step, from 1 to the number of rows fitted (default: ${DEFAULT-VALUE}).")
        int batchSize;

        @Option(names = "--schedule", paramLabel = "NAME", defaultValue = "auto", order = 5,
                converter = Choices.ScheduleConverter.class, completionCandidates = Choices.ScheduleCandidates.class,
                description = "The step-size schedule eps_t: ${COMPLETION-CANDIDATES}. auto: constant at --step-size"
                        + " if given, else the library's default (a safe constant from the loss's smoothness, or a"
                        + " calibrated step decaying as (1 + t/m)^-0.75 for non-smooth losses). constant: eps_0."
                        + " polynomial: eps_0 (1 + t/m)^-p with m steps per epoch. step-decay: eps_0 q^floor(t/(k m))."
                        + " cosine-restarts: from eps_0 down to --min-step-size along a cosine, restarting every"
                        + " k epochs. The last three need --step-size (default: ${DEFAULT-VALUE}).")
        ScheduleChoice schedule;

        @Option(names = "--step-size", paramLabel = "EPS0", order = 6,
                description = "The initial step size eps_0, > 0 (default: none, chosen by the library under auto).")
        Double stepSize;

        @Option(names = "--decay-power", paramLabel = "P", defaultValue = "0.75", order = 7,
                description = "polynomial: the power p, >= 0; p in (1/2, 1] meets the Robbins-Monro conditions"
                        + " (default: ${DEFAULT-VALUE}).")
        double decayPower;

        @Option(names = "--decay-factor", paramLabel = "Q", defaultValue = "0.5", order = 8,
                description = "step-decay: the factor q applied every k epochs, in (0, 1] (default: ${DEFAULT-VALUE}).")
        double decayFactor;

        @Option(names = "--decay-epochs", paramLabel = "K", defaultValue = "10", order = 9,
                description = "step-decay and cosine-restarts: the period k in epochs, > 0"
                        + " (default: ${DEFAULT-VALUE}).")
        double decayEpochs;

        @Option(names = "--min-step-size", paramLabel = "EPS", defaultValue = "0", order = 10,
                description = "cosine-restarts: the smallest step, in [0, eps_0] (default: ${DEFAULT-VALUE}).")
        double minStepSize;

        @Option(names = "--warm-up-epochs", paramLabel = "W", defaultValue = "0", order = 11,
                description = "Grow the step linearly from eps_0/(W m) to the schedule over the first W epochs,"
                        + " >= 0; needs --step-size (default: ${DEFAULT-VALUE}, no warm-up).")
        double warmUpEpochs;
    }

    /** The budget options. */
    static final class BudgetOptions {
        @Option(names = {"-e", "--epochs"}, paramLabel = "E", defaultValue = "50", order = 1,
                description = "Passes over the fitted rows (n draws each; fractions allowed), > 0"
                        + " (default: ${DEFAULT-VALUE}).")
        double epochs;

        @Option(names = "--max-steps", paramLabel = "N", order = 2,
                description = "At most this many steps, >= 1 (default: no step budget).")
        Long maxSteps;

        @Option(names = "--max-gradient-evaluations", paramLabel = "N", order = 3,
                description = "At most this many per-sample gradient evaluations, >= 1 (default: no such budget).")
        Long maxGradientEvaluations;

        @Option(names = "--time-limit", paramLabel = "SECONDS", order = 4,
                description = "At most this much wall time, in seconds, > 0 (default: no time budget).")
        Double timeLimit;

        @Option(names = {"-s", "--seed"}, paramLabel = "S", defaultValue = "0", order = 5,
                description = "The seed of every random choice: held-out rows, batches, diagnostics' probes. The"
                        + " same seed and options give the same model, bit for bit (default: ${DEFAULT-VALUE}).")
        long seed;
    }

    /** The output options. */
    static final class OutputOptions {
        @Option(names = {"-o", "--output-dir"}, paramLabel = "DIR", defaultValue = ".", order = 1,
                description = "Where the model, trace and report go unless named one by one, as"
                        + " NAME.model, NAME-trace.csv (or .jsonl) and NAME-report.html, NAME being FILE's name"
                        + " without its extension; created if missing (default: the current directory).")
        Path outputDirectory;

        @Option(names = "--model-file", paramLabel = "PATH", order = 2,
                description = "The model file (riskmin's text format, docs/model-format.md), replaced atomically"
                        + " (default: DIR/NAME.model).")
        Path modelFile;

        @Option(names = "--trace-file", paramLabel = "PATH", order = 3,
                description = "The trace: every diagnostic event of the fit, one per line"
                        + " (default: DIR/NAME-trace.csv, or .jsonl for json-lines).")
        Path traceFile;

        @Option(names = "--trace-format", paramLabel = "NAME", defaultValue = "csv", order = 4,
                converter = Choices.TraceFormatConverter.class,
                completionCandidates = Choices.TraceFormatCandidates.class,
                description = "The trace's format: ${COMPLETION-CANDIDATES} (default: ${DEFAULT-VALUE}).")
        TraceFormat traceFormat;

        @Option(names = "--report-file", paramLabel = "PATH", order = 5,
                description = "The HTML report: one self-contained file with the plots and the verdict"
                        + " (default: DIR/NAME-report.html).")
        Path reportFile;

        @Option(names = {"-q", "--quiet"}, order = 6,
                description = "No progress lines; only the summary at the end.")
        boolean quiet;

        @Option(names = "--measurement-share", paramLabel = "F", defaultValue = "0.1", order = 7,
                description = "The share of the fit's gradient evaluations the diagnostics may spend on the exact"
                        + " objective, and as much on the held-out loss, in (0, 1]: 0.1 measures about every 10"
                        + " epochs of SAGA or plain SGD. More gives the verdict an exact trend sooner; less costs"
                        + " less (default: ${DEFAULT-VALUE}).")
        double measurementShare;
    }

    /**
     * What a run of the command produced (for callers in-process).
     *
     * @param fit          the fit
     * @param verdict      the health verdict
     * @param exitCode     the exit code
     * @param model        the model file, or null when none was written
     * @param trace        the trace file
     * @param report       the report file
     * @param features     the feature columns, in the model's order
     * @param trainingRows rows fitted
     * @param heldOutRows  rows held out
     * @param heldOutLoss  the mean loss on the held-out rows (NaN without any)
     */
    public record Result(Fit fit, HealthVerdict verdict, int exitCode, Path model, Path trace, Path report,
                         List<String> features, int trainingRows, int heldOutRows, double heldOutLoss) {
    }

    public static void main(String[] args) {
        PrintWriter out = new PrintWriter(System.out, true, StandardCharsets.UTF_8);
        PrintWriter err = new PrintWriter(System.err, true, StandardCharsets.UTF_8);
        int code = run(args, out, err);
        out.flush();
        err.flush();
        System.exit(code);
    }

    /** Runs the command with the given arguments, printing to the given writers, and returns the exit code. */
    public static int run(String[] args, PrintWriter out, PrintWriter err) {
        return commandLine(new FitCommand(), out, err).execute(args);
    }

    /** The picocli command line around a command, with this program's error handling and exit codes. */
    static CommandLine commandLine(FitCommand command, PrintWriter out, PrintWriter err) {
        CommandLine cl = new CommandLine(command);
        cl.setOut(out);
        cl.setErr(err);
        Map<String, String> codes = new LinkedHashMap<>();
        for (String line : ExitCodes.helpLines()) {
            int colon = line.indexOf(':');
            codes.put(line.substring(0, colon), line.substring(colon + 1));
        }
        cl.getCommandSpec().usageMessage().exitCodeList(codes);
        cl.setParameterExceptionHandler((ex, args) -> {
            PrintWriter e = ex.getCommandLine().getErr();
            e.println("riskmin-fit: usage error: " + ex.getMessage());
            e.println("Run with --help for every option and its default.");
            e.flush();
            return ExitCodes.USAGE;
        });
        cl.setExecutionExceptionHandler((ex, c, parsed) -> {
            PrintWriter e = c.getErr();
            e.println("riskmin-fit: unexpected failure (a defect, please report it): " + ex);
            ex.printStackTrace(e);
            e.flush();
            return ExitCodes.SOFTWARE;
        });
        return cl;
    }

    /** @return what the last run produced, or null if it stopped before fitting */
    Result result() {
        return result;
    }

    @Override
    public Integer call() {
        PrintWriter out = spec.commandLine().getOut();
        PrintWriter err = spec.commandLine().getErr();
        checkOptions();
        CsvTable table;
        try {
            table = CsvTable.read(file, delimiter(), comment(), data.target, data.features);
        } catch (InputException e) {
            err.println("riskmin-fit: input error: " + e.getMessage());
            err.flush();
            return ExitCodes.INPUT;
        }
        LossChoice lossChoice = objective.loss;
        int classes;
        try {
            classes = checkTargets(table, lossChoice);
        } catch (InputException e) {
            err.println("riskmin-fit: input error: " + e.getMessage());
            err.flush();
            return ExitCodes.INPUT;
        }
        RowSplit split = RowSplit.of(table, classes, data.heldOutFraction, budget.seed);
        int heldOutCount = split.heldOutRows();
        int trainingCount = split.fittedRows();
        if (data.heldOutFraction > 0 && heldOutCount == 0) {
            throw usage("--held-out-fraction (" + data.heldOutFraction + ") of " + table.rows() + " row"
                    + (table.rows() == 1 ? "" : "s") + " holds out no row: raise it, or set 0 to hold none out");
        }
        if (trainingCount < 2) {
            throw usage("--held-out-fraction (" + data.heldOutFraction + ") leaves " + trainingCount + " of "
                    + table.rows() + " rows to fit; at least 2 are needed");
        }
        if (method.batchSize > trainingCount) {
            throw usage("--batch-size (" + method.batchSize + ") exceeds the " + trainingCount + " rows fitted");
        }
        Dataset training = split.fitted(lossChoice.multiclass());
        Dataset heldOut = split.heldOut(lossChoice.multiclass());
        Minimizer minimizer = minimizer(trainingCount);

        String name = baseName(file);
        Path dir = output.outputDirectory;
        Path modelPath = absolute(output.modelFile != null ? output.modelFile : dir.resolve(name + ".model"));
        Path tracePath = absolute(output.traceFile != null ? output.traceFile
                : dir.resolve(name + "-trace" + output.traceFormat.extension()));
        Path reportPath = absolute(output.reportFile != null ? output.reportFile : dir.resolve(name + "-report.html"));
        TraceWriter trace;
        try {
            for (Path p : List.of(modelPath, tracePath, reportPath)) {
                Files.createDirectories(p.getParent());
            }
            trace = output.traceFormat == TraceFormat.CSV ? CsvTraceWriter.open(tracePath)
                    : JsonLinesTraceWriter.open(tracePath);
        } catch (IOException e) {
            err.println("riskmin-fit: output error: cannot open the outputs: " + e);
            err.flush();
            return ExitCodes.OUTPUT;
        }

        out.printf(Locale.ROOT, "riskmin-fit: %s: %d rows; target '%s'; %d feature%s; %d rows fitted, %d held out%n",
                file.getFileName(), table.rows(), table.target, table.features.size(),
                table.features.size() == 1 ? "" : "s", trainingCount, heldOutCount);
        out.flush();
        DiagnosedFit.Outcome outcome;
        try {
            outcome = DiagnosedFit.labelled(name).withSubscriber(trace).withProgressLog(!output.quiet)
                    .withMeasurementShare(output.measurementShare).run(minimizer, training, heldOut, null);
        } catch (IllegalArgumentException e) {
            throw usage("cannot fit with these options: " + e.getMessage());
        } finally {
            trace.close();
        }
        Fit fit = outcome.fit();
        HealthVerdict verdict = outcome.verdict();
        boolean diverged = fit.stopReason() == StopReason.DIVERGED || verdict.condition() == Condition.DIVERGED;
        double heldOutLoss = heldOut != null ? heldOutLoss(fit, heldOut, lossChoice) : Double.NaN;

        List<String> failures = new ArrayList<>();
        trace.failure().ifPresent(e -> failures.add("trace " + tracePath + ": " + e));
        Path writtenModel = null;
        if (!diverged) {
            try {
                ModelFile.defaults().write(saved(fit, table), modelPath);
                writtenModel = modelPath;
            } catch (IOException | IllegalArgumentException e) {
                failures.add("model " + modelPath + ": " + e);
            }
        }
        try {
            Map<String, String> facts = new LinkedHashMap<>();
            facts.put("data", file.getFileName() + " (" + table.rows() + " rows)");
            facts.put("target", table.target);
            facts.put("features", describe(table.features));
            facts.put("rows fitted", Integer.toString(trainingCount));
            facts.put("rows held out", Integer.toString(heldOutCount));
            if (heldOut != null) {
                facts.put("held-out loss at the end", EpochLog.figure(heldOutLoss));
            }
            outcome.writeReport(reportPath, facts);
        } catch (IOException e) {
            failures.add("report " + reportPath + ": " + e);
        }

        printSummary(out, fit, verdict, table, classes, heldOut, heldOutLoss, writtenModel, tracePath, reportPath,
                diverged);
        int code;
        if (!failures.isEmpty()) {
            for (String f : failures) {
                err.println("riskmin-fit: output error: cannot write the " + f);
            }
            code = ExitCodes.OUTPUT;
        } else if (diverged) {
            code = ExitCodes.DIVERGED;
        } else if (verdict.condition() == Condition.CONVERGED) {
            code = ExitCodes.CONVERGED;
        } else {
            code = ExitCodes.NOT_CONVERGED;
        }
        out.flush();
        err.flush();
        result = new Result(fit, verdict, code, writtenModel, tracePath, reportPath, table.features, trainingCount,
                heldOutCount, heldOutLoss);
        return code;
    }

    // ---------------------------------------------------------------------------------------------
    // Options

    private ParameterException usage(String message) {
        return new ParameterException(spec.commandLine(), message);
    }

    private void checkOptions() {
        if (data.target == null || data.target.isBlank()) {
            throw usage("--target is required: name the column that holds y");
        }
        String repeat = CsvTable.firstRepeat(data.features);
        if (repeat != null) {
            throw usage("--features names the column '" + repeat + "' twice");
        }
        if (data.features.contains(data.target)) {
            throw usage("--features includes the target column '" + data.target + "'");
        }
        delimiter();
        Character comment = comment();
        if (comment != null && comment == delimiter()) {
            throw usage("--comment-char and --delimiter are both '" + comment + "'");
        }
        range("--held-out-fraction", data.heldOutFraction, 0, true, 1, false);
        positive("--huber-delta", objective.huberDelta);
        range("--quantile", objective.quantile, 0, false, 1, false);
        nonNegative("--tube-half-width", objective.tubeHalfWidth);
        positive("--hinge-smoothing", objective.hingeSmoothing);
        nonNegative("--strength", objective.strength);
        range("--l1-share", objective.l1Share, 0, true, 1, true);
        range("--momentum", method.momentum, 0, true, 1, false);
        if (method.batchSize < 1) {
            throw usage("--batch-size (" + method.batchSize + ") must be >= 1");
        }
        if (method.stepSize != null) {
            positive("--step-size", method.stepSize);
        }
        nonNegative("--decay-power", method.decayPower);
        range("--decay-factor", method.decayFactor, 0, false, 1, true);
        positive("--decay-epochs", method.decayEpochs);
        nonNegative("--min-step-size", method.minStepSize);
        nonNegative("--warm-up-epochs", method.warmUpEpochs);
        ScheduleChoice s = method.schedule;
        if (s != ScheduleChoice.AUTO && s != ScheduleChoice.CONSTANT && method.stepSize == null
                || s == ScheduleChoice.CONSTANT && method.stepSize == null) {
            throw usage("--schedule " + s.word() + " needs --step-size (the initial step size eps_0)");
        }
        if (method.warmUpEpochs > 0 && method.stepSize == null) {
            throw usage("--warm-up-epochs (" + method.warmUpEpochs + ") needs --step-size");
        }
        if (s == ScheduleChoice.COSINE_RESTARTS && method.minStepSize > method.stepSize) {
            throw usage("--min-step-size (" + method.minStepSize + ") exceeds --step-size (" + method.stepSize + ")");
        }
        if (method.sampler == SamplerChoice.STRATIFIED && !classification(objective.loss)) {
            throw usage("--sampler stratified keeps class shares, so it needs a classification loss (logistic,"
                    + " hinge, squared-hinge, smoothed-hinge, softmax, multiclass-hinge), not "
                    + objective.loss.word());
        }
        positive("--epochs", budget.epochs);
        if (budget.maxSteps != null && budget.maxSteps < 1) {
            throw usage("--max-steps (" + budget.maxSteps + ") must be >= 1");
        }
        if (budget.maxGradientEvaluations != null && budget.maxGradientEvaluations < 1) {
            throw usage("--max-gradient-evaluations (" + budget.maxGradientEvaluations + ") must be >= 1");
        }
        if (budget.timeLimit != null) {
            positive("--time-limit", budget.timeLimit);
        }
        range("--measurement-share", output.measurementShare, 0, false, 1, true);
    }

    private void positive(String option, double value) {
        if (!(value > 0) || !Double.isFinite(value)) {
            throw usage(option + " (" + value + ") must be finite and > 0");
        }
    }

    private void nonNegative(String option, double value) {
        if (!(value >= 0) || !Double.isFinite(value)) {
            throw usage(option + " (" + value + ") must be finite and >= 0");
        }
    }

    private void range(String option, double value, double lo, boolean loIn, double hi, boolean hiIn) {
        boolean ok = (loIn ? value >= lo : value > lo) && (hiIn ? value <= hi : value < hi);
        if (!ok) {
            throw usage(option + " (" + value + ") must be in " + (loIn ? "[" : "(") + plain(lo) + ", " + plain(hi)
                    + (hiIn ? "]" : ")"));
        }
    }

    private static String plain(double v) {
        return v == Math.rint(v) ? Long.toString((long) v) : Double.toString(v);
    }

    private char delimiter() {
        String d = data.delimiter;
        if (d.equalsIgnoreCase("tab") || d.equals("\\t")) {
            return '\t';
        }
        if (d.length() != 1 || d.charAt(0) == '"' || d.charAt(0) == '\n' || d.charAt(0) == '\r') {
            throw usage("--delimiter ('" + d + "') must be one character other than a quote or a line break,"
                    + " or 'tab'");
        }
        return d.charAt(0);
    }

    private Character comment() {
        String c = data.commentChar;
        if (c.equalsIgnoreCase("none")) {
            return null;
        }
        if (c.length() != 1 || c.charAt(0) == '"' || Character.isWhitespace(c.charAt(0))) {
            throw usage("--comment-char ('" + c + "') must be one character other than a quote or a space,"
                    + " or 'none'");
        }
        return c.charAt(0);
    }

    private static boolean classification(LossChoice loss) {
        switch (loss) {
            case LOGISTIC:
            case HINGE:
            case SQUARED_HINGE:
            case SMOOTHED_HINGE:
            case SOFTMAX:
            case MULTICLASS_HINGE:
                return true;
            default:
                return false;
        }
    }

    private Loss loss() {
        switch (objective.loss) {
            case SQUARED:
                return Losses.squared();
            case ABSOLUTE:
                return Losses.absolute();
            case HUBER:
                return Losses.huber(objective.huberDelta);
            case PINBALL:
                return Losses.pinball(objective.quantile);
            case EPSILON_INSENSITIVE:
                return Losses.epsilonInsensitive(objective.tubeHalfWidth);
            case POISSON:
                return Losses.poisson();
            case LOGISTIC:
                return Losses.logistic();
            case HINGE:
                return Losses.hinge();
            case SQUARED_HINGE:
                return Losses.squaredHinge();
            case SMOOTHED_HINGE:
                return Losses.smoothedHinge(objective.hingeSmoothing);
            default:
                return null;
        }
    }

    private MulticlassLoss multiclassLoss() {
        return objective.loss == LossChoice.SOFTMAX ? Losses.softmax() : Losses.multiclassHinge();
    }

    private Penalty penalty() {
        double lambda = objective.strength;
        switch (objective.penalty) {
            case L1:
                return Penalty.l1(lambda);
            case L2:
                return Penalty.l2(lambda);
            case ELASTIC_NET:
                return Penalty.elasticNet(objective.l1Share * lambda, (1 - objective.l1Share) * lambda);
            default:
                return Penalty.none();
        }
    }

    private UpdateRule rule() {
        switch (method.rule) {
            case HEAVY_BALL:
                return UpdateRule.heavyBall(method.momentum);
            case NESTEROV:
                return UpdateRule.nesterov(method.momentum);
            case ADAGRAD:
                return UpdateRule.adaGrad();
            case ADAM:
                return UpdateRule.adam();
            case SVRG:
                return UpdateRule.svrg();
            case SAGA:
                return UpdateRule.saga();
            default:
                return UpdateRule.sgd();
        }
    }

    private Sampling sampling() {
        switch (method.sampler) {
            case WITH_REPLACEMENT:
                return Sampling.withReplacement();
            case STRATIFIED:
                return Sampling.stratified();
            case IMPORTANCE:
                return Sampling.importance();
            case SEQUENTIAL:
                return Sampling.sequential();
            default:
                return Sampling.withoutReplacement();
        }
    }

    /** @return the schedule, or null for the library's default */
    private StepSchedule schedule(int trainingRows) {
        long perEpoch = (trainingRows + (long) method.batchSize - 1) / method.batchSize;
        long period = Math.max(1, Math.round(method.decayEpochs * perEpoch));
        StepSchedule s;
        switch (method.schedule) {
            case POLYNOMIAL:
                s = StepSchedule.polynomial(method.stepSize, perEpoch, method.decayPower);
                break;
            case STEP_DECAY:
                s = StepSchedule.stepDecay(method.stepSize, method.decayFactor, period);
                break;
            case COSINE_RESTARTS:
                s = StepSchedule.cosineRestarts(method.stepSize, method.minStepSize, period, 1.0);
                break;
            default:
                s = method.stepSize != null ? StepSchedule.constant(method.stepSize) : null;
        }
        if (s != null && method.warmUpEpochs > 0) {
            s = StepSchedule.warmUp(s, Math.max(1, Math.round(method.warmUpEpochs * perEpoch)));
        }
        return s;
    }

    private Minimizer minimizer(int trainingRows) {
        Minimizer.Builder b = Minimizer.builder()
                .penalty(penalty())
                .updateRule(rule())
                .sampling(sampling())
                .batchSize(method.batchSize)
                .epochs(budget.epochs)
                .seed(budget.seed)
                .standardize(data.standardize)
                .intercept(data.intercept);
        if (objective.loss.multiclass()) {
            b.loss(multiclassLoss());
        } else {
            b.loss(loss());
        }
        StepSchedule s = schedule(trainingRows);
        if (s != null) {
            b.schedule(s);
        }
        if (budget.maxSteps != null) {
            b.maxSteps(budget.maxSteps);
        }
        if (budget.maxGradientEvaluations != null) {
            b.maxGradientEvaluations(budget.maxGradientEvaluations);
        }
        if (budget.timeLimit != null) {
            b.timeLimit(Duration.ofNanos(Math.max(1, Math.round(budget.timeLimit * 1e9))));
        }
        return b.build();
    }

    // ---------------------------------------------------------------------------------------------
    // Data

    /**
     * Checks every target against the loss's domain, naming the line of the first that fails.
     *
     * @return K for a multiclass loss (largest label + 1), 2 for a binary classifier, 0 otherwise
     */
    private int checkTargets(CsvTable table, LossChoice choice) throws InputException {
        String column = "column '" + table.target + "'";
        if (choice.multiclass()) {
            int max = 1;
            for (int i = 0; i < table.rows(); i++) {
                double y = table.y[i];
                if (!TargetDomain.CLASS_LABEL.accepts(y) || y > 1_000_000) {
                    throw new InputException(file + ": line " + table.lines[i] + ", " + column + ": " + plain(y)
                            + " is not a class label for the " + choice.word() + " loss: expected a whole number"
                            + " 0..K-1");
                }
                max = Math.max(max, (int) y);
            }
            return max + 1;
        }
        Loss loss = loss();
        for (int i = 0; i < table.rows(); i++) {
            if (!loss.domain().accepts(table.y[i])) {
                throw new InputException(file + ": line " + table.lines[i] + ", " + column + ": " + plain(table.y[i])
                        + " is not valid for the " + choice.word() + " loss: expected " + loss.domain().description());
            }
        }
        if (choice == LossChoice.LOGISTIC) {
            // Proportions are valid logistic targets; only 0/1 or -1/+1 targets make it a classifier.
            for (double y : table.y) {
                if (y != 0 && y != 1 && y != -1) {
                    return 0;
                }
            }
            return 2;
        }
        return classification(choice) ? 2 : 0;
    }

    private double heldOutLoss(Fit fit, Dataset heldOut, LossChoice choice) {
        int m = heldOut.size();
        double sum = 0;
        if (choice.multiclass()) {
            MulticlassModel model = fit.multiclassModel();
            MulticlassLoss loss = multiclassLoss();
            double[] z = new double[model.classes()];
            for (int i = 0; i < m; i++) {
                model.decisionValues(heldOut.features().rowCopy(i), z);
                sum += loss.value(z, 0, z.length, (int) heldOut.target(i));
            }
        } else {
            LinearModel model = fit.model();
            Loss loss = loss();
            for (int i = 0; i < m; i++) {
                sum += loss.value(model.decisionValue(heldOut.features().rowCopy(i)), heldOut.target(i));
            }
        }
        return sum / m;
    }

    private static double misclassified(Fit fit, Dataset heldOut) {
        int wrong = 0;
        for (int i = 0; i < heldOut.size(); i++) {
            double[] row = heldOut.features().rowCopy(i);
            double y = heldOut.target(i);
            if (fit.hasModel()) {
                wrong += fit.model().predict(row) != (y > 0 ? 1.0 : 0.0) ? 1 : 0;
            } else {
                wrong += fit.multiclassModel().predictClass(row) != (int) y ? 1 : 0;
            }
        }
        return (double) wrong / heldOut.size();
    }

    // ---------------------------------------------------------------------------------------------
    // Output

    private SavedModel saved(Fit fit, CsvTable table) {
        SavedModel m = fit.hasModel() ? SavedModel.of(fit.model()) : SavedModel.of(fit.multiclassModel());
        String note = "riskmin-fit on " + file.getFileName() + ": target '" + table.target + "'; features in order: "
                + describe(table.features);
        if (note.length() > 4000) {
            note = "riskmin-fit on " + file.getFileName() + ": target '" + table.target + "'; " + table.features.size()
                    + " features, in the file's column order";
        }
        return m.withStandardized(fit.standardized()).withCreated(Instant.now()).withNote(note);
    }

    private static String describe(List<String> names) {
        List<String> q = new ArrayList<>(names.size());
        for (String n : names) {
            q.add("'" + n + "'");
        }
        return String.join(", ", q);
    }

    private void printSummary(PrintWriter out, Fit fit, HealthVerdict verdict, CsvTable table, int classes,
                              Dataset heldOut, double heldOutLoss, Path model, Path trace, Path report,
                              boolean diverged) {
        String detail = fit.stopDetail().isEmpty() ? "" : " (" + fit.stopDetail() + ")";
        out.printf(Locale.ROOT, "stopped: %s%s after %d steps (%s epochs, %d gradient evaluations, %d ms);"
                        + " objective %s%n", fit.stopReason(), detail,
                fit.steps(), EpochLog.figure(fit.epochs()), fit.gradientEvaluations(), fit.wallTime().toMillis(),
                EpochLog.figure(fit.finalObjective()));
        if (heldOut != null) {
            out.printf(Locale.ROOT, "held out: mean loss %s (%s) over %d rows", EpochLog.figure(heldOutLoss),
                    objective.loss.word(), heldOut.size());
            if (classes > 0) {
                out.printf(Locale.ROOT, "; %s%% misclassified", EpochLog.figure(100 * misclassified(fit, heldOut)));
            }
            out.println();
        }
        if (!diverged) {
            printParameters(out, fit, table);
        }
        out.println("verdict: " + verdict.condition() + " — " + verdict.summary());
        out.println("advice: " + verdict.advice());
        if (verdict.condition() == Condition.UNDETERMINED) {
            out.println("hint: a longer budget (--epochs) or a larger --measurement-share lets the diagnostics"
                    + " measure the objective's trend");
        }
        out.println("model:  " + (model != null ? model : diverged ? "not written (the fit diverged)" : "not written"));
        out.println("trace:  " + trace);
        out.println("report: " + report);
    }

    private static void printParameters(PrintWriter out, Fit fit, CsvTable table) {
        List<String> names = table.features;
        if (fit.hasModel()) {
            LinearModel m = fit.model();
            if (names.size() > 30) {
                out.printf(Locale.ROOT, "model: intercept %s and %d coefficients (in the model file)%n",
                        Double.toString(m.intercept()), names.size());
                return;
            }
            int width = Math.max("intercept".length(), names.stream().mapToInt(String::length).max().orElse(0));
            out.println("model (original feature scale):");
            out.printf(Locale.ROOT, "  %-" + width + "s  %s%n", "intercept", Double.toString(m.intercept()));
            for (int j = 0; j < names.size(); j++) {
                out.printf(Locale.ROOT, "  %-" + width + "s  %s%n", names.get(j), Double.toString(m.coefficient(j)));
            }
        } else {
            MulticlassModel m = fit.multiclassModel();
            out.printf(Locale.ROOT, "model: %d classes x (%d coefficients + intercept), in the model file%n",
                    m.classes(), names.size());
        }
    }

    private static Path absolute(Path p) {
        return p.toAbsolutePath().normalize();
    }

    private static String baseName(Path file) {
        String name = file.getFileName() == null ? "fit" : file.getFileName().toString();
        int dot = name.lastIndexOf('.');
        String base = dot > 0 ? name.substring(0, dot) : name;
        return base.isEmpty() ? "fit" : base;
    }
}
