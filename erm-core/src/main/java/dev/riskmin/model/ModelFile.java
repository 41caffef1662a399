package dev.riskmin.model;

import dev.riskmin.loss.Response;
import dev.riskmin.util.Arguments;

import java.io.BufferedWriter;
import java.io.IOException;
import java.io.InputStream;
import java.io.InputStreamReader;
import java.io.Reader;
import java.io.Writer;
import java.math.BigDecimal;
import java.math.MathContext;
import java.math.RoundingMode;
import java.nio.channels.Channels;
import java.nio.channels.FileChannel;
import java.nio.charset.StandardCharsets;
import java.nio.file.AtomicMoveNotSupportedException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.nio.file.StandardOpenOption;
import java.time.DateTimeException;
import java.time.Instant;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.concurrent.ThreadLocalRandom;
import java.util.zip.CRC32;

/**
 * Reads and writes fitted models in this library's own line-oriented text format, version
 * {@value #VERSION} (grammar, example and versioning rule in {@code docs/model-format.md}):
 * <pre>
 *   riskmin-model 1
 *   kind = linear
 *   loss = "logistic"
 *   response = logistic
 *   dimension = 2
 *   classes = 2
 *   intercept = -0.5
 *   w 0 = 1.25
 *   w 1 = -3.0E-4
 *   checksum = crc32:&lt;8 hex digits&gt;
 * </pre>
 *
 * <p><b>Guarantees.</b>
 * <ul>
 *   <li><i>Bit-exact round trip.</i> Each parameter is written as a decimal that reads back to the
 *       same double: {@link Double#toString(double)} when it does, else the value rounded to 17
 *       significant digits, which always does, since any binary64 value is fixed by 17 digits
 *       under correctly rounded conversion in both directions (D. W. Matula, "In-and-out
 *       conversions", Comm. ACM 11(1), 1968, 47–50; IEEE 754-2008 §5.12.2; both from memory).
 *       {@link Double#parseDouble} rounds correctly (W. D. Clinger, "How to read floating point
 *       numbers accurately", PLDI 1990, from memory), so any reader with a correctly rounded
 *       decimal parser gets the same bits. −0.0 and subnormals survive.</li>
 *   <li><i>Corruption and truncation are detected.</i> The last line carries the CRC-32 of every
 *       byte before it (the ISO 3309 / ITU-T V.42 polynomial 0x04C11DB7, reflected, as computed by
 *       {@link CRC32}). A CRC of degree 32 detects every error burst of at most 32 bits and misses
 *       other corruption with probability about 2<sup>−32</sup> (W. W. Peterson and D. T. Brown,
 *       "Cyclic codes for error detection", Proc. IRE 49(1), 1961, 228–235, from memory). A file
 *       cut anywhere lacks its checksum line or the line feed that ends it and is refused.</li>
 *   <li><i>Strict.</i> Every deviation from the grammar — bad magic, an unsupported version, an
 *       unknown, repeated, missing or misplaced key, a wrong count, an index out of range or out of
 *       order, a non-finite or malformed number, a character outside printable ASCII, text after
 *       the checksum line, a checksum mismatch — is an {@link IllegalArgumentException} whose
 *       message starts {@code "line N: "} and quotes the offending line (cut to 80 characters).</li>
 *   <li><i>Bounded.</i> Input beyond {@link #maxBytes()}, a line beyond {@link #maxLineLength()} or
 *       a declared model beyond {@link #maxParameters()} is refused as soon as it is seen, naming
 *       the limit; the declared sizes are checked before anything is allocated, and storage then
 *       grows with the lines actually read, so memory stays proportional to the input. Reading
 *       takes time linear in the input.</li>
 *   <li><i>Data only.</i> Reading builds doubles, strings and enum constants from a fixed table;
 *       it never uses Java serialization and never looks up a class, method or resource by a name
 *       from the file.</li>
 * </ul>
 *
 * <p>A {@code ModelFile} is an immutable, thread-safe configuration of limits; the writer checks
 * the same limits, so an instance reads everything it writes. IO failures of the underlying
 * stream surface as {@link IOException}; malformed content never does.
 */
public final class ModelFile {

    /** The format version this class writes; it reads this version only. */
    public static final int VERSION = 1;

    /** The word the first line starts with. */
    public static final String MAGIC = "riskmin-model";

    /** Default {@link #maxBytes()}: 1 GiB. */
    public static final long DEFAULT_MAX_BYTES = 1L << 30;

    /** Default {@link #maxParameters()}: 2<sup>26</sup> = 67,108,864 (512 MiB of doubles). */
    public static final long DEFAULT_MAX_PARAMETERS = 1L << 26;

    /** Default {@link #maxLineLength()}: 65,536 characters. */
    public static final int DEFAULT_MAX_LINE_LENGTH = 1 << 16;

    /** No model holds more parameters than the largest Java array. */
    static final long PARAMETER_CEILING = Integer.MAX_VALUE - 8;

    /** Every fixed-form line (a parameter with two indices and a 24-character decimal) fits. */
    static final int MIN_LINE_LENGTH = 128;

    private static final String PREFIX = MAGIC + " ";
    private static final int MAX_NUMBER_LENGTH = 128;
    private static final int MAX_INSTANT_LENGTH = 64;
    private static final int EXCERPT_LENGTH = 80;
    private static final Set<String> KEYS = Set.of("kind", "loss", "response", "dimension", "classes", "label",
            "standardized", "created", "note", "intercept", "w", "checksum");
    private static final String[] OPTIONAL_KEYS = {"standardized", "created", "note"};
    private static final String TRUNCATED = " (the file ends inside this line: truncated?)";

