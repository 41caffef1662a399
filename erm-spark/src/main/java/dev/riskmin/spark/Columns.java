package dev.riskmin.spark;

import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Set;

/**
 * Which columns of a row hold what: the target y, the features x (one numeric column per feature, or one
 * column holding an array of numbers), and optionally a non-negative sample weight w. Immutable.
 *
 * <p>Numeric columns may be of any Spark numeric type (byte, short, int, long, float, double, decimal);
 * every value is read as a double. An array feature column must hold the same number of values in every
 * row. A column of a user-defined vector type must first be turned into an array column.
 */
public final class Columns {
    private final String target;
    private final List<String> features;
    private final boolean array;
    private final String weight;

    private Columns(String target, List<String> features, boolean array, String weight) {
        this.target = target;
        this.features = features;
        this.array = array;
        this.weight = weight;
    }

    /**
     * One numeric column per feature, in the order given (feature j of the model is column
     * {@code features[j]}).
     *
     * @throws IllegalArgumentException if a name is empty, no feature is given, or a name repeats
     */
    public static Columns of(String target, String... features) {
        requireName("target", target);
        if (features == null || features.length == 0) {
            throw new IllegalArgumentException("give at least one feature column");
        }
        List<String> list = new ArrayList<>(features.length);
        Set<String> seen = new HashSet<>();
        seen.add(target);
        for (int j = 0; j < features.length; j++) {
            requireName("features[" + j + "]", features[j]);
            if (!seen.add(features[j])) {
                throw new IllegalArgumentException("column '" + features[j] + "' is named twice (features[" + j
                        + "]); each column has one role");
            }
            list.add(features[j]);
        }
        return new Columns(target, List.copyOf(list), false, null);
    }

    /**
     * One column holding all features of a row as an array of numbers.
     *
     * @throws IllegalArgumentException if a name is empty or both name the same column
     */
    public static Columns array(String target, String features) {
        requireName("target", target);
        requireName("features", features);
        if (target.equals(features)) {
            throw new IllegalArgumentException("column '" + target + "' cannot be both target and features");
        }
        return new Columns(target, List.of(features), true, null);
    }

    /**
     * @return these columns with a sample-weight column (non-negative, not all zero within a partition)
     * @throws IllegalArgumentException if the name is empty or already has a role
     */
    public Columns withWeight(String column) {
        requireName("weight", column);
        if (column.equals(target) || features.contains(column)) {
            throw new IllegalArgumentException("column '" + column + "' already has a role; the weight needs its own");
        }
        return new Columns(target, features, array, column);
    }

    /** @return the target column's name */
    public String target() {
        return target;
    }

    /** @return the feature columns' names (one element for an array column); unmodifiable */
    public List<String> features() {
        return features;
    }

    /** @return whether the features come from one array column */
    public boolean arrayFeatures() {
        return array;
    }

    /** @return the weight column's name, or null when rows are unweighted */
    public String weight() {
        return weight;
    }

    private static void requireName(String role, String name) {
        if (name == null || name.isBlank()) {
            throw new IllegalArgumentException(role + " column name (" + name + ") must not be empty");
        }
    }

    @Override
    public String toString() {
        return "Columns[target=" + target + ", features=" + (array ? features.get(0) + " (array)" : features)
                + (weight != null ? ", weight=" + weight : "") + "]";
    }
}
