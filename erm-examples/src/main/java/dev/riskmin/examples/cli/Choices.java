package dev.riskmin.examples.cli;

import picocli.CommandLine;

import java.util.ArrayList;
import java.util.Iterator;
import java.util.List;

/**
 * The words the command line accepts for its named choices, each an enum whose constants carry
 * their word, with a picocli converter (so a wrong word is a usage error that lists the right ones)
 * and the list of words for {@code --help}.
 */
final class Choices {
    private Choices() {
    }

    /** A constant with the word that names it on the command line. */
    interface Worded {
        String word();
    }

    /** The pointwise loss ℓ(z, y) (formulas on the classes of {@code dev.riskmin.loss}). */
    enum LossChoice implements Worded {
        SQUARED("squared"), ABSOLUTE("absolute"), HUBER("huber"), PINBALL("pinball"),
        EPSILON_INSENSITIVE("epsilon-insensitive"), POISSON("poisson"), LOGISTIC("logistic"), HINGE("hinge"),
        SQUARED_HINGE("squared-hinge"), SMOOTHED_HINGE("smoothed-hinge"), SOFTMAX("softmax"),
        MULTICLASS_HINGE("multiclass-hinge");

        private final String word;

        LossChoice(String word) {
            this.word = word;
        }

        @Override
        public String word() {
            return word;
        }

        boolean multiclass() {
            return this == SOFTMAX || this == MULTICLASS_HINGE;
        }
    }

    /** The penalty R(w). */
    enum PenaltyChoice implements Worded {
        NONE("none"), L1("l1"), L2("l2"), ELASTIC_NET("elastic-net");

        private final String word;

        PenaltyChoice(String word) {
            this.word = word;
        }

        @Override
        public String word() {
            return word;
        }
    }

    /** How batches are drawn. */
    enum SamplerChoice implements Worded {
        WITH_REPLACEMENT("with-replacement"), WITHOUT_REPLACEMENT("without-replacement"), STRATIFIED("stratified"),
        IMPORTANCE("importance"), SEQUENTIAL("sequential");

        private final String word;

        SamplerChoice(String word) {
            this.word = word;
        }

        @Override
        public String word() {
            return word;
        }
    }

    /** The step-size schedule ε<sub>t</sub>. */
    enum ScheduleChoice implements Worded {
        AUTO("auto"), CONSTANT("constant"), POLYNOMIAL("polynomial"), STEP_DECAY("step-decay"),
        COSINE_RESTARTS("cosine-restarts");

        private final String word;

        ScheduleChoice(String word) {
            this.word = word;
        }

        @Override
        public String word() {
            return word;
        }
    }

    /** The update rule. */
    enum RuleChoice implements Worded {
        SGD("sgd"), HEAVY_BALL("heavy-ball"), NESTEROV("nesterov"), ADAGRAD("adagrad"), ADAM("adam"), SVRG("svrg"),
        SAGA("saga");

        private final String word;

        RuleChoice(String word) {
            this.word = word;
        }

        @Override
        public String word() {
            return word;
        }
    }

    /** The format of the trace file. */
    enum TraceFormat implements Worded {
        CSV("csv"), JSON_LINES("json-lines");

        private final String word;

        TraceFormat(String word) {
            this.word = word;
        }

        @Override
        public String word() {
            return word;
        }

        String extension() {
            return this == CSV ? ".csv" : ".jsonl";
        }
    }

    /** Converts a word (case ignored) to its constant; a wrong word names the right ones. */
    abstract static class Converter<E extends Enum<E> & Worded> implements CommandLine.ITypeConverter<E> {
        private final Class<E> type;

        Converter(Class<E> type) {
            this.type = type;
        }

        @Override
        public E convert(String value) {
            for (E e : type.getEnumConstants()) {
                if (e.word().equalsIgnoreCase(value.strip())) {
                    return e;
                }
            }
            throw new CommandLine.TypeConversionException("'" + value + "' is not one of " + words(type));
        }
    }

    /** The words of a choice, for {@code ${COMPLETION-CANDIDATES}} in the help. */
    abstract static class Candidates<E extends Enum<E> & Worded> implements Iterable<String> {
        private final Class<E> type;

        Candidates(Class<E> type) {
            this.type = type;
        }

        @Override
        public Iterator<String> iterator() {
            List<String> words = new ArrayList<>();
            for (E e : type.getEnumConstants()) {
                words.add(e.word());
            }
            return words.iterator();
        }
    }

    static <E extends Enum<E> & Worded> String words(Class<E> type) {
        List<String> words = new ArrayList<>();
        for (E e : type.getEnumConstants()) {
            words.add(e.word());
        }
        return String.join(", ", words);
    }

    static final class LossConverter extends Converter<LossChoice> {
        LossConverter() {
            super(LossChoice.class);
        }
    }

    static final class LossCandidates extends Candidates<LossChoice> {
        LossCandidates() {
            super(LossChoice.class);
        }
    }

    static final class PenaltyConverter extends Converter<PenaltyChoice> {
        PenaltyConverter() {
            super(PenaltyChoice.class);
        }
    }

    static final class PenaltyCandidates extends Candidates<PenaltyChoice> {
        PenaltyCandidates() {
            super(PenaltyChoice.class);
        }
    }

    static final class SamplerConverter extends Converter<SamplerChoice> {
        SamplerConverter() {
            super(SamplerChoice.class);
        }
    }

    static final class SamplerCandidates extends Candidates<SamplerChoice> {
        SamplerCandidates() {
            super(SamplerChoice.class);
        }
    }

    static final class ScheduleConverter extends Converter<ScheduleChoice> {
        ScheduleConverter() {
            super(ScheduleChoice.class);
        }
    }

    static final class ScheduleCandidates extends Candidates<ScheduleChoice> {
        ScheduleCandidates() {
            super(ScheduleChoice.class);
        }
    }

    static final class RuleConverter extends Converter<RuleChoice> {
        RuleConverter() {
            super(RuleChoice.class);
        }
    }

    static final class RuleCandidates extends Candidates<RuleChoice> {
        RuleCandidates() {
            super(RuleChoice.class);
        }
    }

    static final class TraceFormatConverter extends Converter<TraceFormat> {
        TraceFormatConverter() {
            super(TraceFormat.class);
        }
    }

    static final class TraceFormatCandidates extends Candidates<TraceFormat> {
        TraceFormatCandidates() {
            super(TraceFormat.class);
        }
    }
}
