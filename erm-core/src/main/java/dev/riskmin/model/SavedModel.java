package dev.riskmin.model;

import dev.riskmin.loss.Response;
import dev.riskmin.util.Arguments;

import java.time.Instant;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Objects;
import java.util.Optional;

/**
 * What a model file holds: one fitted model (a {@link LinearModel} or a {@link MulticlassModel},
 * parameters on the original feature scale) and optional descriptive metadata — names for the
 * class labels, whether the fit standardized its features, a creation instant and a free-text
 * note. The metadata never changes a prediction.
 *
 * <p>The format is this library's own, version {@value ModelFile#VERSION}, described in
 * {@code docs/model-format.md}; {@link ModelFile} reads and writes it.
 *
 * <p><b>Classes.</b> A multiclass model has the labels 0 … K−1 ({@link MulticlassModel#predictClass}).
 * A binary classifier (response {@link Response#LOGISTIC} or {@link Response#MARGIN}) has the labels
 * 0 and 1: {@link LinearModel#predict} returns 1 when z &gt; 0 and 0 otherwise. A regression model
 * (response {@link Response#IDENTITY} or {@link Response#EXPONENTIAL}) has none. Names, when given,
 * cover every label and are distinct.
 *
 * <p>Immutable and thread-safe; the {@code with…} methods return a new instance.
 */
public final class SavedModel {

    /** Which of the two model types a file holds. */
    public enum Kind {
        /** One decision value z = w·x + b: {@link LinearModel}. */
        LINEAR,
        /** K decision values z<sub>k</sub> = w<sub>k</sub>·x + b<sub>k</sub>: {@link MulticlassModel}. */
        MULTICLASS
    }

    private final LinearModel linear;
    private final MulticlassModel multiclass;
    private final List<String> classNames;
    private final Boolean standardized;
    private final Instant created;
    private final String note;

    private SavedModel(LinearModel linear, MulticlassModel multiclass, List<String> classNames,
                       Boolean standardized, Instant created, String note) {
        this.linear = linear;
        this.multiclass = multiclass;
        this.classNames = classNames;
        this.standardized = standardized;
        this.created = created;
        this.note = note;
    }

    /**
     * @throws NullPointerException     if model is null
     * @throws IllegalArgumentException if the model's loss name is null (a file records it)
     */
    public static SavedModel of(LinearModel model) {
        Arguments.notNull("model", model);
        requireLossName(model.lossName());
        return new SavedModel(model, null, List.of(), null, null, null);
    }

    /**
     * @throws NullPointerException     if model is null
     * @throws IllegalArgumentException if the model's loss name is null (a file records it)
     */
    public static SavedModel of(MulticlassModel model) {
        Arguments.notNull("model", model);
        requireLossName(model.lossName());
        return new SavedModel(null, model, List.of(), null, null, null);
    }

    private static void requireLossName(String lossName) {
        if (lossName == null) {
            throw new IllegalArgumentException("the model's lossName is null; a model file records the loss by name");
        }
    }

    /**
     * @param names one name per class label, in label order; any strings, distinct
     * @throws NullPointerException     if names or one of its entries is null
     * @throws IllegalArgumentException if the model has no classes, the count differs from
     *                                  {@link #classCount()}, or two names are equal (naming both labels)
     */
    public SavedModel withClassNames(List<String> names) {
        Arguments.notNull("names", names);
        int k = classCount();
        if (k == 0) {
            throw new IllegalArgumentException("a regression model (response " + response() + ") has no classes to name");
        }
        if (names.size() != k) {
            throw new IllegalArgumentException("names has " + names.size() + " entries, the model has " + k + " classes");
        }
        Map<String, Integer> first = new HashMap<>();
        List<String> copy = new ArrayList<>(k);
        for (int c = 0; c < k; c++) {
            String name = names.get(c);
            if (name == null) {
                throw new NullPointerException("names[" + c + "] must not be null");
            }
            Integer earlier = first.putIfAbsent(name, c);
            if (earlier != null) {
                throw new IllegalArgumentException("names[" + c + "] (\"" + name + "\") repeats names[" + earlier + "]");
            }
            copy.add(name);
        }
        return new SavedModel(linear, multiclass, List.copyOf(copy), standardized, created, note);
    }

    /** @param value whether the fit standardized its features (informational: parameters are on the original scale) */
    public SavedModel withStandardized(boolean value) {
        return new SavedModel(linear, multiclass, classNames, value, created, note);
    }

