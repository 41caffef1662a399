package dev.riskmin.model;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.Arguments;
import org.junit.jupiter.params.provider.MethodSource;

import java.io.IOException;
import java.io.StringReader;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.function.Consumer;
import java.util.stream.Stream;
import java.util.zip.CRC32;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * One hand-made defect per case, on small valid files; each must be refused with an
 * IllegalArgumentException that names the defective line and says what is wrong. Unless the case
 * is about the checksum, the checksum line is recomputed so that only the intended defect remains.
 */
class ModelFileStrictnessTest {

    /** Lines 1–15 of a valid binary-classifier file; line 16 is the checksum. */
    private static List<String> linear() {
        return new ArrayList<>(List.of(
                "riskmin-model 1",                  // 1
                "kind = linear",                    // 2
                "loss = \"logistic\"",              // 3
                "response = logistic",              // 4
                "dimension = 3",                    // 5
                "classes = 2",                      // 6
                "label 0 = \"no\"",                 // 7
                "label 1 = \"yes\"",                // 8
                "standardized = false",             // 9
                "created = 2024-05-01T12:30:00Z",   // 10
                "note = \"base\"",                  // 11
                "intercept = 0.5",                  // 12
                "w 0 = 1.5",                        // 13
                "w 1 = -2.0",                       // 14
                "w 2 = 0.25"));                     // 15
    }

    /** Lines 1–18 of a valid multiclass file; line 19 is the checksum. */
    private static List<String> multiclass() {
        return new ArrayList<>(List.of(
                "riskmin-model 1",                  // 1
                "kind = multiclass",                // 2
                "loss = \"softmax-cross-entropy\"", // 3
                "response = softmax",               // 4
                "dimension = 2",                    // 5
                "classes = 3",                      // 6
                "label 0 = \"a\"",                  // 7
                "label 1 = \"b\"",                  // 8
                "label 2 = \"c\"",                  // 9
                "intercept 0 = 0.25",               // 10
                "intercept 1 = 1.0",                // 11
                "intercept 2 = -0.5",               // 12
                "w 0 0 = 1.0",                      // 13
                "w 0 1 = 2.0",                      // 14
                "w 1 0 = -1.0",                     // 15
                "w 1 1 = 0.5",                      // 16
                "w 2 0 = 0.0",                      // 17
                "w 2 1 = -3.0"));                   // 18
    }

    /** The lines with line feeds and a correct checksum line appended. */
    static String sealed(List<String> lines) {
        StringBuilder sb = new StringBuilder();
        for (String l : lines) {
            sb.append(l).append('\n');
        }
        CRC32 crc = new CRC32();
        crc.update(sb.toString().getBytes(StandardCharsets.ISO_8859_1));
        return sb.append(String.format("checksum = crc32:%08x%n", crc.getValue()).replace(System.lineSeparator(), "\n"))
                .toString();
    }

    private static String edited(List<String> base, Consumer<List<String>> edit) {
        List<String> lines = new ArrayList<>(base);
        edit.accept(lines);
        return sealed(lines);
    }

    /** Replaces line n (1-based). */
    private static Consumer<List<String>> set(int n, String text) {
        return l -> l.set(n - 1, text);
    }

    /** Inserts a line so that it becomes line n. */
    private static Consumer<List<String>> insert(int n, String text) {
        return l -> l.add(n - 1, text);
    }

    private static Consumer<List<String>> remove(int n) {
        return l -> l.remove(n - 1);
    }

    private static Consumer<List<String>> swap(int a, int b) {
        return l -> {
            String t = l.get(a - 1);
            l.set(a - 1, l.get(b - 1));
            l.set(b - 1, t);
        };
    }

    private static Arguments refused(String what, String text, int line, String... fragments) {
        return Arguments.of(what, text, line, fragments);
    }

