package dev.riskmin.examples.cli;

import dev.riskmin.diagnostics.DiagnosticEvent;
import dev.riskmin.diagnostics.LossEvent;
import dev.riskmin.diagnostics.VerdictEvent;
import dev.riskmin.diagnostics.sink.TraceReader;
import dev.riskmin.diagnostics.verdict.Condition;
import dev.riskmin.examples.ReportChecks;
import dev.riskmin.model.LinearModel;
import dev.riskmin.model.ModelFile;
import dev.riskmin.model.SavedModel;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import picocli.CommandLine.Model.OptionSpec;

import java.io.IOException;
import java.io.PrintWriter;
import java.io.StringWriter;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.random.RandomGenerator;
import java.util.random.RandomGeneratorFactory;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** Runs the command line in-process on files from the shell's point of view. */
class FitCommandTest {
    /** NIST StRD Norris, with its two '#' source lines (erm-core's copy of the reference file). */
    static final Path NORRIS = Path.of("../erm-core/src/test/resources/reference/nist_norris.csv");
    /** Certified values of Norris (NIST StRD, nist_norris.certified.txt: B0 and B1, 15 significant digits). */
    static final double NORRIS_B0 = -0.262323073774029;
    static final double NORRIS_B1 = 1.00211681802045;

    @TempDir
    Path dir;

    /** One run of the command: its exit code, what it printed, and what it produced. */
    record Run(int code, String out, String err, FitCommand.Result result) {
    }

    static Run run(String... args) {
        StringWriter out = new StringWriter();
        StringWriter err = new StringWriter();
        FitCommand command = new FitCommand();
        int code = FitCommand.commandLine(command, new PrintWriter(out), new PrintWriter(err)).execute(args);
        return new Run(code, out.toString(), err.toString(), command.result());
    }

    @Test
    void fitsTheNorrisFileToTheCertifiedValuesAndWritesLoadableOutputs() throws IOException {
        Run r = run(NORRIS.toString(), "--target", "y", "--held-out-fraction", "0", "--epochs", "100", "-q",
                "--output-dir", dir.toString());
        assertEquals(ExitCodes.CONVERGED, r.code(), r.out() + r.err());
        assertEquals("", r.err());
        FitCommand.Result result = r.result();
        LinearModel fitted = result.fit().model();
        // NIST StRD Norris certified values; SAGA on 36 rows reaches them to about 12 digits.
        assertEquals(NORRIS_B0, fitted.intercept(), 1e-9 * Math.abs(NORRIS_B0));
        assertEquals(NORRIS_B1, fitted.coefficient(0), 1e-11 * NORRIS_B1);
        assertEquals(List.of("x"), result.features());
        assertEquals(36, result.trainingRows());

        // The model file loads and predicts exactly like the fit (the format round-trips bit for bit).
        assertEquals(dir.resolve("nist_norris.model").toAbsolutePath().normalize(), result.model());
        SavedModel saved = ModelFile.defaults().read(result.model());
        LinearModel loaded = saved.linear();
        for (double x = 0; x <= 1000; x += 12.5) {
            assertEquals(fitted.predict(new double[] {x}), loaded.predict(new double[] {x}), 0.0, "x = " + x);
        }
        assertTrue(saved.note().orElseThrow().contains("features in order: 'x'"), saved.note().toString());
        assertEquals(true, saved.standardized().orElseThrow());

        // The trace reads back, and its verdict is the one printed.
        List<DiagnosticEvent> events = TraceReader.csv(result.trace());
        assertTrue(events.stream().anyMatch(e -> e instanceof LossEvent), "loss events in the trace");
        VerdictEvent last = (VerdictEvent) events.stream().filter(e -> e instanceof VerdictEvent)
                .reduce((a, b) -> b).orElseThrow();
        assertEquals(result.verdict().condition(), last.verdict().condition());
        assertTrue(r.out().contains("verdict: " + result.verdict().condition()), r.out());
        String html = ReportChecks.assertSelfContained(result.report());
        assertTrue(html.contains("nist_norris.csv"), "the report names the data");
    }

