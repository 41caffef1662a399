package dev.riskmin.model;

import dev.riskmin.testing.Cases;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.io.IOException;
import java.io.StringReader;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.random.RandomGenerator;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTimeoutPreemptively;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assertions.fail;

/**
 * Generated malformed inputs: every truncation of valid files, and seeded random corruptions (bit
 * flips, byte edits, line deletions, duplications and swaps, bad values, version bumps, inserted
 * lines). Each case must load a model equal to the original (possible only when the mutation
 * changed nothing) or throw an IllegalArgumentException whose message starts "line N: " with N
 * within the input; any other outcome — another exception, a different model, a slow read — fails
 * the test with the seed and the mutation. Per run: about 11,000 truncations (20 seeds) and 3,000
 * corruptions (50 seeds × 60), plus 200 corruptions read from files.
 */
class ModelFileMutationTest {

    private static final Pattern LINE = Pattern.compile("^line (\\d+): .+", Pattern.DOTALL);

    /** Bad values that replace the text after " = " on a random line. */
    private static final String[] BAD_VALUES = {"NaN", "Infinity", "-Infinity", "1e999", "-1e400", "", " ", "garbage",
        "0x1p3", "1.5d", "+1", "1.", ".5", "--1", "1e", "99999999999999999999", "-1", "2147483648", "\"", "\"\\",
        "\"\\u12\"", "true", "1.0 ", " 1.0", "1,5", "\u00e9", "0", "1.0E-999", "-0.0", "1", "3.0"};

    /** Plausible lines inserted at random places. */
    private static final String[] EXTRA_LINES = {"w 0 = 1.0", "w 0 0 = 1.0", "intercept = 0.0", "intercept 0 = 0.0",
        "classes = 2", "dimension = 1", "note = \"x\"", "standardized = true", "label 0 = \"x\"",
        "checksum = crc32:00000000", "riskmin-model 1", "kind = linear", "", "# comment", "w = 1"};