    static Stream<Arguments> defects() {
        List<String> lin = linear();
        List<String> mc = multiclass();
        String valid = sealed(lin);
        String checksumLine = valid.substring(valid.lastIndexOf("checksum"));
        return Stream.of(
                refused("empty input", "", 1, "empty"),
                refused("bad magic", edited(lin, set(1, "riskmodel 1")), 1, "not a riskmin model file"),
                refused("version 2", edited(lin, set(1, "riskmin-model 2")), 1, "format version 2 is not supported",
                        "reads version 1"),
                refused("version 0", edited(lin, set(1, "riskmin-model 0")), 1, "format version 0 is not supported"),
                refused("huge version", edited(lin, set(1, "riskmin-model 123456789012345678901234567890")), 1,
                        "version 123456789012345678901234567890 is not supported", "reads version 1"),
                refused("version 1.0", edited(lin, set(1, "riskmin-model 1.0")), 1, "\"1.0\" is not a positive integer"),
                refused("version 01", edited(lin, set(1, "riskmin-model 01")), 1, "\"01\" is not a positive integer"),
                refused("no version", edited(lin, set(1, "riskmin-model")), 1, "no format version"),
                refused("unknown key", edited(lin, insert(5, "colour = red")), 5, "unknown key \"colour\"",
                        "colour = red"),
                refused("duplicate key", edited(lin, insert(4, "loss = \"squared\"")), 4,
                        "duplicate key \"loss\" (first on line 3)"),
                refused("missing key", edited(lin, remove(4)), 4, "key \"dimension\" is out of place", "response = "),
                refused("keys swapped", edited(lin, swap(2, 3)), 2, "key \"loss\" is out of place", "kind = "),
                refused("optional keys out of order", edited(lin, swap(9, 11)), 10, "key \"created\" is out of place",
                        "order standardized, created, note"),
                refused("duplicate optional key", edited(lin, insert(12, "note = \"again\"")), 12,
                        "duplicate key \"note\" (first on line 11)"),
                refused("NaN", edited(lin, set(14, "w 1 = NaN")), 14, "NaN and infinities are not allowed", "w 1 = NaN"),
                refused("Infinity", edited(lin, set(14, "w 1 = Infinity")), 14, "NaN and infinities are not allowed"),
                refused("-Infinity", edited(lin, set(12, "intercept = -Infinity")), 12, "NaN and infinities"),
                refused("overflow", edited(lin, set(14, "w 1 = 1e400")), 14, "1e400 overflows a double"),
                refused("empty value", edited(lin, set(14, "w 1 = ")), 14, "the value is empty"),
                refused("no separator", edited(lin, set(14, "w 1 =")), 14, "expected a line \"key = value\""),
                refused("garbage number", edited(lin, set(14, "w 1 = abc")), 14, "not a decimal number"),
                refused("hex number", edited(lin, set(14, "w 1 = 0x1p3")), 14, "not a decimal number"),
                refused("type suffix", edited(lin, set(14, "w 1 = 1.5d")), 14, "not a decimal number"),
                refused("plus sign", edited(lin, set(14, "w 1 = +1.5")), 14, "not a decimal number"),
                refused("bare point", edited(lin, set(14, "w 1 = 1.")), 14, "not a decimal number"),
                refused("leading point", edited(lin, set(14, "w 1 = .5")), 14, "not a decimal number"),
                refused("long number", edited(lin, set(14, "w 1 = 1" + "0".repeat(200))), 14, "more than 128"),
                refused("stray space in value", edited(lin, set(14, "w 1 =  1.5")), 14, "stray space"),
                refused("stray space in key", edited(lin, set(14, "w  1 = 1.5")), 14, "stray space"),
                refused("too few coefficients", edited(lin, remove(15)), 15, "key \"checksum\" is out of place",
                        "w 2 = <number> (coefficient 3 of 3)"),
                refused("too many coefficients", edited(lin, insert(16, "w 3 = 1.0")), 16, "an extra coefficient line",
                        "all 3 coefficients (dimension 3)"),
                refused("index out of range", edited(lin, set(14, "w 7 = 1.0")), 14, "feature index 7 is outside [0, 3)"),
                refused("index repeated", edited(lin, set(14, "w 0 = 1.0")), 14, "w 0 repeats or is out of order",
                        "expected w 1 next"),
                refused("index skipped", edited(lin, set(14, "w 2 = 1.0")), 14, "w 2 comes where w 1 was expected"),
                refused("index with leading zero", edited(lin, set(14, "w 01 = 1.0")), 14,
                        "index \"01\" is not a non-negative integer"),
                refused("index too long", edited(lin, set(14, "w 99999999999 = 1.0")), 14, "index \"99999999999\""),
                refused("two indices on a linear model", edited(lin, set(14, "w 1 0 = 1.0")), 14,
                        "\"w\" takes 1 index here, found 2"),
                refused("text after the checksum line", valid + "extra\n", 17, "text after the checksum line"),
                refused("empty line after the checksum line", valid + "\n", 17, "text after the checksum line"),
                refused("no final line feed", valid.substring(0, valid.length() - 1), 16,
                        "ends without the line feed after the checksum line"),
                refused("checksum mismatch", valid.replace("w 1 = -2.0", "w 1 = -2.5"), 16, "checksum mismatch",
                        "corrupt or was edited"),
                refused("checksum in capitals", valid.replace(checksumLine, checksumLine.toUpperCase()
                        .replace("CHECKSUM", "checksum")), 16, "malformed checksum"),
                refused("other checksum algorithm", valid.replace("crc32:", "md5:"), 16, "malformed checksum"),
                refused("carriage returns", String.join("\r\n", lin) + "\r\n", 1, "carriage return"),
                refused("tab", edited(lin, set(11, "note = \"a\tb\"")), 11, "column 10", "character 0x9"),
                refused("NUL", edited(lin, set(11, "note = \"a\0b\"")), 11, "character 0x0"),
                refused("raw Latin-1 letter", edited(lin, set(11, "note = \"caf\u00e9\"")), 11, "character 0xe9"),
                refused("raw euro sign", edited(lin, set(11, "note = \"\u20ac\"")), 11, "character 0x20ac"),
                refused("bad escape", edited(lin, set(11, "note = \"a\\nb\"")), 11, "bad escape at column 10"),
                refused("short unicode escape", edited(lin, set(11, "note = \"\\u00e\"")), 11, "bad escape"),
                refused("unterminated string", edited(lin, set(11, "note = \"abc")), 11, "no closing quote"),
                refused("text after a string", edited(lin, set(11, "note = \"abc\"x")), 11,
                        "text after the closing quote at column 13"),
                refused("unquoted string", edited(lin, set(11, "note = abc")), 11, "expected a string in double quotes"),
                refused("labels incomplete", edited(lin, remove(8)), 8, "key \"standardized\" is out of place",
                        "label 1 = "),
                refused("label names repeated", edited(lin, set(8, "label 1 = \"no\"")), 8,
                        "repeats the name of label 0"),
                refused("label index repeated", edited(lin, set(8, "label 0 = \"x\"")), 8, "label 0 repeats"),
                refused("label index out of range", edited(lin, set(8, "label 2 = \"x\"")), 8,
                        "class index 2 is outside [0, 2)"),
                refused("multiclass response on a linear model", edited(lin, set(4, "response = softmax")), 4,
                        "belongs to a multiclass model"),
                refused("unknown response", edited(lin, set(4, "response = sigmoid")), 4,
                        "unknown response \"sigmoid\""),
                refused("unknown kind", edited(lin, set(2, "kind = tree")), 2, "unknown kind \"tree\""),
                refused("classes on a regression model", edited(lin, set(4, "response = identity")), 6,
                        "key \"classes\" is out of place"),
                refused("binary classifier with 3 classes", edited(lin, set(6, "classes = 3")), 6,
                        "has classes = 2, not 3"),
                refused("negative dimension", edited(lin, set(5, "dimension = -1")), 5,
                        "dimension \"-1\" is not a non-negative integer"),
                refused("fractional dimension", edited(lin, set(5, "dimension = 2.5")), 5, "not a non-negative integer"),
                refused("bad instant", edited(lin, set(10, "created = yesterday")), 10, "ISO-8601"),
                refused("long instant", edited(lin, set(10, "created = " + "9".repeat(100))), 10, "more than 64"),
                refused("standardized yes", edited(lin, set(9, "standardized = yes")), 9, "true or false"),
                refused("empty line", edited(lin, insert(6, "")), 6, "empty line"),
                refused("truncated inside a line", valid.substring(0, valid.indexOf("w 1 = -2.0") + 8), 14,
                        "the file ends inside this line, before w 2 = <number>", "truncated", "\"w 1 = -2\""),
                refused("truncated after a line", valid.substring(0, valid.indexOf("w 1 = -2.0")), 14,
                        "the file ends where w 1 = <number> (coefficient 2 of 3) was expected", "truncated"),
                refused("truncated inside a key", valid.substring(0, valid.indexOf("w 1 = -2.0") + 2), 14,
                        "expected a line \"key = value\"", "truncated"),
                refused("one class", edited(mc, set(6, "classes = 1")), 6, "classes (1) must be >= 2"),
                refused("linear response on a multiclass model", edited(mc, set(4, "response = logistic")), 4,
                        "belongs to a linear model"),
                refused("multiclass feature index out of range", edited(mc, set(14, "w 0 2 = 2.0")), 14,
                        "feature index 2 is outside [0, 2)"),
                refused("multiclass class index out of range", edited(mc, set(13, "w 3 0 = 1.0")), 13,
                        "class index 3 is outside [0, 3)"),
                refused("intercepts swapped", edited(mc, swap(10, 11)), 10,
                        "intercept 1 comes where intercept 0 was expected"),
                refused("intercept without index", edited(mc, set(10, "intercept = 0.25")), 10,
                        "\"intercept\" takes 1 index here, found 0"),
                refused("coefficients swapped", edited(mc, swap(13, 14)), 13, "w 0 1 comes where w 0 0 was expected"),
                refused("extra multiclass coefficient", edited(mc, insert(19, "w 3 0 = 1.0")), 19,
                        "an extra coefficient line", "all 6 coefficients (3 classes x dimension 2)"),
                refused("missing intercept", edited(mc, remove(12)), 12, "key \"w\" is out of place",
                        "intercept 2 = <number>"));
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("defects")
    void defectIsRefusedNamingTheLineAndTheProblem(String what, String text, int line, String[] fragments) {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> ModelFile.defaults().read(new StringReader(text)), what);
        String m = e.getMessage();
        assertTrue(m.startsWith("line " + line + ": "), () -> "expected line " + line + ": " + m);
        for (String f : fragments) {
            assertTrue(m.contains(f), () -> "message \"" + m + "\" should contain \"" + f + "\"");
        }
    }

