package dev.riskmin.spark;

import dev.riskmin.testing.Cases;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.api.java.JavaSparkContext;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructField;
import org.apache.spark.sql.types.StructType;

import java.io.Serializable;
import java.util.ArrayList;
import java.util.List;
import java.util.random.RandomGenerator;

/**
 * A generated logistic problem held twice: as arrays for the in-memory path and as Spark rows (columns
 * x0 … x{d−1}, y, and w when weighted). Row i is made from its own generator (seeded by the problem's seed
 * and i), so the executors generate their rows themselves — a task carries only its range of row numbers —
 * and the partitions are contiguous: partition k holds rows [k n/P, (k+1) n/P), and global row i is row i
 * of the arrays. x ~ N(0, 1), coefficients ~ N(0, signal²) (signal 1 by default), intercept 0.3, labels 0/1 from the logistic model.
 */
final class LogisticRows implements Serializable {
    private static final long serialVersionUID = 1L;

    final long seed;
    final int n;
    final int d;
    final double signal;
    final boolean weighted;
    final double[] coefficients;
    final transient double[][] x;
    final transient double[] y;
    final transient double[] w;

    private LogisticRows(long seed, int n, int d, double signal, boolean weighted) {
        this.seed = seed;
        this.n = n;
        this.d = d;
        this.signal = signal;
        this.weighted = weighted;
        this.coefficients = Cases.gaussianVector(Cases.rng(seed), d, signal);
        this.x = new double[n][];
        this.y = new double[n];
        this.w = weighted ? new double[n] : null;
        for (int i = 0; i < n; i++) {
            double[] values = values(i);
            x[i] = java.util.Arrays.copyOf(values, d);
            y[i] = values[d];
            if (weighted) {
                w[i] = values[d + 1];
            }
        }
    }

    static LogisticRows generate(long seed, int n, int d) {
        return new LogisticRows(seed, n, d, 1.0, false);
    }

    /**
     * @param signal the standard deviation of the true coefficients: smaller values keep the predictions
     *               away from saturation, so the objective is better conditioned
     */
    static LogisticRows generate(long seed, int n, int d, double signal) {
        return new LogisticRows(seed, n, d, signal, false);
    }

    /** @return the same rows with weights drawn uniformly from [0.1, 2) */
    LogisticRows weighted() {
        return new LogisticRows(seed, n, d, signal, true);
    }

    /** Row i's features, label (and weight), from row i's own generator. */
    double[] values(int i) {
        RandomGenerator rng = Cases.rng(seed * 1_000_003L + i + 1);
        double[] v = new double[weighted ? d + 2 : d + 1];
        double z = 0.3;
        for (int j = 0; j < d; j++) {
            v[j] = rng.nextGaussian();
            z += v[j] * coefficients[j];
        }
        v[d] = rng.nextDouble() < 1.0 / (1.0 + Math.exp(-z)) ? 1.0 : 0.0;
        if (weighted) {
            v[d + 1] = 0.1 + 1.9 * rng.nextDouble();
        }
        return v;
    }

    int size() {
        return n;
    }

    int dimension() {
        return d;
    }

    dev.riskmin.data.Dataset dataset() {
        dev.riskmin.data.Dataset.Builder b = dev.riskmin.data.Dataset.builder().features(x).targets(y);
        if (w != null) {
            b.weights(w);
        }
        return b.build();
    }

    String[] featureNames() {
        String[] names = new String[d];
        for (int j = 0; j < d; j++) {
            names[j] = "x" + j;
        }
        return names;
    }

    Columns columns() {
        Columns c = Columns.of("y", featureNames());
        return weighted ? c.withWeight("w") : c;
    }

    /** One double column per feature, then y (and w). */
    Dataset<Row> frame(int partitions) {
        List<StructField> fields = new ArrayList<>();
        for (String name : featureNames()) {
            fields.add(DataTypes.createStructField(name, DataTypes.DoubleType, false));
        }
        fields.add(DataTypes.createStructField("y", DataTypes.DoubleType, false));
        if (weighted) {
            fields.add(DataTypes.createStructField("w", DataTypes.DoubleType, false));
        }
        LogisticRows self = this;
        JavaRDD<Row> rows = ranges(partitions).flatMap(range -> {
            List<Row> out = new ArrayList<>(range[1] - range[0]);
            for (int i = range[0]; i < range[1]; i++) {
                double[] v = self.values(i);
                Object[] boxed = new Object[v.length];
                for (int j = 0; j < v.length; j++) {
                    boxed[j] = v[j];
                }
                out.add(RowFactory.create(boxed));
            }
            return out.iterator();
        });
        return SharedSpark.session().createDataFrame(rows, DataTypes.createStructType(fields));
    }

    /** The features as one array column "features", then y. */
    Dataset<Row> arrayFrame(int partitions) {
        StructType schema = DataTypes.createStructType(List.of(
                DataTypes.createStructField("features", DataTypes.createArrayType(DataTypes.DoubleType, false), false),
                DataTypes.createStructField("y", DataTypes.DoubleType, false)));
        LogisticRows self = this;
        JavaRDD<Row> rows = ranges(partitions).flatMap(range -> {
            List<Row> out = new ArrayList<>(range[1] - range[0]);
            for (int i = range[0]; i < range[1]; i++) {
                double[] v = self.values(i);
                out.add(RowFactory.create(java.util.Arrays.copyOf(v, self.d), v[self.d]));
            }
            return out.iterator();
        });
        return SharedSpark.session().createDataFrame(rows, schema);
    }

    /** One [from, to) range of row numbers per partition, in order. */
    private JavaRDD<int[]> ranges(int partitions) {
        List<int[]> ranges = new ArrayList<>(partitions);
        for (int k = 0; k < partitions; k++) {
            ranges.add(new int[] {(int) ((long) k * n / partitions), (int) ((long) (k + 1) * n / partitions)});
        }
        return context().parallelize(ranges, partitions);
    }

    /** Rows given on the driver (small tests only: they travel inside the tasks). */
    static Dataset<Row> frameOf(List<Row> rows, StructType schema, int partitions) {
        return SharedSpark.session().createDataFrame(context().parallelize(rows, partitions), schema);
    }

    static JavaSparkContext context() {
        SparkSession spark = SharedSpark.session();
        return JavaSparkContext.fromSparkContext(spark.sparkContext());
    }
}
