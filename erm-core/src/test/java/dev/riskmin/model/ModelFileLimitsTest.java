package dev.riskmin.model;

import dev.riskmin.loss.Response;
import dev.riskmin.testing.Cases;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.function.Executable;
import org.junit.jupiter.api.io.TempDir;

import java.io.IOException;
import java.io.RandomAccessFile;
import java.io.Reader;
import java.io.StringReader;
import java.io.StringWriter;
import java.lang.management.ManagementFactory;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.stream.Collectors;
import java.util.stream.Stream;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

/**
 * Oversized inputs are refused early, naming the size and the limit, and a declared size is
 * checked before any storage is allocated. Allocation is measured with the HotSpot per-thread
 * allocation counter (com.sun.management.ThreadMXBean).
 */
class ModelFileLimitsTest {

    private static final String LINEAR_HEAD = "riskmin-model 1\nkind = linear\nloss = \"squared\"\nresponse = identity\n";

    private static String messageOf(Executable e) {
        return assertThrows(IllegalArgumentException.class, e).getMessage();
    }

    private static void assertContains(String message, String... fragments) {
        for (String f : fragments) {
            assertTrue(message.contains(f), () -> "message \"" + message + "\" should contain \"" + f + "\"");
        }
    }

    /** Bytes allocated by this thread while running the action, or −1 where the JVM cannot count. */
    private static long allocatedBy(Runnable action) {
        java.lang.management.ThreadMXBean bean = ManagementFactory.getThreadMXBean();
        if (!(bean instanceof com.sun.management.ThreadMXBean)) {
            action.run();
            return -1;
        }
        com.sun.management.ThreadMXBean counter = (com.sun.management.ThreadMXBean) bean;
        long id = Thread.currentThread().getId();
        long before = counter.getThreadAllocatedBytes(id);
        action.run();
        return counter.getThreadAllocatedBytes(id) - before;
    }

    /** Runs the read, which must be refused; returns {message, allocated bytes, elapsed ms}. */
    private static Object[] refusal(ModelFile format, String text) {
        String[] message = new String[1];
        long start = System.nanoTime();
        long allocated = allocatedBy(() -> message[0] = messageOf(() -> format.read(new StringReader(text))));
        long ms = (System.nanoTime() - start) / 1_000_000;
        return new Object[]{message[0], allocated, ms};
    }

    @Test
    void defaultLimitsAreTheDocumentedOnes() {
        assertEquals(1L << 30, ModelFile.defaults().maxBytes());
        assertEquals(1L << 26, ModelFile.defaults().maxParameters());
        assertEquals(1 << 16, ModelFile.defaults().maxLineLength());
    }

    @Test
    void twoBillionFeaturesAreRefusedQuicklyWithoutAllocating() {
        String text = LINEAR_HEAD + "dimension = 2000000000\nintercept = 0.0\nw 0 = 1.0\n";
        Object[] r = refusal(ModelFile.defaults(), text);
        assertContains((String) r[0], "line 5: ", "dimension 2000000000", "maxParameters (67108864)",
                "refused before allocating");
        long allocated = (long) r[1];
        assertTrue(allocated < (1 << 20), "allocated " + allocated + " bytes");
        assertTrue((long) r[2] < 1000, "took " + r[2] + " ms");
    }

    /** A declared size within the limits reserves nothing up front: storage grows with the lines read. */
    @Test
    void declaredSizeWithinTheLimitAllocatesOnlyWhatIsRead() {
        String text = LINEAR_HEAD + "dimension = 60000000\nintercept = 0.0\nw 0 = 1.0\nw 1 = 2.0\nw 2 = 3.0\n";
        Object[] r = refusal(ModelFile.defaults(), text);
        assertContains((String) r[0], "line 10: ", "w 3 = <number> (coefficient 4 of 60000000)", "truncated");
        long allocated = (long) r[1];
        assumeTrue(allocated >= 0, "no allocation counter in this JVM");
        assertTrue(allocated < (1 << 20), "allocated " + allocated + " bytes; 60,000,000 doubles would be 480 MB");
    }