    @Test
    void bothBaseFilesAreValid() throws IOException {
        assertEquals(3, ModelFile.defaults().read(new StringReader(sealed(linear()))).dimension());
        assertEquals(3, ModelFile.defaults().read(new StringReader(sealed(multiclass()))).classCount());
    }

    @Test
    void offendingTextIsQuotedAndCut() {
        String longNote = "note = \"" + "x".repeat(300);
        String text = edited(linear(), set(11, longNote));
        String m = assertThrows(IllegalArgumentException.class,
                () -> ModelFile.defaults().read(new StringReader(text))).getMessage();
        assertTrue(m.contains("in \"" + longNote.substring(0, 80) + "...\" (" + longNote.length() + " characters)"), m);
        assertTrue(m.length() < 250, m);
    }

    @Test
    void typedReaderRefusesTheOtherKindNamingLineTwo() {
        String mc = sealed(multiclass());
        String lin = sealed(linear());
        String a = assertThrows(IllegalArgumentException.class,
                () -> ModelFile.defaults().readLinear(new StringReader(mc))).getMessage();
        assertTrue(a.startsWith("line 2: the file holds a multiclass model"), a);
        String b = assertThrows(IllegalArgumentException.class,
                () -> ModelFile.defaults().readMulticlass(new StringReader(lin))).getMessage();
        assertTrue(b.startsWith("line 2: the file holds a single-output linear model"), b);
    }

