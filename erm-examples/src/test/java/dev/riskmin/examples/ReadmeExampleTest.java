package dev.riskmin.examples;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.data.Dataset;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.diagnostics.verdict.Condition;
import dev.riskmin.Minimizer;
import dev.riskmin.StopReason;
import dev.riskmin.loss.Losses;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.model.LinearModel;
import dev.riskmin.penalty.Penalty;
import org.junit.jupiter.api.Test;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** The README's usage example is this test's code, verbatim: so it compiles and runs. */
class ReadmeExampleTest {

    private static double readmeExample() {
        // README-BEGIN
        double[][] x = {{0.2, 1.0}, {1.5, 0.3}, {2.1, 2.2}, {0.4, 0.1}, {1.9, 1.2}, {0.1, 0.7}};
        double[] y = {0, 1, 1, 0, 1, 0};
        Minimizer minimizer = Minimizer.builder()
                .loss(Losses.logistic())
                .penalty(Penalty.l2(1e-2))
                .updateRule(UpdateRule.saga())
                .standardize(true)
                .epochs(200)
                .seed(42)
                .build();
        Fit fit = minimizer.fit(x, y);
        LinearModel model = fit.model();
        System.out.println(fit.stopReason() + ", objective " + fit.finalObjective());
        System.out.println("P(y = 1 | x = (1, 1)) = " + model.probability(new double[] {1.0, 1.0}));
        // README-END
        assertEquals(StopReason.EPOCH_BUDGET, fit.stopReason());
        return model.probability(new double[] {2.0, 1.5}) - model.probability(new double[] {0.2, 0.3});
    }

    private static Diagnostics readmeDiagnosticsExample(Minimizer minimizer, double[][] x, double[] y) {
        // README-DIAGNOSTICS-BEGIN
        Diagnostics diagnostics = Diagnostics.standard().build();
        Fit fit = minimizer.fit(Dataset.of(x, y), FitOptions.listeners(diagnostics));
        System.out.println(diagnostics.verdict());
        // README-DIAGNOSTICS-END
        assertEquals(StopReason.EPOCH_BUDGET, fit.stopReason());
        return diagnostics;
    }

    @Test
    void readmeDiagnosticsExampleRunsAndJudges() {
        java.util.random.RandomGenerator rng = java.util.random.RandomGeneratorFactory.of("L64X128MixRandom").create(4);
        double[][] x = new double[3000][3];
        double[] y = new double[3000];
        for (int i = 0; i < x.length; i++) {
            for (int j = 0; j < 3; j++) {
                x[i][j] = rng.nextGaussian();
            }
            y[i] = x[i][0] - 2 * x[i][1] + 0.5 * x[i][2] + 0.1 * rng.nextGaussian();
        }
        Minimizer minimizer = Minimizer.builder().updateRule(UpdateRule.saga()).epochs(20).build();
        Diagnostics d = readmeDiagnosticsExample(minimizer, x, y);
        assertEquals(Condition.CONVERGED, d.verdict().condition(), d.verdict().toString());
    }

    @Test
    void readmeUsageExampleRunsAndSeparatesTheClasses() {
        assertTrue(readmeExample() > 0.5, "the example's model should rank a positive-looking point above a negative one");
    }

    private static List<String> marked(String marker) throws IOException {
        Path here = Path.of("src/test/java/dev/riskmin/examples/ReadmeExampleTest.java");
        List<String> code = new ArrayList<>();
        boolean inside = false;
        for (String line : Files.readAllLines(here, StandardCharsets.UTF_8)) {
            if (line.strip().equals("// " + marker + "-END")) {
                inside = false;
            }
            if (inside) {
                code.add(line.strip());
            }
            if (line.strip().equals("// " + marker + "-BEGIN")) {
                inside = true;
            }
        }
        return code;
    }

    /** The first fenced code block under the given second-level heading of README.md, stripped. */
    private static List<String> readmeBlock(String heading) throws IOException {
        List<String> readme = new ArrayList<>();
        boolean section = false;
        boolean block = false;
        for (String line : Files.readAllLines(Path.of("../README.md"), StandardCharsets.UTF_8)) {
            if (line.startsWith("## ")) {
                section = line.equals(heading);
            }
            if (section && line.startsWith("```")) {
                if (block) {
                    break;
                }
                block = true;
                continue;
            }
            if (section && block) {
                readme.add(line.strip());
            }
        }
        return readme;
    }

    @Test
    void readmeShowsExactlyThisCode() throws IOException {
        List<String> code = marked("README");
        assertEquals(code, readmeBlock("## Usage"), "README's usage block and this test's example must be the same code");
        assertTrue(code.size() <= 16, "the README example should stay about 15 lines, it has " + code.size());
        assertEquals(marked("README-DIAGNOSTICS"), readmeBlock("## Knowing whether it converged"),
                "README's diagnostics block and this test's example must be the same code");
    }
}