    @Test
    void fitsAGeneratedClassificationFileWithStratifiedBatchesAndAJsonTrace() throws IOException {
        Path csv = dir.resolve("accounts.csv");
        double[] truth = {-0.8, 1.2, 0.0, -0.5}; // intercept, then three features
        int n = 2000;
        int positives = writeClassification(csv, n, truth, 31);
        Run r = run(csv.toString(), "-t", "flagged", "-f", "tenure,spend,calls", "--loss", "logistic",
                "--sampler", "stratified", "-b", "32", "--epochs", "30", "--trace-format", "json-lines", "-q",
                "-o", dir.resolve("out").toString(), "--seed", "5");
        assertTrue(r.code() == ExitCodes.CONVERGED || r.code() == ExitCodes.NOT_CONVERGED, r.out() + r.err());
        FitCommand.Result result = r.result();
        assertEquals(r.code() == ExitCodes.CONVERGED, result.verdict().condition() == Condition.CONVERGED);
        // The held-out split keeps each class's share: floor(0.2 n_c) rows of each class.
        int expectedHeldOut = (int) Math.floor(0.2 * positives) + (int) Math.floor(0.2 * (n - positives));
        assertEquals(expectedHeldOut, result.heldOutRows());
        assertEquals(n - expectedHeldOut, result.trainingRows());

        LinearModel fitted = result.fit().model();
        LinearModel loaded = ModelFile.defaults().readLinear(result.model());
        RandomGenerator rng = RandomGeneratorFactory.of("L64X128MixRandom").create(8);
        for (int k = 0; k < 200; k++) {
            double[] x = {rng.nextGaussian(), rng.nextGaussian(), rng.nextGaussian()};
            assertEquals(fitted.probability(x), loaded.probability(x), 0.0);
            assertEquals(fitted.predict(x), loaded.predict(x), 0.0);
        }
        // About 1,600 rows: each coefficient's standard error is near 0.06 (from the Fisher information
        // of these data, by hand), so 0.3 is about five of them (common practice, no source).
        assertEquals(truth[0], fitted.intercept(), 0.3);
        for (int j = 0; j < 3; j++) {
            assertEquals(truth[j + 1], fitted.coefficient(j), 0.3, "coefficient " + j);
        }
        List<DiagnosticEvent> events = TraceReader.jsonLines(result.trace());
        assertTrue(result.trace().toString().endsWith("accounts-trace.jsonl"));
        assertTrue(events.stream().anyMatch(e -> e instanceof VerdictEvent), "the trace ends with the verdict");
        assertTrue(r.out().contains("% misclassified"), r.out());
        ReportChecks.assertSelfContained(result.report());
    }

    @Test
    void theSameSeedGivesTheSameModelBitForBit() throws IOException {
        Run a = run(NORRIS.toString(), "-t", "y", "--update-rule", "sgd", "-b", "4", "--epochs", "20", "-q", "-o",
                dir.resolve("a").toString());
        Run b = run(NORRIS.toString(), "-t", "y", "--update-rule", "sgd", "-b", "4", "--epochs", "20", "-q", "-o",
                dir.resolve("b").toString());
        assertArrayEquals(a.result().fit().parameters(), b.result().fit().parameters());
        assertEquals(7, a.result().heldOutRows()); // floor(0.2 x 36)
    }

    @Test
    void aFitThatDivergesWritesTraceAndReportButNoModel() throws IOException {
        // Plain SGD with step 1 on Norris's unscaled x (up to 1000): curvature near 1e6, so it must blow up.
        Run r = run(NORRIS.toString(), "-t", "y", "--update-rule", "sgd", "--step-size", "1", "--no-standardize",
                "-q", "-o", dir.toString());
        assertEquals(ExitCodes.DIVERGED, r.code(), r.out() + r.err());
        assertEquals(Condition.DIVERGED, r.result().verdict().condition());
        assertNull(r.result().model());
        assertFalse(Files.exists(dir.resolve("nist_norris.model")));
        assertTrue(Files.exists(r.result().trace()));
        ReportChecks.assertSelfContained(r.result().report());
        assertTrue(r.out().contains("not written (the fit diverged)"), r.out());
    }

