package dev.riskmin.spark;

import org.apache.spark.sql.Row;
import org.apache.spark.sql.types.ArrayType;
import org.apache.spark.sql.types.DataType;
import org.apache.spark.sql.types.NumericType;
import org.apache.spark.sql.types.StructField;
import org.apache.spark.sql.types.StructType;

import java.io.Serializable;
import java.util.Arrays;
import java.util.Collections;
import java.util.Iterator;
import java.util.List;

/**
 * Reads the rows of one partition into a {@link PartitionBlock}, checking every cell: a missing value,
 * a value that is not a number, a non-finite value, an array of the wrong length or a negative weight
 * is an {@link IllegalArgumentException} naming the partition, the row (counted from 0 within the
 * partition) and the column. The columns are resolved against the schema on the driver first, so a
 * missing or non-numeric column fails before any job runs.
 */
final class RowConversion implements Serializable {
    private static final long serialVersionUID = 1L;
    private static final int FIRST_CAPACITY = 1024;

    private final String target;
    private final int targetIndex;
    private final String[] features;
    private final int[] featureIndex;
    private final boolean array;
    private final String weight;
    private final int weightIndex;

    private RowConversion(String target, int targetIndex, String[] features, int[] featureIndex, boolean array,
                          String weight, int weightIndex) {
        this.target = target;
        this.targetIndex = targetIndex;
        this.features = features;
        this.featureIndex = featureIndex;
        this.array = array;
        this.weight = weight;
        this.weightIndex = weightIndex;
    }

    /**
     * @throws IllegalArgumentException naming the column if it is missing from the schema or not numeric
     *                                  (an array of numbers for an array feature column)
     */
    static RowConversion resolve(StructType schema, Columns columns) {
        int targetIndex = numericColumn(schema, columns.target(), "target");
        List<String> names = columns.features();
        int[] featureIndex = new int[names.size()];
        if (columns.arrayFeatures()) {
            String name = names.get(0);
            int index = indexOf(schema, name);
            DataType type = schema.fields()[index].dataType();
            if (!(type instanceof ArrayType at) || !(at.elementType() instanceof NumericType)) {
                throw new IllegalArgumentException("column '" + name + "' has type " + type.simpleString()
                        + "; an array feature column must hold numbers (array<double>, array<float>, ...)");
            }
            featureIndex[0] = index;
        } else {
            for (int j = 0; j < featureIndex.length; j++) {
                featureIndex[j] = numericColumn(schema, names.get(j), "feature");
            }
        }
        String weight = columns.weight();
        int weightIndex = weight == null ? -1 : numericColumn(schema, weight, "weight");
        return new RowConversion(columns.target(), targetIndex, names.toArray(new String[0]), featureIndex,
                columns.arrayFeatures(), weight, weightIndex);
    }

    private static int numericColumn(StructType schema, String name, String role) {
        int index = indexOf(schema, name);
        DataType type = schema.fields()[index].dataType();
        if (!(type instanceof NumericType)) {
            throw new IllegalArgumentException("column '" + name + "' (" + role + ") has type " + type.simpleString()
                    + ", not a number: feature, target and weight columns must be numeric (byte, short, int, "
                    + "long, float, double or decimal)");
        }
        return index;
    }

    private static int indexOf(StructType schema, String name) {
        StructField[] fields = schema.fields();
        for (int i = 0; i < fields.length; i++) {
            if (fields[i].name().equals(name)) {
                return i;
            }
        }
        throw new IllegalArgumentException("column '" + name + "' is not among the data's columns "
                + Arrays.toString(schema.fieldNames()));
    }

    /** @return the target column's name */
    String target() {
        return target;
    }

    /** @return one block holding the partition's rows, or nothing for an empty partition */
    Iterator<PartitionBlock> convert(int partition, Iterator<Row> rows) {
        if (!rows.hasNext()) {
            return Collections.emptyIterator();
        }
        int d = array ? -1 : features.length;
        double[] x = new double[0];
        double[] y = new double[FIRST_CAPACITY];
        double[] w = weightIndex >= 0 ? new double[FIRST_CAPACITY] : null;
        int n = 0;
        while (rows.hasNext()) {
            Row row = rows.next();
            if (row == null) {
                throw new IllegalArgumentException("partition " + partition + ", row " + n + " is null");
            }
            if (n == y.length) {
                y = Arrays.copyOf(y, grow(n));
                if (w != null) {
                    w = Arrays.copyOf(w, y.length);
                }
            }
            if (array) {
                d = readArray(row, partition, n, d);
                x = room(x, n, d, partition);
                readArrayInto(row, partition, n, x, n * d);
            } else {
                x = room(x, n, d, partition);
                int base = n * d;
                for (int j = 0; j < d; j++) {
                    x[base + j] = cell(row, featureIndex[j], features[j], partition, n);
                }
            }
            y[n] = cell(row, targetIndex, target, partition, n);
            if (w != null) {
                double value = cell(row, weightIndex, weight, partition, n);
                if (value < 0) {
                    throw new IllegalArgumentException("partition " + partition + ", row " + n + ": weight column '"
                            + weight + "' holds " + value + "; weights must be >= 0");
                }
                w[n] = value;
            }
            n++;
        }
        if (w != null) {
            boolean any = false;
            for (int i = 0; i < n && !any; i++) {
                any = w[i] > 0;
            }
            if (!any) {
                throw new IllegalArgumentException("partition " + partition + ": every row's weight (column '"
                        + weight + "') is 0, so the partition carries no weight; drop those rows or repartition");
            }
        }
        PartitionBlock block = new PartitionBlock(partition, n, d, Arrays.copyOf(x, n * d), Arrays.copyOf(y, n),
                w == null ? null : Arrays.copyOf(w, n), target);
        return Collections.singletonList(block).iterator();
    }