    /** The stream header of Java object serialization (0xACED 0x0005) is not a model file; nothing is deserialized. */
    @Test
    void javaSerializationStreamIsRefusedAsNotAModelFile(@TempDir Path dir) throws IOException {
        Path file = dir.resolve("object.bin");
        byte[] bytes = Arrays.copyOf(new byte[]{(byte) 0xAC, (byte) 0xED, 0x00, 0x05, 0x73, 0x72}, 64);
        Files.write(file, bytes);
        String m = assertThrows(IllegalArgumentException.class, () -> ModelFile.defaults().read(file)).getMessage();
        assertTrue(m.startsWith(file + ": line 1: not a riskmin model file"), m);
    }

    @Test
    void fileMessagesNameTheFileAndTheLine(@TempDir Path dir) throws IOException {
        Path file = dir.resolve("m.txt");
        Files.writeString(file, edited(linear(), set(14, "w 1 = NaN")), StandardCharsets.US_ASCII);
        String m = assertThrows(IllegalArgumentException.class, () -> ModelFile.defaults().read(file)).getMessage();
        assertTrue(m.startsWith(file + ": line 14: "), m);
        String n = assertThrows(IllegalArgumentException.class, () -> ModelFile.defaults().readLinear(
                writeTo(dir.resolve("mc.txt"), sealed(multiclass())))).getMessage();
        assertTrue(n.startsWith(dir.resolve("mc.txt") + ": line 2: "), n);
    }

    /** A raw byte outside ASCII in a file is named as a byte. */
    @Test
    void nonAsciiByteInAFileIsNamedByValue(@TempDir Path dir) throws IOException {
        Path file = dir.resolve("m.txt");
        byte[] bytes = edited(linear(), set(11, "note = \"caf\u00e9\"")).getBytes(StandardCharsets.UTF_8);
        Files.write(file, bytes);
        String m = assertThrows(IllegalArgumentException.class, () -> ModelFile.defaults().read(file)).getMessage();
        assertTrue(m.contains("line 11: column 12: byte 0xc3"), m);
    }

    private static Path writeTo(Path p, String text) throws IOException {
        Files.writeString(p, text, StandardCharsets.US_ASCII);
        return p;
    }
}