    private static final ModelFile DEFAULTS = new ModelFile(DEFAULT_MAX_BYTES, DEFAULT_MAX_PARAMETERS,
            DEFAULT_MAX_LINE_LENGTH);

    private final long maxBytes;
    private final long maxParameters;
    private final int maxLineLength;

    private ModelFile(long maxBytes, long maxParameters, int maxLineLength) {
        this.maxBytes = maxBytes;
        this.maxParameters = maxParameters;
        this.maxLineLength = maxLineLength;
    }

    /** @return the format with the default limits */
    public static ModelFile defaults() {
        return DEFAULTS;
    }

    /**
     * @param value the most bytes a file may have, including line feeds; ≥ 1
     * @throws IllegalArgumentException naming maxBytes if value &lt; 1
     */
    public ModelFile withMaxBytes(long value) {
        return new ModelFile(Arguments.positive("maxBytes", value), maxParameters, maxLineLength);
    }

    /**
     * @param value the most parameters a model may have, K·(d + 1) (K = 1 for a linear model); in
     *              [1, 2<sup>31</sup> − 9]
     * @throws IllegalArgumentException naming maxParameters if value is outside that range
     */
    public ModelFile withMaxParameters(long value) {
        if (value < 1 || value > PARAMETER_CEILING) {
            throw new IllegalArgumentException("maxParameters (" + value + ") must be in [1, " + PARAMETER_CEILING
                    + "]");
        }
        return new ModelFile(maxBytes, value, maxLineLength);
    }

    /**
     * @param value the most characters a line may have, without its line feed; ≥ {@value #MIN_LINE_LENGTH}
     * @throws IllegalArgumentException naming maxLineLength if value is smaller
     */
    public ModelFile withMaxLineLength(int value) {
        if (value < MIN_LINE_LENGTH) {
            throw new IllegalArgumentException("maxLineLength (" + value + ") must be >= " + MIN_LINE_LENGTH);
        }
        return new ModelFile(maxBytes, maxParameters, value);
    }

    public long maxBytes() {
        return maxBytes;
    }

    public long maxParameters() {
        return maxParameters;
    }

    public int maxLineLength() {
        return maxLineLength;
    }

    // ---------------------------------------------------------------------------------------------
    // Writing

    /** Writes {@code SavedModel.of(model)}; see {@link #write(SavedModel, Path)}. */
    public void write(LinearModel model, Path file) throws IOException {
        write(SavedModel.of(model), file);
    }

    /** Writes {@code SavedModel.of(model)}; see {@link #write(SavedModel, Path)}. */
    public void write(MulticlassModel model, Path file) throws IOException {
        write(SavedModel.of(model), file);
    }

    /** Writes {@code SavedModel.of(model)}; see {@link #write(SavedModel, Writer)}. */
    public void write(LinearModel model, Writer out) throws IOException {
        write(SavedModel.of(model), out);
    }

    /** Writes {@code SavedModel.of(model)}; see {@link #write(SavedModel, Writer)}. */
    public void write(MulticlassModel model, Writer out) throws IOException {
        write(SavedModel.of(model), out);
    }

    /**
     * Writes the model to a file, replacing it if it exists. The content goes to a new file beside
     * the target, is forced to the device, and is then renamed over the target (atomically where the
     * file system can), so a reader sees the old file or the complete new one, never a partial one.
     *
     * @throws IllegalArgumentException if the model exceeds a limit (naming it); the target is untouched
     * @throws IOException              if the file cannot be written; the target is untouched
     */
    public void write(SavedModel model, Path file) throws IOException {
        Arguments.notNull("model", model);
        Arguments.notNull("file", file);
        Path target = file.toAbsolutePath();
        Path temporary = target.resolveSibling(target.getFileName() + ".tmp-"
                + Long.toHexString(ThreadLocalRandom.current().nextLong()));
        try {
            try (FileChannel channel = FileChannel.open(temporary, StandardOpenOption.CREATE_NEW,
                    StandardOpenOption.WRITE)) {
                Writer out = new BufferedWriter(Channels.newWriter(channel, StandardCharsets.US_ASCII.newEncoder(),
                        1 << 16));
                write(model, out);
                channel.force(true);
            }
            try {
                Files.move(temporary, target, StandardCopyOption.ATOMIC_MOVE, StandardCopyOption.REPLACE_EXISTING);
            } catch (AtomicMoveNotSupportedException e) {
                Files.move(temporary, target, StandardCopyOption.REPLACE_EXISTING);
            }
        } catch (IOException | RuntimeException | Error e) {
            try {
                Files.deleteIfExists(temporary);
            } catch (IOException suppressed) {
                e.addSuppressed(suppressed);
            }
            throw e;
        }
    }

