package dev.riskmin.diagnostics.sink;

import dev.riskmin.diagnostics.AngleEvent;
import dev.riskmin.diagnostics.Decision;
import dev.riskmin.diagnostics.DiagnosticEvent;
import dev.riskmin.diagnostics.EventKind;
import dev.riskmin.diagnostics.LossEvent;
import dev.riskmin.diagnostics.NoiseEvent;
import dev.riskmin.diagnostics.StoppingEvent;
import dev.riskmin.diagnostics.VerdictEvent;
import dev.riskmin.diagnostics.verdict.Condition;
import dev.riskmin.diagnostics.verdict.HealthVerdict;

import java.util.List;
import java.util.Locale;
import java.util.Map;

/**
 * The fields of a trace, shared by the CSV and JSON-lines formats: every event is its kind, step and
 * epoch followed by its record's components under the components' own names (the verdict's
 * components flattened). Both formats write the same names, so a trace reads back into equal records.
 */
final class TraceSchema {
    /** The CSV columns, in order: every field of every kind (a field shared by kinds appears once). */
    static final List<String> COLUMNS = List.of("kind", "step", "epoch",
            "batchSize", "traceCovariance", "batchMeanVariance", "gradientNormSquared", "noiseScale",
            "suggestedBatchSize",
            "cosine", "meanCosine", "descentShare", "angleToOptimum", "suboptimality",
            "batchLoss", "smoothedBatchLoss", "objective", "heldOutLoss", "gradientNorm", "stepSize",
            "test", "statistic", "threshold", "decision", "detail",
            "condition", "summary", "advice", "figures");

    private TraceSchema() {
    }

    /** Receives the fields of one event, in column order. */
    interface Target {
        void integer(String name, long value);

        void real(String name, double value);

        /** @param value may be null */
        void text(String name, String value);

        void figures(String name, Map<String, Double> value);
    }

    /** Gives the fields of one stored event; every method throws IllegalArgumentException naming {@link #where()}. */
    interface Source {
        long integer(String name);

        double real(String name);

        /** @return the text, or null when the trace holds none */
        String text(String name);

        Map<String, Double> figures(String name);

        /** @return the position in the trace, for messages (e.g. "line 12") */
        String where();
    }

    static String kindName(EventKind kind) {
        return kind.name().toLowerCase(Locale.ROOT);
    }

    static EventKind kind(String name, String where) {
        if (name != null) {
            for (EventKind k : EventKind.values()) {
                if (kindName(k).equals(name)) {
                    return k;
                }
            }
        }
        throw new IllegalArgumentException(where + ": kind (" + name + ") is not one of noise, angle, loss, stopping,"
                + " verdict");
    }

    static void encode(DiagnosticEvent event, Target t) {
        t.text("kind", kindName(event.kind()));
        t.integer("step", event.step());
        t.integer("epoch", event.epoch());
        if (event instanceof NoiseEvent e) {
            t.integer("batchSize", e.batchSize());
            t.real("traceCovariance", e.traceCovariance());
            t.real("batchMeanVariance", e.batchMeanVariance());
            t.real("gradientNormSquared", e.gradientNormSquared());
            t.real("noiseScale", e.noiseScale());
            t.integer("suggestedBatchSize", e.suggestedBatchSize());
        } else if (event instanceof AngleEvent e) {
            t.real("cosine", e.cosine());
            t.real("meanCosine", e.meanCosine());
            t.real("descentShare", e.descentShare());
            t.real("angleToOptimum", e.angleToOptimum());
            t.real("suboptimality", e.suboptimality());
        } else if (event instanceof LossEvent e) {
            t.integer("batchSize", e.batchSize());
            t.real("batchLoss", e.batchLoss());
            t.real("smoothedBatchLoss", e.smoothedBatchLoss());
            t.real("objective", e.objective());
            t.real("heldOutLoss", e.heldOutLoss());
            t.real("gradientNorm", e.gradientNorm());
            t.real("stepSize", e.stepSize());
        } else if (event instanceof StoppingEvent e) {
            t.text("test", e.test());
            t.real("statistic", e.statistic());
            t.real("threshold", e.threshold());
            t.text("decision", e.decision() == null ? null : e.decision().name().toLowerCase(Locale.ROOT));
            t.text("detail", e.detail());
        } else if (event instanceof VerdictEvent e) {
            HealthVerdict v = e.verdict();
            t.text("condition", v == null || v.condition() == null ? null
                    : v.condition().name().toLowerCase(Locale.ROOT));
            t.text("summary", v == null ? null : v.summary());
            t.text("advice", v == null ? null : v.advice());
            t.figures("figures", v == null ? Map.of() : v.figures());
        }
    }

    static DiagnosticEvent decode(EventKind kind, Source s) {
        long step = s.integer("step");
        int epoch = narrow(s.integer("epoch"), "epoch", s);
        switch (kind) {
            case NOISE:
                return new NoiseEvent(step, epoch, narrow(s.integer("batchSize"), "batchSize", s),
                        s.real("traceCovariance"), s.real("batchMeanVariance"), s.real("gradientNormSquared"),
                        s.real("noiseScale"), narrow(s.integer("suggestedBatchSize"), "suggestedBatchSize", s));
            case ANGLE:
                return new AngleEvent(step, epoch, s.real("cosine"), s.real("meanCosine"), s.real("descentShare"),
                        s.real("angleToOptimum"), s.real("suboptimality"));
            case LOSS:
                return new LossEvent(step, epoch, s.real("batchLoss"), s.real("smoothedBatchLoss"),
                        s.real("objective"), s.real("heldOutLoss"), s.real("gradientNorm"), s.real("stepSize"),
                        narrow(s.integer("batchSize"), "batchSize", s));
            case STOPPING: {
                String decision = s.text("decision");
                return new StoppingEvent(step, epoch, s.text("test"), s.real("statistic"), s.real("threshold"),
                        decision == null ? null : constant(Decision.class, decision, "decision", s), s.text("detail"));
            }
            default: {
                String condition = s.text("condition");
                HealthVerdict verdict = new HealthVerdict(
                        condition == null ? null : constant(Condition.class, condition, "condition", s),
                        s.text("summary"), s.text("advice"), s.figures("figures"));
                return new VerdictEvent(step, epoch, verdict);
            }
        }
    }

    private static int narrow(long value, String name, Source s) {
        if (value < Integer.MIN_VALUE || value > Integer.MAX_VALUE) {
            throw new IllegalArgumentException(s.where() + ": " + name + " (" + value + ") does not fit an int");
        }
        return (int) value;
    }

    private static <E extends Enum<E>> E constant(Class<E> type, String text, String name, Source s) {
        for (E e : type.getEnumConstants()) {
            if (e.name().equalsIgnoreCase(text)) {
                return e;
            }
        }
        throw new IllegalArgumentException(s.where() + ": " + name + " (" + text + ") is not a "
                + type.getSimpleName());
    }
}