    @Test
    void aFitStoppedEarlyIsNotConverged() {
        Run r = run(NORRIS.toString(), "-t", "y", "--max-steps", "3", "-q", "-o", dir.toString());
        assertEquals(ExitCodes.NOT_CONVERGED, r.code(), r.out() + r.err());
        assertFalse(r.result().verdict().condition() == Condition.CONVERGED);
        assertNotNull(r.result().model(), "the model is written; the exit code says not to trust it");
    }

    @Test
    void unreadableOrMissingInputIsAnInputError() throws IOException {
        Run missing = run(dir.resolve("absent.csv").toString(), "-t", "y");
        assertEquals(ExitCodes.INPUT, missing.code());
        assertTrue(missing.err().contains("absent.csv: no such file"), missing.err());

        Run directory = run(dir.toString(), "-t", "y");
        assertEquals(ExitCodes.INPUT, directory.code());
        assertTrue(directory.err().contains("is a directory"), directory.err());

        Path latin1 = dir.resolve("latin1.csv");
        Files.write(latin1, "y,caf\u00e9\n1,2\n".getBytes(StandardCharsets.ISO_8859_1));
        Run notUtf8 = run(latin1.toString(), "-t", "y");
        assertEquals(ExitCodes.INPUT, notUtf8.code());
        assertTrue(notUtf8.err().contains("not UTF-8 text"), notUtf8.err());

        Path unclosed = dir.resolve("unclosed.csv");
        Files.writeString(unclosed, "y,x\n1,2\n0,\"3\n");
        Run quote = run(unclosed.toString(), "-t", "y");
        assertEquals(ExitCodes.INPUT, quote.code());
        assertTrue(quote.err().contains("not readable as CSV"), quote.err());
    }

    @Test
    void aMissingColumnIsNamedWithTheColumnsThereAre() {
        Run target = run(NORRIS.toString(), "-t", "ozone");
        assertEquals(ExitCodes.INPUT, target.code());
        assertTrue(target.err().contains("no column named 'ozone' (from --target); the header has 'y', 'x'"),
                target.err());
        Run feature = run(NORRIS.toString(), "-t", "y", "-f", "x,z");
        assertEquals(ExitCodes.INPUT, feature.code());
        assertTrue(feature.err().contains("no column named 'z' (from --features)"), feature.err());
    }

    @Test
    void aNonNumericCellIsReportedWithItsLineAndColumn() throws IOException {
        Path csv = dir.resolve("cells.csv");
        // Line 6 starts a quoted cell that spans two lines; the bad cell is on line 9.
        Files.writeString(csv, "# made by hand\ny,a,b\n1,2,3\n\n# a note\n2,\"3\n\",4\n3,4,5\n4,five,6\n");
        Run r = run(csv.toString(), "-t", "y", "-f", "b,a");
        assertEquals(ExitCodes.INPUT, r.code());
        assertTrue(r.err().contains("cells.csv: line 9, column 'a' (column 2): 'five' is not a number"), r.err());

        Files.writeString(csv, "y,a\n1,2\n2,\n");
        Run empty = run(csv.toString(), "-t", "y");
        assertEquals(ExitCodes.INPUT, empty.code());
        assertTrue(empty.err().contains("line 3, column 'a' (column 2): the cell is empty"), empty.err());

        Files.writeString(csv, "y,a\n1,2\n0,3\n2,4\n");
        Run domain = run(csv.toString(), "-t", "y", "--loss", "logistic");
        assertEquals(ExitCodes.INPUT, domain.code());
        assertTrue(domain.err().contains("line 4, column 'y': 2 is not valid for the logistic loss"), domain.err());

        Files.writeString(csv, "y,a\n1,2\n0,3,4\n");
        Run ragged = run(csv.toString(), "-t", "y");
        assertEquals(ExitCodes.INPUT, ragged.code());
        assertTrue(ragged.err().contains("line 3 has 3 cells, the header 2"), ragged.err());
    }