    /**
     * Writes the model as printable ASCII lines ending in line feeds (so the bytes are the same in
     * any ASCII-compatible charset), then flushes; the writer stays open. If a limit is exceeded
     * part-way, the output so far lacks its checksum line, and every reader refuses it.
     *
     * @throws IllegalArgumentException if the model has more than {@link #maxParameters()}
     *                                  parameters, a line would exceed {@link #maxLineLength()} or the
     *                                  file {@link #maxBytes()} (each named)
     */
    public void write(SavedModel model, Writer out) throws IOException {
        Arguments.notNull("model", model);
        Arguments.notNull("out", out);
        boolean multi = model.kind() == SavedModel.Kind.MULTICLASS;
        int d = model.dimension();
        int blocks = multi ? model.classCount() : 1;
        long parameters = (long) blocks * (d + 1L);
        if (parameters > maxParameters) {
            throw new IllegalArgumentException("the model has " + parameters + " parameters, over maxParameters ("
                    + maxParameters + ")");
        }
        Emitter e = new Emitter(out);
        e.line(PREFIX + VERSION, "header");
        e.line("kind = " + (multi ? "multiclass" : "linear"), "kind");
        e.line("loss = " + quote(model.lossName()), "loss");
        e.line("response = " + responseName(model.response()), "response");
        e.line("dimension = " + d, "dimension");
        int classes = model.classCount();
        if (classes > 0) {
            e.line("classes = " + classes, "classes");
            List<String> names = model.classNames();
            for (int c = 0; c < names.size(); c++) {
                e.line("label " + c + " = " + quote(names.get(c)), "label " + c);
            }
        }
        if (model.standardized().isPresent()) {
            e.line("standardized = " + model.standardized().get(), "standardized");
        }
        if (model.created().isPresent()) {
            e.line("created = " + model.created().get(), "created");
        }
        if (model.note().isPresent()) {
            e.line("note = " + quote(model.note().get()), "note");
        }
        for (int k = 0; k < blocks; k++) {
            e.line((multi ? "intercept " + k : "intercept") + " = " + decimal(model.intercept(k)), "intercept");
        }
        StringBuilder sb = new StringBuilder(64);
        for (int k = 0; k < blocks; k++) {
            for (int j = 0; j < d; j++) {
                sb.setLength(0);
                sb.append("w ");
                if (multi) {
                    sb.append(k).append(' ');
                }
                sb.append(j).append(" = ").append(decimal(model.coefficient(k, j)));
                e.line(sb, "coefficient");
            }
        }
        e.checksum();
        out.flush();
    }

    /** Writes lines, counting bytes against the limits and feeding every byte to the CRC. */
    private final class Emitter {
        private final Writer out;
        private final CRC32 crc = new CRC32();
        private byte[] bytes = new byte[256];
        private long written;
        private int lines;

        Emitter(Writer out) {
            this.out = out;
        }

        void line(CharSequence text, String what) throws IOException {
            int n = text.length();
            if (n > maxLineLength) {
                throw new IllegalArgumentException("the " + what + " line has " + n + " characters, over maxLineLength ("
                        + maxLineLength + ")");
            }
            emit(text, true);
        }

        void checksum() throws IOException {
            emit("checksum = crc32:" + hex8(crc.getValue()), false);
        }

        private void emit(CharSequence text, boolean counted) throws IOException {
            int n = text.length();
            lines++;
            written += n + 1;
            if (written > maxBytes) {
                throw new IllegalArgumentException("the file would exceed maxBytes (" + maxBytes + ") at line " + lines);
            }
            if (counted) {
                if (bytes.length < n + 1) {
                    bytes = new byte[Math.max(n + 1, 2 * bytes.length)];
                }
                for (int i = 0; i < n; i++) {
                    bytes[i] = (byte) text.charAt(i); // printable ASCII by construction
                }
                bytes[n] = '\n';
                crc.update(bytes, 0, n + 1);
            }
            out.append(text).append('\n');
        }
    }

    /**
     * @return a decimal that {@link Double#parseDouble} maps back to exactly v: the shortest-style
     * {@link Double#toString} when it round-trips, else {@link #seventeenDigits}
     */
    static String decimal(double v) {
        String s = Double.toString(v);
        if (Double.doubleToRawLongBits(Double.parseDouble(s)) == Double.doubleToRawLongBits(v)) {
            return s;
        }
        return seventeenDigits(v);
    }

    /** @return v rounded half-even to 17 significant digits, as d.dddddddddddddddE±x (v finite) */
    static String seventeenDigits(double v) {
        if (v == 0) {
            return Double.doubleToRawLongBits(v) < 0 ? "-0.0" : "0.0";
        }
        BigDecimal rounded = new BigDecimal(v).round(new MathContext(17, RoundingMode.HALF_EVEN));
        String digits = rounded.unscaledValue().abs().toString();
        long exponent = digits.length() - 1L - rounded.scale();
        StringBuilder sb = new StringBuilder(26);
        if (v < 0) {
            sb.append('-');
        }
        sb.append(digits.charAt(0)).append('.');
        sb.append(digits.length() > 1 ? digits.substring(1) : "0");
        return sb.append('E').append(exponent).toString();
    }

    /** Quotes s, escaping '"' and '\' and writing every character outside printable ASCII as \\uXXXX. */
    static String quote(String s) {
        StringBuilder sb = new StringBuilder(s.length() + 2).append('"');
        for (int i = 0; i < s.length(); i++) {
            char c = s.charAt(i);
            if (c == '"' || c == '\\') {
                sb.append('\\').append(c);
            } else if (c >= 0x20 && c <= 0x7e) {
                sb.append(c);
            } else {
                sb.append("\\u");
                for (int shift = 12; shift >= 0; shift -= 4) {
                    sb.append(Character.forDigit((c >> shift) & 0xf, 16));
                }
            }
        }
        return sb.append('"').toString();
    }

    /** The file's names for the responses, fixed by the format rather than by the Java constant names. */
    private static String responseName(Response r) {
        switch (r) {
            case IDENTITY:
                return "identity";
            case EXPONENTIAL:
                return "exponential";
            case LOGISTIC:
                return "logistic";
            case MARGIN:
                return "margin";
            case SOFTMAX:
                return "softmax";
            case ARGMAX:
                return "argmax";
            default:
                throw new IllegalArgumentException("response " + r + " has no name in format version " + VERSION);
        }
    }