    /** Truncations are refused, never loaded: a valid file ends with its checksum line and that line's line feed. */
    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void everyTruncationIsRefusedNamingALine(long seed) {
        SavedModel original = RandomModels.model(Cases.rng(seed));
        String text = RandomModels.written(original);
        assertTimeoutPreemptively(Duration.ofSeconds(15), () -> {
            for (int cut = 0; cut < text.length(); cut++) {
                String prefix = text.substring(0, cut);
                Object outcome = readTimed(prefix);
                if (!(outcome instanceof IllegalArgumentException)) {
                    fail("seed " + seed + ", cut at " + cut + " of " + text.length() + ": " + outcome);
                }
                assertNamesALine((IllegalArgumentException) outcome, prefix, "seed " + seed + ", cut at " + cut);
            }
        });
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds50")
    void randomCorruptionLoadsTheOriginalOrIsRefusedNamingALine(long seed) {
        RandomGenerator rng = Cases.rng(seed);
        SavedModel original = RandomModels.model(rng);
        String text = RandomModels.written(original);
        assertTimeoutPreemptively(Duration.ofSeconds(15), () -> {
            for (int i = 0; i < 60; i++) {
                String[] what = new String[1];
                String mutated = mutate(rng, text, what);
                String label = "seed " + seed + ", case " + i + " (" + what[0] + ")";
                Object outcome = readTimed(mutated);
                if (outcome instanceof SavedModel) {
                    assertEquals(original, outcome, label + " loaded a different model");
                } else if (outcome instanceof IllegalArgumentException) {
                    assertNamesALine((IllegalArgumentException) outcome, mutated, label);
                } else {
                    fail(label + ": " + outcome);
                }
            }
        });
    }

    /** Reading the same corrupt bytes from a file names the same line, prefixed by the file. */
    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void corruptFilesAreRefusedLikeCorruptText(long seed, @TempDir Path dir) throws IOException {
        RandomGenerator rng = Cases.rng(seed);
        SavedModel original = RandomModels.model(rng);
        String text = RandomModels.written(original);
        Path file = dir.resolve("m.txt");
        for (int i = 0; i < 10; i++) {
            String[] what = new String[1];
            String mutated = mutate(rng, text, what);
            Files.write(file, mutated.getBytes(StandardCharsets.ISO_8859_1));
            Object fromText = read(mutated);
            Object fromFile;
            try {
                fromFile = ModelFile.defaults().read(file);
            } catch (IllegalArgumentException e) {
                fromFile = e;
            }
            String label = "seed " + seed + ", case " + i + " (" + what[0] + ")";
            if (fromText instanceof SavedModel) {
                assertEquals(fromText, fromFile, label);
                continue;
            }
            assertTrue(fromFile instanceof IllegalArgumentException, label + ": " + fromFile);
            String m = ((IllegalArgumentException) fromFile).getMessage();
            assertTrue(m.startsWith(file + ": "), m);
            assertEquals(lineOf(((IllegalArgumentException) fromText).getMessage()),
                    lineOf(m.substring(file.toString().length() + 2)), label + ": " + m);
        }
    }

    @BeforeAll
    static void warmUp() {
        // compile the reader before the per-case time bound applies
        RandomGenerator rng = Cases.rng(7L);
        for (int i = 0; i < 200; i++) {
            read(RandomModels.written(RandomModels.model(rng)));
        }
    }

    /** The outcome, after checking that the read took at most 0.5 s + 20 µs per character. */
    private static Object readTimed(String text) {
        long start = System.nanoTime();
        Object outcome = read(text);
        long micros = (System.nanoTime() - start) / 1000;
        long bound = 500_000 + 20L * text.length();
        assertTrue(micros <= bound, "reading " + text.length() + " characters took " + micros + " us, bound " + bound);
        return outcome;
    }

    /** The model read, or the exception thrown (any type). */
    private static Object read(String text) {
        try {
            return ModelFile.defaults().read(new StringReader(text));
        } catch (Throwable t) {
            return t;
        }
    }

    private static void assertNamesALine(IllegalArgumentException e, String input, String label) {
        String m = e.getMessage();
        int line = lineOf(m);
        assertTrue(line >= 1, label + ": the message names no line: " + m);
        long lines = input.chars().filter(c -> c == '\n').count() + 1;
        assertTrue(line <= lines, label + ": line " + line + " of " + lines + ": " + m);
    }

    private static int lineOf(String message) {
        Matcher m = LINE.matcher(message);
        return m.matches() ? Integer.parseInt(m.group(1)) : -1;
    }

    /** One random corruption of the text; its description goes to what[0]. */
    static String mutate(RandomGenerator rng, String text, String[] what) {
        char[] c = text.toCharArray();
        int at = rng.nextInt(c.length);
        List<String> lines = new ArrayList<>(Arrays.asList(text.split("\n", -1))); // last entry is "" after the final LF
        int n = lines.size() - 1;
        int li = rng.nextInt(n);
        switch (rng.nextInt(11)) {
            case 0: {
                int bit = rng.nextInt(8);
                what[0] = "flip bit " + bit + " at " + at;
                c[at] ^= (char) (1 << bit);
                return new String(c);
            }
            case 1: {
                char b = (char) rng.nextInt(256);
                what[0] = "byte " + (int) b + " at " + at;
                c[at] = b;
                return new String(c);
            }
            case 2:
                what[0] = "delete line " + (li + 1);
                lines.remove(li);
                return String.join("\n", lines);
            case 3:
                what[0] = "duplicate line " + (li + 1);
                lines.add(li, lines.get(li));
                return String.join("\n", lines);
            case 4: {
                int lj = Math.min(li + 1, n - 1);
                what[0] = "swap lines " + (li + 1) + " and " + (lj + 1);
                String t = lines.get(li);
                lines.set(li, lines.get(lj));
                lines.set(lj, t);
                return String.join("\n", lines);
            }
            case 5: {
                String line = lines.get(li);
                int eq = line.indexOf(" = ");
                String bad = BAD_VALUES[rng.nextInt(BAD_VALUES.length)];
                what[0] = "value of line " + (li + 1) + " := \"" + bad + "\"";
                lines.set(li, (eq < 0 ? line : line.substring(0, eq)) + " = " + bad);
                return String.join("\n", lines);
            }
            case 6: {
                String[] versions = {"0", "2", "3", String.valueOf(rng.nextInt(1000)), "99999999999", "-1", "1 ", ""};
                String v = versions[rng.nextInt(versions.length)];
                what[0] = "version := \"" + v + "\"";
                lines.set(0, ModelFile.MAGIC + " " + v);
                return String.join("\n", lines);
            }
            case 7: {
                char b = (char) rng.nextInt(256);
                what[0] = "insert byte " + (int) b + " at " + at;
                return text.substring(0, at) + b + text.substring(at);
            }
            case 8:
                what[0] = "delete byte at " + at;
                return text.substring(0, at) + text.substring(at + 1);
            case 9: {
                String extra = EXTRA_LINES[rng.nextInt(EXTRA_LINES.length)];
                what[0] = "insert \"" + extra + "\" as line " + (li + 1);
                lines.add(li, extra);
                return String.join("\n", lines);
            }
            default: {
                String tail = rng.nextBoolean() ? "w 0 = 1.0\n" : new String(new char[]{(char) rng.nextInt(256)});
                what[0] = "cut at " + at + ", append \"" + tail + "\"";
                return text.substring(0, at) + tail;
            }
        }
    }
}
