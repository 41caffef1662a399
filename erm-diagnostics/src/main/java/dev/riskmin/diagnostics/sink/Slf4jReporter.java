package dev.riskmin.diagnostics.sink;

import dev.riskmin.diagnostics.AngleEvent;
import dev.riskmin.diagnostics.DiagnosticEvent;
import dev.riskmin.diagnostics.EventListener;
import dev.riskmin.diagnostics.LossEvent;
import dev.riskmin.diagnostics.NoiseEvent;
import dev.riskmin.diagnostics.StoppingEvent;
import dev.riskmin.diagnostics.VerdictEvent;
import dev.riskmin.diagnostics.verdict.HealthVerdict;
import dev.riskmin.util.Arguments;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;
import org.slf4j.event.Level;

import java.util.Locale;

/**
 * Writes one line of {@code key=value} pairs per event to an SLF4J logger, at a chosen level, for
 * the logs a service already watches. This library's own line format:
 *
 * <pre>
 * kind=noise step=1200 epoch=3 batch=16 trace=0.231 meanVariance=0.0144 gradNormSq=0.0163 noiseScale=14.2 suggestedBatch=15
 * kind=angle step=1200 epoch=3 cos=0.27 meanCos=0.31 descentShare=0.83
 * kind=loss step=1200 epoch=3 batchLoss=0.52 smoothedLoss=0.49 objective=0.47 gradNorm=0.128 stepSize=0.05 batch=16
 * kind=stopping step=1200 epoch=3 test=norm statistic=3.1 threshold=1 decision=grow_batch detail="3.1 &gt; 1"
 * kind=verdict step=4000 epoch=10 condition=noise_dominated summary="…" advice="…"
 * </pre>
 *
 * <p>Keys: {@code batch} = B, {@code trace} = tr Σ estimate, {@code meanVariance} = E‖g<sub>B</sub> − G‖²,
 * {@code gradNormSq} = ‖G‖², {@code noiseScale} = B<sub>simple</sub>, {@code suggestedBatch};
 * {@code cos} = cos φ, {@code meanCos}, {@code descentShare}, {@code angleToOptimum} (degrees),
 * {@code suboptimality}; {@code batchLoss}, {@code smoothedLoss}, {@code objective}, {@code heldOut},
 * {@code gradNorm}, {@code stepSize}; {@code test}, {@code statistic}, {@code threshold},
 * {@code decision}, {@code detail}; {@code condition}, {@code summary}, {@code advice}. A figure that
 * is NaN (not measured at this event) and a null text are left out of the line.
 *
 * <p>Values: numbers with six significant digits and no trailing zeros, in {@link Locale#ROOT} (a
 * decimal point whatever the default locale), e.g. {@code 0.231}, {@code 1.5e-07}, {@code -0},
 * {@code Infinity}; kinds, decisions and conditions in lower case; text in double quotes when it is
 * empty or holds a space, quote, {@code =}, backslash or control character, with {@code \"},
 * {@code \\}, {@code \n}, {@code \r}, {@code \t} and {@code \}{@code uXXXX} escapes, so a line is
 * always one line.
 *
 * <p>Cadence: the reporter formats every event it receives. Which events and how often is set by
 * the subscription, not here — for example every 50th noise and loss event and the verdict:
 *
 * <pre>{@code
 * Diagnostics.builder()
 *     .monitor(...)
 *     .subscribe(Slf4jReporter.defaults(),
 *                EventFilter.of(EventKind.NOISE, EventKind.LOSS, EventKind.VERDICT).every(50))
 * }</pre>
 *
 * (verdicts always pass the cadence; leave VERDICT out of the kinds to not log it). A line is
 * formatted only when the logger is enabled for its level, so a disabled reporter costs one check.
 * The library ships no SLF4J binding: the host application's binding decides where lines go.
 *
 * <p>Immutable and thread-safe.
 */
public final class Slf4jReporter implements EventListener {
    /** The default logger name. */
    public static final String DEFAULT_LOGGER = "dev.riskmin.diagnostics";

    private final Logger logger;
    private final Level level;
    private final Level verdictLevel;

    private Slf4jReporter(Builder b) {
        this.logger = b.logger != null ? b.logger : LoggerFactory.getLogger(DEFAULT_LOGGER);
        this.level = b.level;
        this.verdictLevel = b.verdictLevel != null ? b.verdictLevel : b.level;
    }

    /** Logger {@value #DEFAULT_LOGGER}, every line at INFO. */
    public static Slf4jReporter defaults() {
        return builder().build();
    }

    public static Builder builder() {
        return new Builder();
    }

    @Override
    public void onEvent(DiagnosticEvent event) {
        Level at = event instanceof VerdictEvent ? verdictLevel : level;
        if (logger.isEnabledForLevel(at)) {
            logger.atLevel(at).log(line(event));
        }
    }

    /** @return the logger lines go to */
    public Logger logger() {
        return logger;
    }

    /** @return the level of measurement and stopping lines */
    public Level level() {
        return level;
    }

    /** @return the level of verdict lines */
    public Level verdictLevel() {
        return verdictLevel;
    }