    private static Response responseOf(String name) {
        switch (name) {
            case "identity":
                return Response.IDENTITY;
            case "exponential":
                return Response.EXPONENTIAL;
            case "logistic":
                return Response.LOGISTIC;
            case "margin":
                return Response.MARGIN;
            case "softmax":
                return Response.SOFTMAX;
            case "argmax":
                return Response.ARGMAX;
            default:
                return null;
        }
    }

    private static String hex8(long crc) {
        String h = Long.toHexString(crc);
        return "00000000".substring(h.length()) + h;
    }

    // ---------------------------------------------------------------------------------------------
    // Reading

    /**
     * Reads one model; the reader is read to its end (or to the first error) and not closed.
     *
     * @throws IllegalArgumentException if the content is not a valid model file within the limits;
     *                                  the message starts "line N: " and quotes the offending text
     * @throws IOException              if the reader fails
     */
    public SavedModel read(Reader in) throws IOException {
        Arguments.notNull("in", in);
        return new Parser(new Lines(in, "character")).parse();
    }

    /**
     * Reads one model from a file. A file larger than {@link #maxBytes()} is refused before it is
     * opened. Bytes are taken one for one as characters, so any byte outside printable ASCII is
     * refused by its value.
     *
     * @throws IllegalArgumentException as for {@link #read(Reader)}, the message prefixed with the file
     * @throws IOException              if the file cannot be read
     */
    public SavedModel read(Path file) throws IOException {
        Arguments.notNull("file", file);
        long size = Files.size(file);
        if (size > maxBytes) {
            throw new IllegalArgumentException(file + ": the file has " + size + " bytes, over maxBytes (" + maxBytes
                    + "); refused without reading it");
        }
        try (InputStream in = Files.newInputStream(file)) {
            return new Parser(new Lines(new InputStreamReader(in, StandardCharsets.ISO_8859_1), "byte")).parse();
        } catch (IllegalArgumentException e) {
            throw new IllegalArgumentException(file + ": " + e.getMessage(), e);
        }
    }

    /**
     * Reads a single-output model.
     *
     * @throws IllegalArgumentException as for {@link #read(Reader)}, or naming line 2 if the file holds a
     *                                  multiclass model
     */
    public LinearModel readLinear(Reader in) throws IOException {
        return linear(read(in), "");
    }

    /** Reads a single-output model from a file; see {@link #readLinear(Reader)} and {@link #read(Path)}. */
    public LinearModel readLinear(Path file) throws IOException {
        return linear(read(file), file + ": ");
    }

    /**
     * Reads a multiclass model.
     *
     * @throws IllegalArgumentException as for {@link #read(Reader)}, or naming line 2 if the file holds a
     *                                  single-output model
     */
    public MulticlassModel readMulticlass(Reader in) throws IOException {
        return multiclass(read(in), "");
    }

    /** Reads a multiclass model from a file; see {@link #readMulticlass(Reader)} and {@link #read(Path)}. */
    public MulticlassModel readMulticlass(Path file) throws IOException {
        return multiclass(read(file), file + ": ");
    }

    private static LinearModel linear(SavedModel m, String prefix) {
        if (m.kind() != SavedModel.Kind.LINEAR) {
            throw new IllegalArgumentException(prefix + "line 2: the file holds a multiclass model (" + m.classCount()
                    + " classes), not a single-output one; use readMulticlass or read, in \"kind = multiclass\"");
        }
        return m.linear();
    }

    private static MulticlassModel multiclass(SavedModel m, String prefix) {
        if (m.kind() != SavedModel.Kind.MULTICLASS) {
            throw new IllegalArgumentException(prefix + "line 2: the file holds a single-output linear model, not a "
                    + "multiclass one; use readLinear or read, in \"kind = linear\"");
        }
        return m.multiclass();
    }

    static IllegalArgumentException error(int line, String problem, String text) {
        return new IllegalArgumentException("line " + line + ": " + problem
                + (text == null ? "" : ", in " + excerpt(text)));
    }

    /** The text quoted, non-printable characters escaped, cut to {@value #EXCERPT_LENGTH} characters. */
    static String excerpt(String text) {
        int n = Math.min(text.length(), EXCERPT_LENGTH);
        StringBuilder sb = new StringBuilder(n + 32).append('"');
        for (int i = 0; i < n; i++) {
            char c = text.charAt(i);
            if (c >= 0x20 && c <= 0x7e) {
                sb.append(c);
            } else {
                sb.append(String.format("\\u%04x", (int) c));
            }
        }
        if (text.length() > n) {
            return sb.append("...\" (").append(text.length()).append(" characters)").toString();
        }
        return sb.append('"').toString();
    }

    /**
     * Splits a character stream into lines ending in '\n', refusing any character outside
     * printable ASCII, a line over maxLineLength and input over maxBytes as soon as it arrives.
     */
    private final class Lines {
        private final Reader in;
        private final String unit;
        private final char[] buffer = new char[8192];
        private final StringBuilder line = new StringBuilder(128);
        private int position;
        private int length;
        private long count;
        private int number;
        private boolean endedWithLineFeed;
        private boolean exhausted;

        Lines(Reader in, String unit) {
            this.in = in;
            this.unit = unit;
        }

        /** @return the number of the line last returned (1-based) */
        int number() {
            return number;
        }

        /** @return whether the line last returned ended with a line feed */
        boolean endedWithLineFeed() {
            return endedWithLineFeed;
        }