    @Test
    void classesTimesDimensionOverTheLimitAreRefusedNamingTheProduct() {
        String text = "riskmin-model 1\nkind = multiclass\nloss = \"softmax-cross-entropy\"\nresponse = softmax\n"
                + "dimension = 100000\nclasses = 100000\n";
        Object[] r = refusal(ModelFile.defaults(), text);
        assertContains((String) r[0], "line 6: ", "100000 classes with dimension 100000 need 100000 x 100001 parameters",
                "maxParameters (67108864)");
        assertTrue((long) r[1] < (1 << 20), "allocated " + r[1] + " bytes");
    }

    @Test
    void dimensionBeyondEveryIntegerTypeIsRefusedNamingTheLimit() {
        String m = messageOf(() -> ModelFile.defaults().read(new StringReader(LINEAR_HEAD
                + "dimension = 1000000000000000000000000000000\n")));
        assertContains(m, "line 5: ", "dimension 1000000000000000000000000000000", "maxParameters (67108864)");
    }

    @Test
    void configuredParameterLimitIsEnforcedExactly() throws IOException {
        ModelFile format = ModelFile.defaults().withMaxParameters(100);
        String m = messageOf(() -> format.read(new StringReader(LINEAR_HEAD + "dimension = 100\n")));
        assertContains(m, "line 5: ", "needs at least 101 parameters", "maxParameters (100)");
        LinearModel fits = LinearModel.of(new double[99], 1, Response.IDENTITY, "squared");
        StringWriter out = new StringWriter();
        format.write(fits, out);
        assertEquals(99, format.readLinear(new StringReader(out.toString())).dimension());
    }

    @Test
    void tenGigabyteFileIsRefusedBeforeItIsRead(@TempDir Path dir) throws IOException {
        Path file = dir.resolve("huge.txt");
        try (RandomAccessFile f = new RandomAccessFile(file.toFile(), "rw")) {
            f.setLength(10L << 30); // sparse: no data blocks are written
        }
        try {
            long start = System.nanoTime();
            String m = messageOf(() -> ModelFile.defaults().read(file));
            long ms = (System.nanoTime() - start) / 1_000_000;
            assertContains(m, "10737418240 bytes", "maxBytes (1073741824)", "refused without reading it");
            assertTrue(ms < 1000, "took " + ms + " ms");
        } finally {
            Files.delete(file);
        }
    }

    /** A reader that serves a head and then the same chunk forever, counting what it served. */
    private static final class Endless extends Reader {
        private final String head;
        private final String chunk;
        private long served;
        private long line;

        Endless(String head, String chunk) {
            this.head = head;
            this.chunk = chunk;
        }

        @Override
        public int read(char[] buffer, int offset, int length) {
            String next = served < head.length() ? head.substring((int) served)
                    : chunk.replace("#", Long.toString(line++));
            int n = Math.min(length, next.length());
            next.getChars(0, n, buffer, offset);
            served += n;
            return n;
        }

        @Override
        public void close() {
        }
    }

    @Test
    void endlessInputIsRefusedAtTheByteLimit() {
        Endless in = new Endless(LINEAR_HEAD + "dimension = 60000000\nintercept = 0.0\n", "w # = 1.0\n");
        ModelFile format = ModelFile.defaults().withMaxBytes(1 << 20);
        String m = messageOf(() -> format.read(in));
        assertContains(m, "the input exceeds maxBytes (1048576)", "refused without reading further");
        assertTrue(m.matches("(?s)line \\d+: .*"), m);
        assertTrue(in.served <= (1 << 20) + 8192, "served " + in.served + " characters");
    }

    @Test
    void endlessLineIsRefusedAtTheLineLimit() {
        Endless in = new Endless("riskmin-model 1\nkind = linear\nloss = \"", "xxxxxxxxxxxxxxxx");
        String m = messageOf(() -> ModelFile.defaults().read(in));
        assertContains(m, "line 3: ", "the line exceeds maxLineLength (65536 characters)", "loss = \"xxxx",
                "(65536 characters)");
        assertTrue(in.served <= (1 << 16) + 8192 + 64, "served " + in.served + " characters");
    }

