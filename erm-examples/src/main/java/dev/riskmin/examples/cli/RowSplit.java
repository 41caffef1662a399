package dev.riskmin.examples.cli;

import dev.riskmin.data.Dataset;

import java.util.ArrayList;
import java.util.List;
import java.util.random.RandomGenerator;
import java.util.random.RandomGeneratorFactory;

/**
 * The rows of a table split into rows fitted and rows held out. The held-out rows are drawn by a
 * Fisher–Yates shuffle (Knuth, TAOCP vol. 2, §3.4.2, Algorithm P) of a generator seeded with the
 * fit's seed: ⌊f n⌋ of the n rows, or — when the target holds class labels — ⌊f n<sub>c</sub>⌋ of the
 * n<sub>c</sub> rows of each class c, so that every class keeps its share in both parts. The rows
 * fitted keep the file's order.
 */
final class RowSplit {
    private final CsvTable table;
    private final int classes;
    private final int[] order;
    private final int heldOut;

    private RowSplit(CsvTable table, int classes, int[] order, int heldOut) {
        this.table = table;
        this.classes = classes;
        this.order = order;
        this.heldOut = heldOut;
    }

    /**
     * @param classes  K for class labels 0..K−1, 2 for binary labels (positive: y &gt; 0), 0 for real targets
     * @param fraction the share f held out, in [0, 1)
     */
    static RowSplit of(CsvTable table, int classes, double fraction, long seed) {
        int n = table.rows();
        RandomGenerator rng = RandomGeneratorFactory.of("L64X128MixRandom").create(seed);
        int groups = classes == 0 ? 1 : Math.max(classes, 2);
        List<List<Integer>> members = new ArrayList<>();
        for (int c = 0; c < groups; c++) {
            members.add(new ArrayList<>());
        }
        for (int i = 0; i < n; i++) {
            members.get(classOf(table.y[i], classes)).add(i);
        }
        int[] order = new int[n];
        boolean[] held = new boolean[n];
        int p = 0;
        for (List<Integer> m : members) {
            int[] rows = m.stream().mapToInt(Integer::intValue).toArray();
            shuffle(rows, rng);
            int h = (int) Math.floor(fraction * rows.length);
            for (int r = 0; r < h; r++) {
                order[p++] = rows[r];
                held[rows[r]] = true;
            }
        }
        int heldOut = p;
        for (int i = 0; i < n; i++) {
            if (!held[i]) {
                order[p++] = i;
            }
        }
        return new RowSplit(table, classes, order, heldOut);
    }

    /** The group of a row: its class label, 1 for a positive binary label, else 0 (all rows, without classes). */
    static int classOf(double y, int classes) {
        if (classes == 0) {
            return 0;
        }
        return classes > 2 ? (int) y : y > 0 ? 1 : 0;
    }

    private static void shuffle(int[] a, RandomGenerator rng) {
        for (int i = a.length - 1; i > 0; i--) {
            int j = rng.nextInt(i + 1);
            int t = a[i];
            a[i] = a[j];
            a[j] = t;
        }
    }

    int heldOutRows() {
        return heldOut;
    }

    int fittedRows() {
        return order.length - heldOut;
    }

    /** @return the table's row indices held out (ascending within each class, in the shuffle's order) */
    int[] heldOutIndices() {
        return java.util.Arrays.copyOf(order, heldOut);
    }

    /** The rows fitted, as a dataset (class labels for a multiclass loss, else real targets). */
    Dataset fitted(boolean multiclass) {
        return dataset(heldOut, order.length, multiclass);
    }

    /** The rows held out, as a dataset, or null when none are. */
    Dataset heldOut(boolean multiclass) {
        return heldOut == 0 ? null : dataset(0, heldOut, multiclass);
    }

    private Dataset dataset(int from, int to, boolean multiclass) {
        double[][] x = new double[to - from][];
        double[] y = new double[to - from];
        for (int r = from; r < to; r++) {
            x[r - from] = table.x[order[r]];
            y[r - from] = table.y[order[r]];
        }
        if (multiclass) {
            int[] labels = new int[y.length];
            for (int i = 0; i < y.length; i++) {
                labels[i] = (int) y[i];
            }
            return Dataset.builder().features(x).labels(labels, classes).build();
        }
        return Dataset.of(x, y);
    }
}