        /** @return the next line without its line feed, or null at the end of the input */
        String next() throws IOException {
            line.setLength(0);
            while (true) {
                if (position == length) {
                    if (exhausted || !fill()) {
                        if (line.length() == 0) {
                            return null;
                        }
                        number++;
                        endedWithLineFeed = false;
                        return line.toString();
                    }
                }
                char c = buffer[position++];
                if (++count > maxBytes) {
                    throw error(number + 1, "the input exceeds maxBytes (" + maxBytes + "); refused without reading further",
                            line.toString());
                }
                if (c == '\n') {
                    number++;
                    endedWithLineFeed = true;
                    return line.toString();
                }
                if (number == 0 && line.length() < PREFIX.length() && c != PREFIX.charAt(line.length())) {
                    throw notAModelFile(line.append(c).toString());
                }
                if (c < 0x20 || c > 0x7e) {
                    String what = c == '\r' ? "a carriage return (lines end with a line feed only)"
                            : unit + " 0x" + Integer.toHexString(c) + " (lines hold printable ASCII only; strings write other"
                            + " characters as \\uXXXX)";
                    throw error(number + 1, "column " + (line.length() + 1) + ": " + what,
                            line.append(c).toString());
                }
                if (line.length() == maxLineLength) {
                    throw error(number + 1, "the line exceeds maxLineLength (" + maxLineLength
                            + " characters); refused without reading further", line.toString());
                }
                line.append(c);
            }
        }

        private boolean fill() throws IOException {
            int n;
            do {
                n = in.read(buffer, 0, buffer.length);
            } while (n == 0);
            if (n < 0) {
                exhausted = true;
                return false;
            }
            position = 0;
            length = n;
            return true;
        }
    }

    private static IllegalArgumentException notAModelFile(String firstLine) {
        return error(1, "not a riskmin model file: the first line must be \"" + PREFIX + "<version>\"", firstLine);
    }

    /** One "key index… = value" line. */
    private static final class Entry {
        final int line;
        final String text;
        final String key;
        final String[] indices;
        final String value;
        final int valueColumn;
        final boolean complete;

        Entry(int line, String text, String key, String[] indices, String value, int valueColumn, boolean complete) {
            this.line = line;
            this.text = text;
            this.key = key;
            this.indices = indices;
            this.value = value;
            this.valueColumn = valueColumn;
            this.complete = complete;
        }
    }

    /** A double array that grows with the values read, up to the declared count. */
    private static final class Values {
        private final int capacity;
        private double[] data;
        private int size;

        Values(long capacity) {
            this.capacity = (int) capacity;
            this.data = new double[(int) Math.min(capacity, 1024)];
        }

        void add(double v) {
            if (size == data.length) {
                data = Arrays.copyOf(data, (int) Math.min(capacity, 2L * data.length));
            }
            data[size++] = v;
        }

        double[] toArray() {
            return size == data.length ? data : Arrays.copyOf(data, size);
        }
    }

    /**
     * One pass over the lines in the fixed order of the grammar. Each step reads the lines it owns;
     * {@code e} holds the entry under examination, which may be the look-ahead left by the step before.
     */
    private final class Parser {
        private final Lines lines;
        private final CRC32 crc = new CRC32();
        private final Map<String, Integer> seen = new HashMap<>();
        private byte[] bytes = new byte[256];
        private long crcBefore;
        private String previous;
        private Entry e;

        private boolean multi;
        private String lossName;
        private Response response;
        private int dimension;
        private int classes;
        private int blocks;
        private List<String> names = List.of();
        private Boolean standardized;
        private Instant created;
        private String note;
        private int stage;

        Parser(Lines lines) {
            this.lines = lines;
        }

        SavedModel parse() throws IOException {
            header();
            shape();
            next(optionalForm(classes > 0, 0));
            labels();
            metadata();
            double[] intercepts = intercepts();
            double[] coefficients = coefficients();
            end();
            SavedModel model = multi
                    ? SavedModel.of(MulticlassModel.of(coefficients, intercepts, dimension, response, lossName))
                    : SavedModel.of(LinearModel.of(coefficients, intercepts[0], response, lossName));
            if (!names.isEmpty()) {
                model = model.withClassNames(names);
            }
            if (standardized != null) {
                model = model.withStandardized(standardized);
            }
            return model.withCreated(created).withNote(note);
        }

        /** kind, loss, response, dimension and (classifiers) classes; sizes are checked before any allocation. */
        private void shape() throws IOException {
            String form = "kind = linear|multiclass";
            expect(next(form), "kind", 0, form);
            if (e.value.equals("linear")) {
                multi = false;
            } else if (e.value.equals("multiclass")) {
                multi = true;
            } else {
                throw fail(e, "unknown kind \"" + e.value + "\"; expected linear or multiclass");
            }

            form = "loss = \"<name>\"";
            expect(next(form), "loss", 0, form);
            lossName = string(e);

            form = multi ? "response = softmax|argmax" : "response = identity|exponential|logistic|margin";
            expect(next(form), "response", 0, form);
            response = responseOf(e.value);
            if (response == null) {
                throw fail(e, "unknown response \"" + e.value + "\"; a " + (multi ? "multiclass" : "linear")
                        + " model has " + (multi ? "softmax or argmax" : "identity, exponential, logistic or margin"));
            }
            boolean multiResponse = response == Response.SOFTMAX || response == Response.ARGMAX;
            if (multiResponse != multi) {
                throw fail(e, "response " + e.value + " belongs to a " + (multiResponse ? "multiclass" : "linear")
                        + " model, but line 2 says kind = " + (multi ? "multiclass" : "linear"));
            }

            form = "dimension = <d>";
            expect(next(form), "dimension", 0, form);
            long d = count(e, "dimension");
            if (d + 1 > maxParameters) {
                throw fail(e, "dimension " + d + " needs at least " + (d + 1) + " parameters, over the limit "
                        + "maxParameters (" + maxParameters + "); refused before allocating");
            }
            dimension = (int) d;
            blocks = 1;
            if (!multi && response != Response.LOGISTIC && response != Response.MARGIN) {
                return;
            }
            form = "classes = <K>";
            expect(next(form), "classes", 0, form);
            long k = count(e, "classes");
            if (!multi && k != 2) {
                throw fail(e, "a binary classifier (response " + responseName(response) + ") has classes = 2, not " + k);
            }
            if (k < 2) {
                throw fail(e, "classes (" + k + ") must be >= 2");
            }
            if (multi && k > maxParameters / (d + 1)) {
                throw fail(e, k + " classes with dimension " + d + " need " + k + " x " + (d + 1) + " parameters, over"
                        + " the limit maxParameters (" + maxParameters + "); refused before allocating");
            }
            classes = (int) k;
            blocks = multi ? classes : 1;
        }