    @Test
    void fileOverAConfiguredByteLimitIsRefusedNamingBoth(@TempDir Path dir) throws IOException {
        SavedModel model = SavedModel.of(LinearModel.of(RandomModels.values(Cases.rng(5L), 100), 0.5, Response.IDENTITY,
                "squared"));
        String text = RandomModels.written(model);
        ModelFile format = ModelFile.defaults().withMaxBytes(1000);
        String m = messageOf(() -> format.read(new StringReader(text)));
        assertContains(m, "exceeds maxBytes (1000)");
        assertTrue(m.matches("(?s)line \\d+: .*"), m);
        Path file = dir.resolve("m.txt");
        Files.writeString(file, text);
        String n = messageOf(() -> format.read(file));
        assertContains(n, "the file has " + text.length() + " bytes, over maxBytes (1000)");
    }

    @Test
    void writerRefusesModelsOverItsLimitsAndLeavesTheTargetUntouched(@TempDir Path dir) throws IOException {
        LinearModel ten = LinearModel.of(new double[10], 0, Response.IDENTITY, "squared");
        assertContains(messageOf(() -> ModelFile.defaults().withMaxParameters(10).write(ten, new StringWriter())),
                "the model has 11 parameters, over maxParameters (10)");
        SavedModel noted = SavedModel.of(ten).withNote("n".repeat(200));
        assertContains(messageOf(() -> ModelFile.defaults().withMaxLineLength(128).write(noted, new StringWriter())),
                "the note line has 209 characters, over maxLineLength (128)");
        assertContains(messageOf(() -> ModelFile.defaults().withMaxBytes(100).write(ten, new StringWriter())),
                "the file would exceed maxBytes (100) at line");
        Path file = dir.resolve("model.txt");
        Files.writeString(file, "old");
        assertContains(messageOf(() -> ModelFile.defaults().withMaxBytes(100).write(ten, file)), "maxBytes (100)");
        assertEquals("old", Files.readString(file));
        try (Stream<Path> files = Files.list(dir)) {
            assertEquals(List.of("model.txt"), files.map(p -> p.getFileName().toString()).collect(Collectors.toList()));
        }
    }

    /** Limits equal to the file's own size, line length and parameter count admit it: the bounds are inclusive. */
    @Test
    void formatReadsWhatItWritesAtExactlyItsLimits(@TempDir Path dir) throws IOException {
        SavedModel model = SavedModel.of(MulticlassModel.of(RandomModels.values(Cases.rng(9L), 12), new double[3], 4,
                Response.SOFTMAX, "softmax-cross-entropy")).withNote("x".repeat(150));
        String text = RandomModels.written(model);
        int longest = Stream.of(text.split("\n")).mapToInt(String::length).max().orElseThrow();
        ModelFile exact = ModelFile.defaults().withMaxBytes(text.length()).withMaxLineLength(longest)
                .withMaxParameters(15);
        StringWriter out = new StringWriter();
        exact.write(model, out);
        assertEquals(text, out.toString());
        assertEquals(model, exact.read(new StringReader(text)));
        Path file = dir.resolve("m.txt");
        exact.write(model, file);
        assertEquals(model, exact.read(file));
        assertContains(messageOf(() -> exact.withMaxBytes(text.length() - 1).read(new StringReader(text))), "maxBytes");
        assertContains(messageOf(() -> exact.withMaxLineLength(longest - 1).read(new StringReader(text))),
                "maxLineLength");
        assertContains(messageOf(() -> exact.withMaxParameters(14).read(new StringReader(text))), "maxParameters (14)");
    }

    @Test
    void limitsAreValidatedNamingTheOptionAndValue() {
        assertContains(messageOf(() -> ModelFile.defaults().withMaxBytes(0)), "maxBytes (0)");
        assertContains(messageOf(() -> ModelFile.defaults().withMaxParameters(0)), "maxParameters (0)");
        assertContains(messageOf(() -> ModelFile.defaults().withMaxParameters(1L << 31)), "maxParameters (2147483648)");
        assertContains(messageOf(() -> ModelFile.defaults().withMaxLineLength(127)), "maxLineLength (127)", ">= 128");
    }
}
