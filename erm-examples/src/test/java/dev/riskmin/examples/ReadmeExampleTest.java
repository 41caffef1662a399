package dev.riskmin.examples;

import dev.riskmin.Fit;
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

    @Test
    void readmeUsageExampleRunsAndSeparatesTheClasses() {
        assertTrue(readmeExample() > 0.5, "the example's model should rank a positive-looking point above a negative one");
    }

    @Test
    void readmeShowsExactlyThisCode() throws IOException {
        Path here = Path.of("src/test/java/dev/riskmin/examples/ReadmeExampleTest.java");
        List<String> code = new ArrayList<>();
        boolean inside = false;
        for (String line : Files.readAllLines(here, StandardCharsets.UTF_8)) {
            if (line.strip().equals("// " + "README-END")) {
                inside = false;
            }
            if (inside) {
                code.add(line.strip());
            }
            if (line.strip().equals("// " + "README-BEGIN")) {
                inside = true;
            }
        }
        List<String> readme = new ArrayList<>();
        boolean usage = false;
        boolean block = false;
        for (String line : Files.readAllLines(Path.of("../README.md"), StandardCharsets.UTF_8)) {
            if (line.startsWith("## ")) {
                usage = line.equals("## Usage");
            }
            if (usage && line.startsWith("```")) {
                if (block) {
                    break;
                }
                block = true;
                continue;
            }
            if (usage && block) {
                readme.add(line.strip());
            }
        }
        assertEquals(code, readme, "README's usage block and this test's example must be the same code");
        assertTrue(code.size() <= 16, "the README example should stay about 15 lines, it has " + code.size());
    }
}