        /** The optional names of all labels, in label order, distinct. */
        private void labels() throws IOException {
            if (classes == 0 || !e.key.equals("label")) {
                return;
            }
            List<String> found = new ArrayList<>(Math.min(classes, 1024));
            Map<String, Integer> first = new HashMap<>();
            for (int c = 0; c < classes; c++) {
                String form = "label " + c + " = \"<name>\" (label " + (c + 1) + " of " + classes + ")";
                if (c > 0) {
                    next(form);
                }
                expect(e, "label", 1, form);
                sequence(e, new long[]{classes}, c, 1, "class");
                String name = string(e);
                Integer earlier = first.putIfAbsent(name, c);
                if (earlier != null) {
                    throw fail(e, "label name " + quote(name) + " repeats the name of label " + earlier);
                }
                found.add(name);
            }
            names = List.copyOf(found);
            next(optionalForm(false, 0));
        }

        /** The optional standardized, created and note lines, each at most once, in that order. */
        private void metadata() throws IOException {
            while (true) {
                int o = Arrays.asList(OPTIONAL_KEYS).indexOf(e.key);
                if (o < 0) {
                    return;
                }
                if (o < stage && !seen.containsKey(e.key)) {
                    throw fail(e, "key \"" + e.key + "\" is out of place: the optional lines come in the order "
                            + String.join(", ", OPTIONAL_KEYS));
                }
                if (o < stage || e.indices.length != 0) {
                    throw unexpected(e, optionalForm(false, stage));
                }
                expect(e, OPTIONAL_KEYS[o], 0, "");
                if (o == 0) {
                    if (!e.value.equals("true") && !e.value.equals("false")) {
                        throw fail(e, "standardized must be true or false");
                    }
                    standardized = e.value.equals("true");
                } else if (o == 1) {
                    created = instant(e);
                } else {
                    note = string(e);
                }
                stage = o + 1;
                next(optionalForm(false, stage));
            }
        }

        private double[] intercepts() throws IOException {
            Values values = new Values(blocks);
            for (int k = 0; k < blocks; k++) {
                String form = multi ? "intercept " + k + " = <number> (intercept " + (k + 1) + " of " + blocks + ")"
                        : "intercept = <number>";
                if (k > 0) {
                    next(form);
                }
                if (!e.key.equals("intercept")) {
                    throw unexpected(e, k == 0 ? optionalForm(false, stage) : form);
                }
                expect(e, "intercept", multi ? 1 : 0, form);
                if (multi) {
                    sequence(e, new long[]{classes}, k, 1, "class");
                }
                values.add(number(e));
            }
            return values.toArray();
        }

        /** Row-major: class k's coefficients for features 0 … d−1, then class k + 1's. */
        private double[] coefficients() throws IOException {
            long total = (long) blocks * dimension;
            Values values = new Values(total);
            long[] bounds = multi ? new long[]{classes, dimension} : new long[]{dimension};
            String[] indexNames = multi ? new String[]{"class", "feature"} : new String[]{"feature"};
            for (long p = 0; p < total; p++) {
                String form = "w " + (multi ? (p / dimension) + " " + (p % dimension) : String.valueOf(p))
                        + " = <number> (coefficient " + (p + 1) + " of " + total + ")";
                expect(next(form), "w", multi ? 2 : 1, form);
                sequence(e, bounds, p, dimension, indexNames);
                values.add(number(e));
            }
            return values.toArray();
        }

        /** The checksum line, its line feed, and nothing after. */
        private void end() throws IOException {
            String form = "checksum = crc32:<8 hex digits>";
            next(form);
            if (e.key.equals("w")) {
                long total = (long) blocks * dimension;
                throw fail(e, "an extra coefficient line: all " + total + " coefficients (" + (multi ? classes
                        + " classes x dimension " + dimension : "dimension " + dimension) + ") have been read; expected "
                        + form);
            }
            expect(e, "checksum", 0, form);
            checksum(e);
            if (!lines.endedWithLineFeed()) {
                throw error(e.line, "the file ends without the line feed after the checksum line; it is truncated",
                        e.text);
            }
            String extra = lines.next();
            if (extra != null) {
                throw error(lines.number(), "text after the checksum line", extra);
            }
        }

        /** What may come after the classes: the optional lines not yet passed, then the first intercept. */
        private String optionalForm(boolean labels, int from) {
            List<String> keys = new ArrayList<>();
            if (labels) {
                keys.add("label 0");
            }
            keys.addAll(Arrays.asList(OPTIONAL_KEYS).subList(from, OPTIONAL_KEYS.length));
            String first = multi ? "intercept 0 = <number>" : "intercept = <number>";
            return keys.isEmpty() ? first : "an optional " + String.join(", ", keys) + " line or " + first;
        }

