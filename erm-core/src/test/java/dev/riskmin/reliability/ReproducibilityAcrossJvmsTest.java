package dev.riskmin.reliability;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.concurrent.TimeUnit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * Same seed, same parameters bit for bit: twice in this JVM, and in two fresh JVMs started by the
 * test — one with default flags and one that only interprets ({@code -Xint}), so that the
 * just-in-time compiler's code and the interpreter are compared too. {@link SeededFits} covers
 * every update rule and sampling, the lazy sparse path, averaging, standardization, the calibrated
 * default schedule, a multiclass loss and a general objective. (Run-to-run equality of five
 * configurations in one JVM is also in {@code ReproducibilityTest}.)
 *
 * <p>Classpath of the child: the property {@code surefire.test.class.path}, which Maven Surefire sets
 * to the test classpath in the forked JVM, else {@code java.class.path} (an IDE's launcher). Either
 * works even when Surefire runs from a manifest-only jar, because the child's launcher follows that
 * jar's Class-Path entries, so no Surefire setting is needed.
 */
class ReproducibilityAcrossJvmsTest {
    private static final long CHILD_TIMEOUT_SECONDS = 120;

    @Test
    void sameSeedGivesBitIdenticalParametersInThisAndTwoFreshJvms(@TempDir Path dir)
            throws IOException, InterruptedException {
        List<String> here = SeededFits.lines();
        assertEquals(here, SeededFits.lines(), "run to run in one JVM");
        assertEquals(12, here.size());
        assertEquals(here.size(), here.stream().map(l -> l.substring(l.indexOf(' '))).distinct().count(),
                "every configuration gives its own result");

        List<String> fresh = runChild(dir, "default");
        List<String> interpreted = runChild(dir, "-Xint");
        for (int k = 0; k < here.size(); k++) {
            assertEquals(here.get(k), fresh.get(k), "fresh JVM, fit " + k);
            assertEquals(here.get(k), interpreted.get(k), "interpreter-only JVM, fit " + k);
        }
        assertEquals(here.size(), fresh.size());
        assertEquals(here.size(), interpreted.size());
    }

    private static List<String> runChild(Path dir, String flag) throws IOException, InterruptedException {
        String classpath = System.getProperty("surefire.test.class.path", System.getProperty("java.class.path"));
        assertFalse(classpath == null || classpath.isBlank(), "no classpath to give the child JVM");
        Path java = Path.of(System.getProperty("java.home"), "bin", "java");
        List<String> command = new ArrayList<>(List.of(java.toString(), "-Xmx256m"));
        if (!flag.equals("default")) {
            command.add(flag);
        }
        command.addAll(List.of("-cp", classpath, SeededFits.class.getName()));
        Path errors = dir.resolve("child" + flag + ".err");
        Process child = new ProcessBuilder(command).redirectError(errors.toFile()).start();
        byte[] out;
        try {
            child.getOutputStream().close();
            out = child.getInputStream().readAllBytes();
            assertTrue(child.waitFor(CHILD_TIMEOUT_SECONDS, TimeUnit.SECONDS), "child JVM " + flag + " timed out");
        } finally {
            child.destroyForcibly();
            child.waitFor();
        }
        assertEquals(0, child.exitValue(), "child JVM " + flag + " failed: " + Files.readString(errors));
        return Arrays.asList(new String(out, StandardCharsets.UTF_8).split("\n"));
    }
}