    @Test
    void anOptionOutOfRangeIsAUsageError() {
        String[][] cases = {
            {"--held-out-fraction", "1.5", "--held-out-fraction (1.5) must be in [0, 1)"},
            {"--batch-size", "0", "--batch-size (0) must be >= 1"},
            {"--batch-size", "40", "--batch-size (40) exceeds the 29 rows fitted"},
            {"--quantile", "1", "--quantile (1.0) must be in (0, 1)"},
            {"--strength", "-1", "--strength (-1.0) must be finite and >= 0"},
            {"--epochs", "0", "--epochs (0.0) must be finite and > 0"},
            {"--step-size", "NaN", "--step-size (NaN) must be finite and > 0"},
            {"--schedule", "polynomial", "--schedule polynomial needs --step-size"},
            {"--sampler", "stratified", "--sampler stratified keeps class shares, so it needs a classification loss"},
            {"--loss", "logit", "Invalid value for option '--loss': 'logit' is not one of squared, absolute"},
            {"--batch-size", "many", "'many' is not an int"},
            {"--bogus", "1", "Unknown options: '--bogus'"},
        };
        for (String[] c : cases) {
            Run r = run(NORRIS.toString(), "-t", "y", c[0], c[1]);
            assertEquals(ExitCodes.USAGE, r.code(), String.join(" ", c) + ": " + r.err());
            assertTrue(r.err().contains(c[2]), "expected <" + c[2] + "> in: " + r.err());
            assertTrue(r.err().contains("Run with --help"), r.err());
            assertNull(r.result(), "no fit after a usage error");
        }
        Run noTarget = run(NORRIS.toString());
        assertEquals(ExitCodes.USAGE, noTarget.code());
        assertTrue(noTarget.err().contains("--target is required"), noTarget.err());
    }

    @Test
    void helpExplainsEveryOptionItsDefaultAndTheExitCodes() {
        Run r = run("--help");
        assertEquals(ExitCodes.CONVERGED, r.code());
        FitCommand command = new FitCommand();
        List<OptionSpec> options = FitCommand.commandLine(command, new PrintWriter(new StringWriter()),
                new PrintWriter(new StringWriter())).getCommandSpec().options();
        assertTrue(options.size() >= 35, "options: " + options.size());
        for (OptionSpec o : options) {
            String shown = o.negatable() ? "--[no-]" + o.longestName().substring(2) : o.longestName();
            assertTrue(r.out().contains(shown), "help shows " + shown);
            String description = String.join(" ", o.description()).toLowerCase(Locale.ROOT);
            boolean saysDefault = description.contains("default") || o.usageHelp() || o.longestName().equals("--target")
                    || o.longestName().equals("--quiet");
            assertTrue(saysDefault, o.longestName() + " states its default: " + description);
        }
        for (int code = 0; code <= 6; code++) {
            assertTrue(r.out().contains("\n  " + code + "   "), "exit code " + code + " listed");
        }
    }

    /** Writes a seeded logistic-model CSV with a text id column; returns the number of positives. */
    static int writeClassification(Path csv, int n, double[] truth, long seed) throws IOException {
        RandomGenerator rng = RandomGeneratorFactory.of("L64X128MixRandom").create(seed);
        List<String> lines = new ArrayList<>();
        lines.add("id,tenure,spend,calls,flagged");
        int positives = 0;
        for (int i = 0; i < n; i++) {
            double a = rng.nextGaussian();
            double b = rng.nextGaussian();
            double c = rng.nextGaussian();
            double z = truth[0] + truth[1] * a + truth[2] * b + truth[3] * c;
            int y = rng.nextDouble() < 1 / (1 + Math.exp(-z)) ? 1 : 0;
            positives += y;
            lines.add(String.format(Locale.ROOT, "acct-%05d,%.6f,%.6f,%.6f,%d", i, a, b, c, y));
        }
        Files.write(csv, lines, StandardCharsets.UTF_8);
        return positives;
    }
}