        private void header() throws IOException {
            String s = lines.next();
            if (s == null) {
                throw error(1, "the input is empty; expected \"" + PREFIX + VERSION + "\"", null);
            }
            updateCrc(s);
            previous = s;
            if (!s.startsWith(PREFIX)) {
                throw s.equals(MAGIC) ? error(1, "the header names no format version", s) : notAModelFile(s);
            }
            String v = s.substring(PREFIX.length());
            if (!isDigits(v) || (v.length() > 1 && v.charAt(0) == '0')) {
                throw error(1, "the format version \"" + v + "\" is not a positive integer", s);
            }
            if (!v.equals(String.valueOf(VERSION))) {
                throw error(1, "format version " + v + " is not supported; this reader reads version " + VERSION
                        + " only", s);
            }
            if (!lines.endedWithLineFeed()) {
                throw error(1, "the file ends after the header; it is truncated", s);
            }
        }

        /** Reads the next line as an entry into {@code e} and returns it. */
        private Entry next(String expected) throws IOException {
            String s = lines.next();
            if (s == null) {
                if (!lines.endedWithLineFeed()) {
                    // the previous line was cut: name it, not a line that does not exist
                    throw error(lines.number(), "the file ends inside this line, before " + expected
                            + "; it is truncated", previous);
                }
                throw error(lines.number() + 1, "the file ends where " + expected + " was expected; it is truncated",
                        null);
            }
            int n = lines.number();
            previous = s;
            crcBefore = crc.getValue();
            updateCrc(s);
            if (s.isEmpty()) {
                throw error(n, "empty line where " + expected + " was expected", null);
            }
            int eq = s.indexOf(" = ");
            if (eq <= 0) {
                throw error(n, "expected a line \"key = value\" (" + expected + ")" + cut(), s);
            }
            String left = s.substring(0, eq);
            String value = s.substring(eq + 3);
            String[] tokens = left.split(" ", -1);
            for (String t : tokens) {
                if (t.isEmpty()) {
                    throw error(n, "the key has a stray space (keys and indices are separated by one space)", s);
                }
            }
            if (value.isEmpty()) {
                throw error(n, "the value is empty", s);
            }
            if (value.charAt(0) == ' ' || value.charAt(value.length() - 1) == ' ') {
                throw error(n, "the value has a stray space", s);
            }
            e = new Entry(n, s, tokens[0], Arrays.copyOfRange(tokens, 1, tokens.length), value, eq + 3,
                    lines.endedWithLineFeed());
            return e;
        }

        private void updateCrc(String s) {
            int n = s.length();
            if (bytes.length < n + 1) {
                bytes = new byte[Math.max(n + 1, 2 * bytes.length)];
            }
            for (int i = 0; i < n; i++) {
                bytes[i] = (byte) s.charAt(i); // Lines admits printable ASCII only
            }
            bytes[n] = '\n';
            crc.update(bytes, 0, n + 1);
        }

        private void expect(Entry e, String key, int indexCount, String form) {
            if (!e.key.equals(key)) {
                throw unexpected(e, form);
            }
            if (e.indices.length != indexCount) {
                throw fail(e, "\"" + key + "\" takes " + indexCount + (indexCount == 1 ? " index" : " indices")
                        + " here, found " + e.indices.length + "; expected " + form);
            }
            if (indexCount == 0) {
                seen.putIfAbsent(key, e.line);
            }
        }

        private IllegalArgumentException unexpected(Entry e, String form) {
            Integer first = seen.get(e.key);
            if (first != null && e.indices.length == 0) {
                return fail(e, "duplicate key \"" + e.key + "\" (first on line " + first + "); expected " + form);
            }
            if (KEYS.contains(e.key)) {
                return fail(e, "key \"" + e.key + "\" is out of place (a line is missing or out of order); expected "
                        + form);
            }
            return fail(e, "unknown key \"" + e.key + "\"; expected " + form);
        }

        /**
         * Checks that the entry's indices are in range and name position {@code expected} of the
         * row-major order (the last index varies fastest, with stride {@code stride}).
         */
        private void sequence(Entry e, long[] bounds, long expected, long stride, String... names) {
            long flat = 0;
            for (int i = 0; i < bounds.length; i++) {
                long v = index(e, e.indices[i]);
                if (v >= bounds[i]) {
                    throw fail(e, names[i] + " index " + v + " is outside [0, " + bounds[i] + ")");
                }
                flat = i == 0 ? v : flat * stride + v;
            }
            String found = e.key + " " + String.join(" ", e.indices);
            if (flat < expected) {
                throw fail(e, found + " repeats or is out of order; expected " + shown(e.key, expected, bounds.length, stride)
                        + " next");
            }
            if (flat > expected) {
                throw fail(e, found + " comes where " + shown(e.key, expected, bounds.length, stride)
                        + " was expected; a line is missing or out of order");
            }
        }

        private String shown(String key, long position, int indexCount, long stride) {
            return key + " " + (indexCount == 1 ? String.valueOf(position)
                    : (position / stride) + " " + (position % stride));
        }

        private long index(Entry e, String token) {
            if (!isDigits(token) || token.length() > 10 || (token.length() > 1 && token.charAt(0) == '0')) {
                throw fail(e, "index \"" + token + "\" is not a non-negative integer without leading zeros");
            }
            return Long.parseLong(token);
        }