    /** @param instant when the model was fitted or saved; null for none */
    public SavedModel withCreated(Instant instant) {
        return new SavedModel(linear, multiclass, classNames, standardized, instant, note);
    }

    /** @param text any free text (stored escaped); null for none */
    public SavedModel withNote(String text) {
        return new SavedModel(linear, multiclass, classNames, standardized, created, text);
    }

    public Kind kind() {
        return linear != null ? Kind.LINEAR : Kind.MULTICLASS;
    }

    /**
     * @return the single-output model
     * @throws IllegalStateException if the file holds a multiclass model
     */
    public LinearModel linear() {
        if (linear == null) {
            throw new IllegalStateException("this is a multiclass model (" + multiclass.classes()
                    + " classes); use multiclass()");
        }
        return linear;
    }

    /**
     * @return the K-class model
     * @throws IllegalStateException if the file holds a single-output model
     */
    public MulticlassModel multiclass() {
        if (multiclass == null) {
            throw new IllegalStateException("this is a single-output linear model (response " + linear.response()
                    + "); use linear()");
        }
        return multiclass;
    }

    /** @return d, the number of features */
    public int dimension() {
        return linear != null ? linear.dimension() : multiclass.dimension();
    }

    /** @return K for a multiclass model, 2 for a binary classifier, 0 for a regression model */
    public int classCount() {
        if (multiclass != null) {
            return multiclass.classes();
        }
        Response r = linear.response();
        return r == Response.LOGISTIC || r == Response.MARGIN ? 2 : 0;
    }

    public Response response() {
        return linear != null ? linear.response() : multiclass.response();
    }

    public String lossName() {
        return linear != null ? linear.lossName() : multiclass.lossName();
    }

    /** @return the names of labels 0 … {@link #classCount()}−1, or an empty list when none were recorded */
    public List<String> classNames() {
        return classNames;
    }

    /** @return whether the fit standardized its features, if recorded */
    public Optional<Boolean> standardized() {
        return Optional.ofNullable(standardized);
    }

    public Optional<Instant> created() {
        return Optional.ofNullable(created);
    }

    public Optional<String> note() {
        return Optional.ofNullable(note);
    }

    /**
     * Equal when kind, loss name, response, shape, every parameter bit for bit (so 0.0 and −0.0
     * differ) and all metadata are equal.
     */
    @Override
    public boolean equals(Object o) {
        if (!(o instanceof SavedModel)) {
            return false;
        }
        SavedModel s = (SavedModel) o;
        if (kind() != s.kind() || response() != s.response() || !lossName().equals(s.lossName())
                || dimension() != s.dimension() || classCount() != s.classCount()
                || !classNames.equals(s.classNames) || !Objects.equals(standardized, s.standardized)
                || !Objects.equals(created, s.created) || !Objects.equals(note, s.note)) {
            return false;
        }
        int blocks = multiclass != null ? multiclass.classes() : 1;
        for (int k = 0; k < blocks; k++) {
            if (bits(intercept(k)) != bits(s.intercept(k))) {
                return false;
            }
            for (int j = 0; j < dimension(); j++) {
                if (bits(coefficient(k, j)) != bits(s.coefficient(k, j))) {
                    return false;
                }
            }
        }
        return true;
    }

    @Override
    public int hashCode() {
        int h = Objects.hash(kind(), response(), lossName(), dimension(), classNames, standardized, created, note);
        int blocks = multiclass != null ? multiclass.classes() : 1;
        for (int k = 0; k < blocks; k++) {
            h = 31 * h + Long.hashCode(bits(intercept(k)));
            for (int j = 0; j < dimension(); j++) {
                h = 31 * h + Long.hashCode(bits(coefficient(k, j)));
            }
        }
        return h;
    }

    @Override
    public String toString() {
        return "SavedModel[" + kind() + ", loss=" + ModelFile.quote(lossName()) + ", response=" + response()
                + ", d=" + dimension()
                + (classCount() > 0 ? ", classes=" + classCount() : "") + "]";
    }

    /** Block k's intercept: b for a linear model (k = 0), b<sub>k</sub> for a multiclass one. */
    double intercept(int k) {
        return linear != null ? linear.intercept() : multiclass.intercept(k);
    }

    /** Block k's coefficient j. */
    double coefficient(int k, int j) {
        return linear != null ? linear.coefficient(j) : multiclass.coefficient(k, j);
    }

    private static long bits(double v) {
        return Double.doubleToRawLongBits(v);
    }
}