    private static int grow(int n) {
        long next = Math.min((long) Integer.MAX_VALUE - 8, 2L * n);
        return (int) next;
    }

    /** @return x with room for row n of d values */
    private static double[] room(double[] x, int n, int d, int partition) {
        long needed = (long) (n + 1) * d;
        if (needed > Integer.MAX_VALUE - 8) {
            throw new IllegalArgumentException("partition " + partition + " holds more than " + n + " rows of " + d
                    + " features, beyond the largest Java array (" + (Integer.MAX_VALUE - 8)
                    + " values); split the data into more partitions (e.g. rows.repartition(k))");
        }
        if (needed <= x.length) {
            return x;
        }
        long capacity = Math.max(needed, Math.max((long) FIRST_CAPACITY * d, 2L * x.length));
        return Arrays.copyOf(x, (int) Math.min(capacity, Integer.MAX_VALUE - 8));
    }

    private static double cell(Row row, int index, String column, int partition, int r) {
        Object value = value(row, index, column, partition, r);
        if (value == null) {
            throw new IllegalArgumentException("partition " + partition + ", row " + r + ": column '" + column
                    + "' is null; every feature, target and weight needs a number");
        }
        if (!(value instanceof Number number)) {
            throw new IllegalArgumentException("partition " + partition + ", row " + r + ": column '" + column
                    + "' holds " + describe(value) + ", not a number");
        }
        double v = number.doubleValue();
        if (!Double.isFinite(v)) {
            throw new IllegalArgumentException("partition " + partition + ", row " + r + ": column '" + column
                    + "' is " + v + "; values must be finite");
        }
        return v;
    }

    private static Object value(Row row, int index, String column, int partition, int r) {
        if (index >= row.length()) {
            throw new IllegalArgumentException("partition " + partition + ", row " + r + " has " + row.length()
                    + " values, but column '" + column + "' is at position " + index + " of the schema");
        }
        return row.get(index);
    }

    /** @return the array's length, which must equal the expected d (or set it when d &lt; 0) */
    private int readArray(Row row, int partition, int r, int d) {
        Object value = value(row, featureIndex[0], features[0], partition, r);
        int length = arrayLength(value, partition, r);
        if (length == 0) {
            throw new IllegalArgumentException("partition " + partition + ", row " + r + ": column '" + features[0]
                    + "' holds an empty array; a row needs at least one feature");
        }
        if (d >= 0 && length != d) {
            throw new IllegalArgumentException("partition " + partition + ", row " + r + ": column '" + features[0]
                    + "' holds " + length + " values, but the partition's row 0 holds " + d);
        }
        return length;
    }

    private int arrayLength(Object value, int partition, int r) {
        if (value == null) {
            throw new IllegalArgumentException("partition " + partition + ", row " + r + ": column '" + features[0]
                    + "' is null; every row needs its features");
        }
        if (value instanceof scala.collection.Seq<?> seq) {
            return seq.length();
        }
        if (value instanceof List<?> list) {
            return list.size();
        }
        if (value instanceof double[] a) {
            return a.length;
        }
        if (value instanceof float[] a) {
            return a.length;
        }
        if (value instanceof int[] a) {
            return a.length;
        }
        if (value instanceof long[] a) {
            return a.length;
        }
        throw new IllegalArgumentException("partition " + partition + ", row " + r + ": column '" + features[0]
                + "' holds " + describe(value) + ", not an array of numbers");
    }

    private void readArrayInto(Row row, int partition, int r, double[] x, int base) {
        Object value = row.get(featureIndex[0]);
        int length;
        if (value instanceof double[] a) {
            length = a.length;
            for (int j = 0; j < length; j++) {
                x[base + j] = finiteElement(a[j], partition, r, j);
            }
            return;
        }
        if (value instanceof scala.collection.Seq<?> seq) {
            length = seq.length();
            for (int j = 0; j < length; j++) {
                x[base + j] = element(seq.apply(j), partition, r, j);
            }
            return;
        }
        if (value instanceof List<?> list) {
            length = list.size();
            for (int j = 0; j < length; j++) {
                x[base + j] = element(list.get(j), partition, r, j);
            }
            return;
        }
        if (value instanceof float[] a) {
            for (int j = 0; j < a.length; j++) {
                x[base + j] = finiteElement(a[j], partition, r, j);
            }
            return;
        }
        if (value instanceof int[] a) {
            for (int j = 0; j < a.length; j++) {
                x[base + j] = a[j];
            }
            return;
        }
        long[] a = (long[]) value;
        for (int j = 0; j < a.length; j++) {
            x[base + j] = a[j];
        }
    }

    private double element(Object value, int partition, int r, int j) {
        if (value == null) {
            throw new IllegalArgumentException("partition " + partition + ", row " + r + ": column '" + features[0]
                    + "' element " + j + " is null; every feature needs a number");
        }
        if (!(value instanceof Number number)) {
            throw new IllegalArgumentException("partition " + partition + ", row " + r + ": column '" + features[0]
                    + "' element " + j + " holds " + describe(value) + ", not a number");
        }
        return finiteElement(number.doubleValue(), partition, r, j);
    }

    private double finiteElement(double v, int partition, int r, int j) {
        if (!Double.isFinite(v)) {
            throw new IllegalArgumentException("partition " + partition + ", row " + r + ": column '" + features[0]
                    + "' element " + j + " is " + v + "; values must be finite");
        }
        return v;
    }

    private static String describe(Object value) {
        String text = String.valueOf(value);
        if (text.length() > 40) {
            text = text.substring(0, 37) + "...";
        }
        return "a " + value.getClass().getSimpleName() + " (\"" + text + "\")";
    }
}