    /** @return the line this reporter writes for the event (see the class documentation) */
    public static String line(DiagnosticEvent event) {
        Arguments.notNull("event", event);
        StringBuilder b = new StringBuilder(160);
        b.append("kind=").append(event.kind().name().toLowerCase(Locale.ROOT));
        b.append(" step=").append(event.step()).append(" epoch=").append(event.epoch());
        if (event instanceof NoiseEvent e) {
            b.append(" batch=").append(e.batchSize());
            real(b, "trace", e.traceCovariance());
            real(b, "meanVariance", e.batchMeanVariance());
            real(b, "gradNormSq", e.gradientNormSquared());
            real(b, "noiseScale", e.noiseScale());
            b.append(" suggestedBatch=").append(e.suggestedBatchSize());
        } else if (event instanceof AngleEvent e) {
            real(b, "cos", e.cosine());
            real(b, "meanCos", e.meanCosine());
            real(b, "descentShare", e.descentShare());
            real(b, "angleToOptimum", e.angleToOptimum());
            real(b, "suboptimality", e.suboptimality());
        } else if (event instanceof LossEvent e) {
            real(b, "batchLoss", e.batchLoss());
            real(b, "smoothedLoss", e.smoothedBatchLoss());
            real(b, "objective", e.objective());
            real(b, "heldOut", e.heldOutLoss());
            real(b, "gradNorm", e.gradientNorm());
            real(b, "stepSize", e.stepSize());
            b.append(" batch=").append(e.batchSize());
        } else if (event instanceof StoppingEvent e) {
            text(b, "test", e.test());
            real(b, "statistic", e.statistic());
            real(b, "threshold", e.threshold());
            text(b, "decision", e.decision() == null ? null : e.decision().name().toLowerCase(Locale.ROOT));
            text(b, "detail", e.detail());
        } else if (event instanceof VerdictEvent e && e.verdict() != null) {
            HealthVerdict v = e.verdict();
            text(b, "condition", v.condition() == null ? null : v.condition().name().toLowerCase(Locale.ROOT));
            text(b, "summary", v.summary());
            text(b, "advice", v.advice());
        }
        return b.toString();
    }

    private static void real(StringBuilder b, String key, double value) {
        if (!Double.isNaN(value)) {
            b.append(' ').append(key).append('=').append(number(value));
        }
    }

    private static void text(StringBuilder b, String key, String value) {
        if (value != null) {
            b.append(' ').append(key).append('=');
            quoted(b, value);
        }
    }

    /** Six significant digits, trailing zeros dropped, Locale.ROOT: 0.231, 1.5e-07, 14.2, -0, Infinity. */
    static String number(double v) {
        if (Double.isNaN(v) || Double.isInfinite(v)) {
            return Double.toString(v);
        }
        if (v == 0) {
            return 1 / v < 0 ? "-0" : "0";
        }
        String s = String.format(Locale.ROOT, "%.6g", v);
        int e = s.indexOf('e');
        String mantissa = e < 0 ? s : s.substring(0, e);
        String exponent = e < 0 ? "" : s.substring(e);
        if (mantissa.indexOf('.') >= 0) {
            int end = mantissa.length();
            while (mantissa.charAt(end - 1) == '0') {
                end--;
            }
            if (mantissa.charAt(end - 1) == '.') {
                end--;
            }
            mantissa = mantissa.substring(0, end);
        }
        return mantissa + exponent;
    }

    static void quoted(StringBuilder b, String value) {
        boolean needs = value.isEmpty();
        for (int i = 0; i < value.length() && !needs; i++) {
            char ch = value.charAt(i);
            needs = ch <= ' ' || ch == '"' || ch == '=' || ch == '\\' || ch == '\u2028' || ch == '\u2029'
                    || Character.isISOControl(ch);
        }
        if (!needs) {
            b.append(value);
            return;
        }
        b.append('"');
        for (int i = 0; i < value.length(); i++) {
            char ch = value.charAt(i);
            switch (ch) {
                case '"' -> b.append("\\\"");
                case '\\' -> b.append("\\\\");
                case '\n' -> b.append("\\n");
                case '\r' -> b.append("\\r");
                case '\t' -> b.append("\\t");
                default -> {
                    if (Character.isISOControl(ch) || ch == '\u2028' || ch == '\u2029') {
                        b.append(String.format(Locale.ROOT, "\\u%04x", (int) ch));
                    } else {
                        b.append(ch);
                    }
                }
            }
        }
        b.append('"');
    }

    /** Collects the reporter's settings; {@link #build()} returns a new immutable reporter. */
    public static final class Builder {
        private Logger logger;
        private Level level = Level.INFO;
        private Level verdictLevel;

        private Builder() {
        }

        /** The logger to write to (default: the logger named {@value Slf4jReporter#DEFAULT_LOGGER}). */
        public Builder logger(Logger value) {
            this.logger = Arguments.notNull("logger", value);
            return this;
        }

        /** The name of the logger to write to. */
        public Builder logger(String name) {
            this.logger = LoggerFactory.getLogger(Arguments.notNull("logger", name));
            return this;
        }

        /** The level of every line (default INFO), and of verdict lines unless {@link #verdictLevel} is set. */
        public Builder level(Level value) {
            this.level = Arguments.notNull("level", value);
            return this;
        }

        /** The level of verdict lines (default: {@link #level}). */
        public Builder verdictLevel(Level value) {
            this.verdictLevel = Arguments.notNull("verdictLevel", value);
            return this;
        }

        public Slf4jReporter build() {
            return new Slf4jReporter(this);
        }
    }
}
