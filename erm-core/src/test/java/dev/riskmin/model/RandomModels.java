package dev.riskmin.model;

import dev.riskmin.loss.Response;

import java.io.IOException;
import java.io.StringWriter;
import java.io.UncheckedIOException;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
import java.util.random.RandomGenerator;

/** Seeded random models with extreme parameters and awkward strings, for the model-file tests. */
final class RandomModels {
    private RandomModels() {
    }

    static final Response[] LINEAR_RESPONSES = {Response.IDENTITY, Response.EXPONENTIAL, Response.LOGISTIC,
            Response.MARGIN};
    static final Response[] MULTICLASS_RESPONSES = {Response.SOFTMAX, Response.ARGMAX};

    /** Values at the edges of binary64: extremes of range, subnormals, signed zeros, and 1e±300. */
    static final double[] EXTREMES = {Double.MAX_VALUE, -Double.MAX_VALUE, Double.MIN_VALUE, -Double.MIN_VALUE,
            Double.MIN_NORMAL, -Double.MIN_NORMAL, Math.nextDown(Double.MIN_NORMAL), 0.0, -0.0, 1e-300, -1e-300, 1e300,
            -1e300, 0.1, 1.0 / 3, 2e23, 9007199254740993.0, Math.ulp(1.0), 1 + Math.ulp(1.0)};

    private static final String[] LOSS_NAMES = {"squared", "absolute", "huber(delta=1.0)", "pinball(tau=0.9)",
            "epsilon-insensitive(epsilon=0.1)", "poisson", "logistic", "hinge", "squared-hinge",
            "smoothed-hinge(gamma=0.5)", "softmax-cross-entropy", "multiclass-hinge", "", "my loss = \"custom\""};

    /** A random model: either kind, any response of that kind, d in [0, 12], K in [2, 5], with random metadata. */
    static SavedModel model(RandomGenerator rng) {
        boolean multi = rng.nextBoolean();
        Response[] responses = multi ? MULTICLASS_RESPONSES : LINEAR_RESPONSES;
        return model(rng, responses[rng.nextInt(responses.length)]);
    }

    /** A random model with the given response. */
    static SavedModel model(RandomGenerator rng, Response response) {
        boolean multi = response == Response.SOFTMAX || response == Response.ARGMAX;
        int d = rng.nextInt(8) == 0 ? 0 : 1 + rng.nextInt(12);
        String loss = rng.nextInt(4) == 0 ? text(rng, 12) : LOSS_NAMES[rng.nextInt(LOSS_NAMES.length)];
        SavedModel m;
        if (multi) {
            int k = 2 + rng.nextInt(4);
            m = SavedModel.of(MulticlassModel.of(values(rng, k * d), values(rng, k), d, response, loss));
        } else {
            m = SavedModel.of(LinearModel.of(values(rng, d), value(rng), response, loss));
        }
        if (m.classCount() > 0 && rng.nextBoolean()) {
            List<String> names = new ArrayList<>();
            for (int c = 0; c < m.classCount(); c++) {
                names.add(text(rng, 6) + "#" + c); // the suffix keeps them distinct
            }
            m = m.withClassNames(names);
        }
        if (rng.nextBoolean()) {
            m = m.withStandardized(rng.nextBoolean());
        }
        if (rng.nextBoolean()) {
            // 1900 … 2100, with nanoseconds half the time
            long seconds = rng.nextLong(-2_208_988_800L, 4_102_444_800L);
            m = m.withCreated(Instant.ofEpochSecond(seconds, rng.nextBoolean() ? rng.nextInt(1_000_000_000) : 0));
        }
        if (rng.nextBoolean()) {
            m = m.withNote(text(rng, 40));
        }
        return m;
    }

    static double[] values(RandomGenerator rng, int n) {
        double[] v = new double[n];
        for (int i = 0; i < n; i++) {
            v[i] = value(rng);
        }
        return v;
    }

    /** A finite double from a mix of ordinary magnitudes, edge values, subnormals and arbitrary bit patterns. */
    static double value(RandomGenerator rng) {
        switch (rng.nextInt(5)) {
            case 0:
                return rng.nextGaussian() * Math.pow(10, rng.nextInt(-6, 7));
            case 1:
                return EXTREMES[rng.nextInt(EXTREMES.length)];
            case 2: {
                double sub = Double.longBitsToDouble(rng.nextLong() & 0x000F_FFFF_FFFF_FFFFL);
                return rng.nextBoolean() ? sub : -sub;
            }
            case 3: {
                while (true) {
                    double x = Double.longBitsToDouble(rng.nextLong());
                    if (Double.isFinite(x)) {
                        return x;
                    }
                }
            }
            default:
                return rng.nextInt(-20, 21) / 10.0;
        }
    }

    /** Text with quotes, backslashes, " = ", control characters, non-ASCII letters and lone surrogates. */
    static String text(RandomGenerator rng, int maxLength) {
        char[] pool = {'a', 'b', 'Z', '7', ' ', '"', '\\', '=', '\n', '\r', '\t', '\0', 'é', 'λ', '€', '\uD83D',
                '\uDE00', '\uFFFF', '#', 'u'};
        int n = rng.nextInt(maxLength + 1);
        StringBuilder sb = new StringBuilder(n);
        for (int i = 0; i < n; i++) {
            sb.append(pool[rng.nextInt(pool.length)]);
        }
        return sb.toString();
    }

    /** The model as written by the default format. */
    static String written(SavedModel m) {
        StringWriter out = new StringWriter();
        try {
            ModelFile.defaults().write(m, out);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        return out.toString();
    }
}
