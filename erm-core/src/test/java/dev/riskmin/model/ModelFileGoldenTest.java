package dev.riskmin.model;

import dev.riskmin.loss.Response;
import org.junit.jupiter.api.Test;

import java.io.IOException;
import java.io.InputStream;
import java.io.InputStreamReader;
import java.io.Reader;
import java.io.StringReader;
import java.io.StringWriter;
import java.nio.charset.StandardCharsets;
import java.time.Instant;
import java.util.List;
import java.util.Optional;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;

/**
 * Hand-written version-1 files in test resources (dev/riskmin/model/golden-*-v1.txt) guard the
 * format against accidental change: they must load to known values, and writing those values must
 * give the same bytes back. The checksum lines were computed with CPython's zlib.crc32, an
 * implementation independent of java.util.zip; the expected bit patterns below are those CPython's
 * float() gives for the decimals in the files (correctly rounded), written as hex.
 */
class ModelFileGoldenTest {

    private static String resource(String name) throws IOException {
        try (InputStream in = ModelFileGoldenTest.class.getResourceAsStream(name)) {
            assertNotNull(in, name);
            return new String(in.readAllBytes(), StandardCharsets.US_ASCII);
        }
    }

    private static Reader reader(String name) throws IOException {
        return new InputStreamReader(ModelFileGoldenTest.class.getResourceAsStream(name), StandardCharsets.UTF_8);
    }

    private static void assertBits(long expected, double actual, String what) {
        assertEquals(Long.toHexString(expected), Long.toHexString(Double.doubleToRawLongBits(actual)), what + " = " + actual);
    }

    @Test
    void linearGoldenFileLoadsToTheKnownValues() throws IOException {
        SavedModel m;
        try (Reader in = reader("golden-linear-v1.txt")) {
            m = ModelFile.defaults().read(in);
        }
        assertEquals(SavedModel.Kind.LINEAR, m.kind());
        LinearModel model = m.linear();
        assertEquals("logistic", model.lossName());
        assertEquals(Response.LOGISTIC, model.response());
        assertEquals(8, model.dimension());
        assertEquals(2, m.classCount());
        assertEquals(List.of("genuine", "flagged \"high\" caf\u00e9"), m.classNames());
        assertEquals(Optional.of(true), m.standardized());
        assertEquals(Optional.of(Instant.parse("2024-05-01T12:30:00Z")), m.created());
        assertEquals(Optional.of("golden file, format version 1\nsecond line with a backslash \\"), m.note());
        // bit patterns from CPython float() of the decimals in the file
        assertBits(0x3FB999999999999AL, model.intercept(), "intercept 0.1");
        long[] w = {0x3FF8000000000000L, 0xC000000000000000L, 0x01A56E1FC2F8F359L, 0x8000000000000000L,
            0x0000000000000001L, 0x7FEFFFFFFFFFFFFFL, 0x0010000000000000L, 0x800012688B70E62BL};
        for (int j = 0; j < w.length; j++) {
            assertBits(w[j], model.coefficient(j), "w " + j);
        }
    }

    @Test
    void multiclassGoldenFileLoadsToTheKnownValues() throws IOException {
        SavedModel m;
        try (Reader in = reader("golden-multiclass-v1.txt")) {
            m = ModelFile.defaults().read(in);
        }
        MulticlassModel model = m.multiclass();
        assertEquals("multiclass-hinge", model.lossName());
        assertEquals(Response.ARGMAX, model.response());
        assertEquals(3, model.classes());
        assertEquals(3, model.dimension());
        assertEquals(List.of("low", "medium", "high"), m.classNames());
        assertEquals(Optional.empty(), m.standardized());
        assertEquals(Optional.empty(), m.created());
        assertEquals(Optional.empty(), m.note());
        // bit patterns from CPython float() of the decimals in the file
        long[] b = {0x3FD0000000000000L, 0xBEE4F8B588E368F1L, 0x40FE240C9FBE76C9L};
        for (int k = 0; k < 3; k++) {
            assertBits(b[k], model.intercept(k), "intercept " + k);
        }
        long[] w = {0x3FF0000000000000L, 0xBFE0000000000000L, 0x421BF08EB0000000L, 0x0000000000000000L,
            0xFFEFFFFFFFFFFFFFL, 0x3E90C6F7A0B5ED8DL, 0x416312D000000000L, 0x416312CFE0000000L, 0x8000000000000001L};
        for (int i = 0; i < w.length; i++) {
            assertBits(w[i], model.coefficient(i / 3, i % 3), "w " + (i / 3) + " " + (i % 3));
        }
    }

    @Test
    void writingTheGoldenModelsReproducesTheFilesByteForByte() throws IOException {
        for (String name : new String[]{"golden-linear-v1.txt", "golden-multiclass-v1.txt"}) {
            String golden = resource(name);
            SavedModel m = ModelFile.defaults().read(new StringReader(golden));
            StringWriter out = new StringWriter();
            ModelFile.defaults().write(m, out);
            assertEquals(golden, out.toString(), name);
        }
    }
}
