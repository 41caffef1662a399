package dev.riskmin.model;

import dev.riskmin.loss.Response;
import dev.riskmin.testing.Cases;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.EnumSource;
import org.junit.jupiter.params.provider.MethodSource;

import java.io.IOException;
import java.io.StringReader;
import java.io.StringWriter;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Instant;
import java.util.List;
import java.util.random.RandomGenerator;
import java.util.stream.Collectors;
import java.util.stream.Stream;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

class ModelFileRoundTripTest {

    private static SavedModel roundTrip(SavedModel m) throws IOException {
        return ModelFile.defaults().read(new StringReader(RandomModels.written(m)));
    }

    /** Every parameter compared by its raw bits, so −0.0 ≠ 0.0 and the last ulp counts. */
    private static void assertBitExact(SavedModel expected, SavedModel actual) {
        assertEquals(expected.kind(), actual.kind());
        assertEquals(expected.dimension(), actual.dimension());
        assertEquals(expected.classCount(), actual.classCount());
        int blocks = expected.kind() == SavedModel.Kind.MULTICLASS ? expected.classCount() : 1;
        for (int k = 0; k < blocks; k++) {
            assertEquals(Double.doubleToRawLongBits(expected.intercept(k)), Double.doubleToRawLongBits(actual.intercept(k)),
                    "intercept " + k + ": " + expected.intercept(k) + " read as " + actual.intercept(k));
            for (int j = 0; j < expected.dimension(); j++) {
                assertEquals(Double.doubleToRawLongBits(expected.coefficient(k, j)),
                        Double.doubleToRawLongBits(actual.coefficient(k, j)),
                        "w " + k + " " + j + ": " + expected.coefficient(k, j) + " read as " + actual.coefficient(k, j));
            }
        }
        assertEquals(expected.lossName(), actual.lossName());
        assertEquals(expected.response(), actual.response());
        assertEquals(expected.classNames(), actual.classNames());
        assertEquals(expected.standardized(), actual.standardized());
        assertEquals(expected.created(), actual.created());
        assertEquals(expected.note(), actual.note());
        assertEquals(expected, actual);
        assertEquals(expected.hashCode(), actual.hashCode());
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void randomModelsRoundTripBitExactly(long seed) throws IOException {
        SavedModel m = RandomModels.model(Cases.rng(seed));
        assertBitExact(m, roundTrip(m));
    }

    /** All-extreme parameters under every response the format knows. */
    @ParameterizedTest(name = "{0}")
    @EnumSource(Response.class)
    void everyResponseRoundTripsWithExtremeParameters(Response response) throws IOException {
        double[] ex = RandomModels.EXTREMES;
        SavedModel m;
        if (response == Response.SOFTMAX || response == Response.ARGMAX) {
            int k = 3;
            double[] w = new double[k * ex.length];
            for (int i = 0; i < w.length; i++) {
                w[i] = ex[(i * 7) % ex.length];
            }
            m = SavedModel.of(MulticlassModel.of(w, new double[]{-0.0, Double.MIN_VALUE, -Double.MAX_VALUE}, ex.length,
                    response, "multi " + response));
        } else {
            m = SavedModel.of(LinearModel.of(ex, -Double.MIN_VALUE, response, "single " + response));
        }
        SavedModel back = roundTrip(m);
        assertBitExact(m, back);
        assertEquals(response, back.response());
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds50")
    void writtenFileIsPrintableAsciiLinesEndingInALineFeed(long seed) {
        String text = RandomModels.written(RandomModels.model(Cases.rng(seed)));
        assertTrue(text.startsWith("riskmin-model 1\nkind = "), text);
        assertTrue(text.endsWith("\n"));
        for (int i = 0; i < text.length(); i++) {
            char c = text.charAt(i);
            assertTrue(c == '\n' || (c >= 0x20 && c <= 0x7e), "character " + (int) c + " at " + i);
        }
        String last = text.substring(text.lastIndexOf('\n', text.length() - 2) + 1);
        assertTrue(last.matches("checksum = crc32:[0-9a-f]{8}\n"), last);
    }

    /**
     * Correctly rounded decimal-to-binary conversion maps 17 significant digits back to the same
     * double (D. W. Matula 1968; IEEE 754-2008 §5.12.2; from memory): the fallback must hold on
     * arbitrary bit patterns, and the decimal chosen for the file must too.
     */
    @Test
    void seventeenDigitDecimalsRoundTripForArbitraryBitPatterns() {
        RandomGenerator rng = Cases.rng(1717L);
        int checked = 0;
        for (int i = 0; i < 50_000; i++) {
            double v = i < RandomModels.EXTREMES.length ? RandomModels.EXTREMES[i] : Double.longBitsToDouble(rng.nextLong());
            if (!Double.isFinite(v)) {
                continue;
            }
            String s = ModelFile.seventeenDigits(v);
            assertTrue(ModelFile.isDecimal(s), s);
            assertEquals(Double.doubleToRawLongBits(v), Double.doubleToRawLongBits(Double.parseDouble(s)), s);
            String d = ModelFile.decimal(v);
            assertTrue(ModelFile.isDecimal(d), d);
            assertEquals(Double.doubleToRawLongBits(v), Double.doubleToRawLongBits(Double.parseDouble(d)), d);
            checked++;
        }
        assertTrue(checked > 47_000, "checked " + checked);
    }

    @Test
    void seventeenDigitDecimalsHaveTheDocumentedShape() {
        assertEquals("5.0E-1", ModelFile.seventeenDigits(0.5));
        assertEquals("-0.0", ModelFile.seventeenDigits(-0.0));
        assertEquals("0.0", ModelFile.seventeenDigits(0.0));
        // 0.1 = 0.1000000000000000055511151231257827… exactly (binary64 nearest to 1/10, elementary)
        assertEquals("1.0000000000000001E-1", ModelFile.seventeenDigits(0.1));
        // 2^-1074 = 4.9406564584124654…e-324 (IEEE 754 binary64 smallest subnormal)
        assertEquals("4.9406564584124654E-324", ModelFile.seventeenDigits(Double.MIN_VALUE));
        // (2 − 2^-52)·2^1023 = 1.7976931348623157…e308
        assertEquals("-1.7976931348623157E308", ModelFile.seventeenDigits(-Double.MAX_VALUE));
    }

    @Test
    void decimalIsTheShortJavaFormWhenThatRoundTrips() {
        assertEquals("0.1", ModelFile.decimal(0.1));
        assertEquals("-0.0", ModelFile.decimal(-0.0));
        assertEquals("4.9E-324", ModelFile.decimal(Double.MIN_VALUE));
        assertEquals("1.0E-300", ModelFile.decimal(1e-300));
    }

    @Test
    void quotedStringsRoundTripAnyCharacter() throws IOException {
        StringBuilder all = new StringBuilder();
        for (char c = 0; c < 0x3000; c++) {
            all.append(c);
        }
        all.append("\uD83D\uDE00\uDFFF\uD800\uFFFF"); // a pair, then lone surrogates
        String s = all.toString();
        SavedModel m = SavedModel.of(LinearModel.of(new double[]{1}, 0, Response.IDENTITY, s)).withNote(s);
        SavedModel back = ModelFile.defaults().withMaxLineLength(200_000).read(new StringReader(
                written(ModelFile.defaults().withMaxLineLength(200_000), m)));
        assertEquals(s, back.lossName());
        assertEquals(s, back.note().orElseThrow());
    }

    @Test
    void createdInstantsRoundTripOverTheirWholeRange() throws IOException {
        for (Instant t : new Instant[]{Instant.MIN, Instant.MAX, Instant.EPOCH, Instant.ofEpochSecond(-1, 1),
            Instant.parse("2024-05-01T12:30:00.000000001Z")}) {
            SavedModel m = SavedModel.of(LinearModel.of(new double[0], 1, Response.IDENTITY, "squared")).withCreated(t);
            assertEquals(t, roundTrip(m).created().orElseThrow());
        }
    }

    @Test
    void pathRoundTripReplacesTheFileAndLeavesNoTemporaryFile(@TempDir Path dir) throws IOException {
        Path file = dir.resolve("model.txt");
        Files.writeString(file, "old content");
        RandomGenerator rng = Cases.rng(42L);
        for (int i = 0; i < 20; i++) {
            SavedModel m = RandomModels.model(rng);
            ModelFile.defaults().write(m, file);
            assertBitExact(m, ModelFile.defaults().read(file));
            assertEquals(RandomModels.written(m), Files.readString(file, StandardCharsets.US_ASCII),
                    "the file holds exactly what the Writer form holds");
        }
        try (Stream<Path> files = Files.list(dir)) {
            assertEquals(List.of("model.txt"), files.map(p -> p.getFileName().toString()).collect(Collectors.toList()));
        }
    }

    @Test
    void typedReadersReturnTheModelOfTheirKind(@TempDir Path dir) throws IOException {
        LinearModel linear = LinearModel.of(new double[]{1.5, -0.0}, 0.25, Response.EXPONENTIAL, "poisson");
        MulticlassModel multi = MulticlassModel.of(new double[]{1, 2, 3, 4}, new double[]{0, -1}, 2, Response.SOFTMAX,
                "softmax-cross-entropy");
        ModelFile f = ModelFile.defaults();
        StringWriter a = new StringWriter();
        f.write(linear, a);
        StringWriter b = new StringWriter();
        f.write(multi, b);
        assertEquals(SavedModel.of(linear), SavedModel.of(f.readLinear(new StringReader(a.toString()))));
        assertEquals(SavedModel.of(multi), SavedModel.of(f.readMulticlass(new StringReader(b.toString()))));
        Path p = dir.resolve("a");
        Path q = dir.resolve("b");
        f.write(linear, p);
        f.write(multi, q);
        assertEquals(SavedModel.of(linear), SavedModel.of(f.readLinear(p)));
        assertEquals(SavedModel.of(multi), SavedModel.of(f.readMulticlass(q)));
    }

    /** The loaded model predicts exactly as the original (the same bits give the same arithmetic). */
    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds20")
    void loadedModelPredictsIdentically(long seed) throws IOException {
        RandomGenerator rng = Cases.rng(seed);
        int d = 1 + rng.nextInt(10);
        LinearModel linear = LinearModel.of(Cases.gaussianVector(rng, d, 1.0), rng.nextGaussian(), Response.LOGISTIC,
                "logistic");
        MulticlassModel multi = MulticlassModel.of(Cases.gaussianVector(rng, 4 * d, 1.0), Cases.gaussianVector(rng, 4, 1.0),
                d, Response.SOFTMAX, "softmax-cross-entropy");
        LinearModel linearBack = roundTrip(SavedModel.of(linear)).linear();
        MulticlassModel multiBack = roundTrip(SavedModel.of(multi)).multiclass();
        double[] p = new double[4];
        double[] q = new double[4];
        for (int i = 0; i < 50; i++) {
            double[] x = Cases.gaussianVector(rng, d, 3.0);
            assertEquals(linear.probability(x), linearBack.probability(x));
            multi.probabilities(x, p);
            multiBack.probabilities(x, q);
            assertEquals(List.of(p[0], p[1], p[2], p[3]), List.of(q[0], q[1], q[2], q[3]));
        }
    }

    private static String written(ModelFile f, SavedModel m) throws IOException {
        StringWriter out = new StringWriter();
        f.write(m, out);
        return out.toString();
    }
}