        private long count(Entry e, String name) {
            String v = e.value;
            if (!isDigits(v) || (v.length() > 1 && v.charAt(0) == '0')) {
                throw fail(e, name + " \"" + v + "\" is not a non-negative integer without leading zeros");
            }
            if (v.length() > 18) {
                throw fail(e, name + " " + v + " is over the limit maxParameters (" + maxParameters
                        + "); refused before allocating");
            }
            return Long.parseLong(v);
        }

        private double number(Entry e) {
            String v = e.value;
            if (v.length() > MAX_NUMBER_LENGTH) {
                throw fail(e, "the number has " + v.length() + " characters, more than " + MAX_NUMBER_LENGTH);
            }
            if (!isDecimal(v)) {
                String lower = v.toLowerCase(java.util.Locale.ROOT);
                boolean nonFinite = lower.contains("nan") || lower.contains("inf");
                throw fail(e, "not a decimal number" + (nonFinite ? " (NaN and infinities are not allowed)"
                        : " (expected [-]digits[.digits][E[-]digits])"));
            }
            double x = Double.parseDouble(v);
            if (Double.isInfinite(x)) {
                throw fail(e, v + " overflows a double (|x| > " + Double.MAX_VALUE + ")");
            }
            return x;
        }

        private String string(Entry e) {
            String v = e.value;
            if (v.charAt(0) != '"') {
                throw fail(e, "expected a string in double quotes at column " + (e.valueColumn + 1));
            }
            StringBuilder sb = new StringBuilder(v.length());
            int i = 1;
            while (true) {
                if (i >= v.length()) {
                    throw fail(e, "the string has no closing quote");
                }
                char c = v.charAt(i);
                if (c == '"') {
                    if (i != v.length() - 1) {
                        throw fail(e, "text after the closing quote at column " + (e.valueColumn + i + 2));
                    }
                    return sb.toString();
                }
                if (c != '\\') {
                    sb.append(c);
                    i++;
                    continue;
                }
                char n = i + 1 < v.length() ? v.charAt(i + 1) : 0;
                if (n == '"' || n == '\\') {
                    sb.append(n);
                    i += 2;
                } else if (n == 'u' && i + 6 <= v.length() && isHex4(v, i + 2)) {
                    sb.append((char) Integer.parseInt(v.substring(i + 2, i + 6), 16));
                    i += 6;
                } else {
                    throw fail(e, "bad escape at column " + (e.valueColumn + i + 1)
                            + " (strings know \\\", \\\\ and \\uXXXX only)");
                }
            }
        }

        private Instant instant(Entry e) {
            if (e.value.length() > MAX_INSTANT_LENGTH) {
                throw fail(e, "created has " + e.value.length() + " characters, more than " + MAX_INSTANT_LENGTH);
            }
            try {
                return Instant.parse(e.value);
            } catch (DateTimeException ex) {
                throw fail(e, "created is not an ISO-8601 instant such as 2024-05-01T12:00:00Z");
            }
        }

        private void checksum(Entry e) {
            String v = e.value;
            String prefix = "crc32:";
            if (!v.startsWith(prefix) || v.length() != prefix.length() + 8 || !isLowerHex(v, prefix.length())) {
                throw fail(e, "malformed checksum; expected crc32:<8 lowercase hex digits>");
            }
            String actual = hex8(crcBefore);
            if (!v.substring(prefix.length()).equals(actual)) {
                throw fail(e, "checksum mismatch: the file says " + v + " but the lines before it give crc32:" + actual
                        + "; the file is corrupt or was edited");
            }
        }

        private IllegalArgumentException fail(Entry e, String problem) {
            return error(e.line, problem + (e.complete ? "" : TRUNCATED), e.text);
        }

        private String cut() {
            return lines.endedWithLineFeed() ? "" : TRUNCATED;
        }
    }

    private static boolean isDigits(String s) {
        if (s.isEmpty()) {
            return false;
        }
        for (int i = 0; i < s.length(); i++) {
            char c = s.charAt(i);
            if (c < '0' || c > '9') {
                return false;
            }
        }
        return true;
    }

    /** [-]digits[.digits][(e|E)[+|-]digits], the only number syntax accepted (no NaN, no hex, no suffix). */
    static boolean isDecimal(String s) {
        int n = s.length();
        int i = 0;
        if (i < n && s.charAt(i) == '-') {
            i++;
        }
        int start = i;
        while (i < n && s.charAt(i) >= '0' && s.charAt(i) <= '9') {
            i++;
        }
        if (i == start) {
            return false;
        }
        if (i < n && s.charAt(i) == '.') {
            i++;
            start = i;
            while (i < n && s.charAt(i) >= '0' && s.charAt(i) <= '9') {
                i++;
            }
            if (i == start) {
                return false;
            }
        }
        if (i < n && (s.charAt(i) == 'e' || s.charAt(i) == 'E')) {
            i++;
            if (i < n && (s.charAt(i) == '-' || s.charAt(i) == '+')) {
                i++;
            }
            start = i;
            while (i < n && s.charAt(i) >= '0' && s.charAt(i) <= '9') {
                i++;
            }
            if (i == start) {
                return false;
            }
        }
        return i == n;
    }

    private static boolean isHex4(String s, int from) {
        for (int i = from; i < from + 4; i++) {
            if (Character.digit(s.charAt(i), 16) < 0 || s.charAt(i) > 0x7f) {
                return false;
            }
        }
        return true;
    }

    private static boolean isLowerHex(String s, int from) {
        for (int i = from; i < s.length(); i++) {
            char c = s.charAt(i);
            if (!(c >= '0' && c <= '9') && !(c >= 'a' && c <= 'f')) {
                return false;
            }
        }
        return true;
    }
}
