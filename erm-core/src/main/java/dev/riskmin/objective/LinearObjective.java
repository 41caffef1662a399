package dev.riskmin.objective;

import dev.riskmin.data.Dataset;
import dev.riskmin.data.DenseFeatures;
import dev.riskmin.data.FeatureMatrix;
import dev.riskmin.data.SparseFeatures;
import dev.riskmin.loss.Loss;
import dev.riskmin.penalty.Penalty;

/**
 * The objective of a single-output linear model, L(h) = (1/n) Σ<sub>i</sub> ω<sub>i</sub> ℓ(w·x<sub>i</sub> + b, y<sub>i</sub>) + R(w),
 * with h = (w<sub>0</sub>, …, w<sub>d−1</sub>, b) (or h = w without an intercept). The gradient of a
 * sample is ω<sub>i</sub> ℓ'(z<sub>i</sub>, y<sub>i</sub>) (x<sub>i</sub>, 1): one dot product and one scaled row addition,
 * on the flat dense array or the CSR arrays directly.
 *
 * <p>Every target is checked against the loss's domain at construction.
 *
 * <p>Built with {@link GradientThreads} of T &gt; 1 threads, {@link #batchGradient} splits batches of at
 * least the threads' threshold into T chunks evaluated at once and summed in a fixed order (same bits
 * on every run; see there). {@link #prefetchRows} reads a range of rows ahead of a randomly ordered
 * visit (used by block-shuffled sampling).
 */
public final class LinearObjective extends PenalizedObjective implements LinearStructure {
    private static final int DOUBLES_PER_LINE = 8; // 64-byte cache lines

    private final FeatureMatrix x;
    private final DenseFeatures dense;   // non-null on the dense path
    private final SparseFeatures sparse; // non-null on the sparse path
    private final double[] y;
    private final double[] omega; // null: all ones
    private final Loss loss;
    private final int n;
    private final int d;
    private final boolean intercept;
    private double prefetched; // the sink of prefetchRows, read by nothing

    private final GradientThreads threads;     // null: sequential only
    private final double[][] partialGradients; // chunk c ≥ 1 accumulates here; chunk 0 into g
    private final double[] partialLosses;
    private final ChunkJob chunkJob;           // null when sequential

    private LinearObjective(Dataset data, Loss loss, Penalty penalty, boolean intercept, GradientThreads threads) {
        super(PenaltyLayout.blocks(penalty, 1, data.dimension(), intercept));
        this.x = data.features();
        this.dense = x instanceof DenseFeatures ? (DenseFeatures) x : null;
        this.sparse = x instanceof SparseFeatures ? (SparseFeatures) x : null;
        this.y = data.targetsView();
        this.omega = data.normalizedWeightsView();
        this.loss = loss;
        this.n = data.size();
        this.d = data.dimension();
        this.intercept = intercept;
        for (int i = 0; i < n; i++) {
            loss.requireTarget(y[i], i);
        }
        this.threads = threads;
        int chunks = threads == null ? 1 : threads.threads();
        this.partialGradients = new double[chunks][];
        for (int c = 1; c < chunks; c++) {
            // Padding of two cache lines keeps each worker's hot buffer off the lines of its neighbours.
            partialGradients[c] = new double[dimension() + 2 * DOUBLES_PER_LINE];
        }
        this.partialLosses = new double[chunks * DOUBLES_PER_LINE]; // chunk c at c · 8: one line each
        this.chunkJob = chunks > 1 ? new ChunkJob() : null;
    }

    /**
     * @param intercept whether h carries an unpenalized intercept b = h[d]
     * @throws IllegalArgumentException naming the row and value of the first target outside the loss's domain
     */
    public static LinearObjective of(Dataset data, Loss loss, Penalty penalty, boolean intercept) {
        if (data == null || loss == null || penalty == null) {
            throw new NullPointerException("data, loss and penalty must not be null");
        }
        return new LinearObjective(data, loss, penalty, intercept, null);
    }

    /**
     * Like {@link #of(Dataset, Loss, Penalty, boolean)}, with batch gradients of at least
     * {@code threads.parallelThreshold()} draws split across {@code threads.threads()} threads (see
     * {@link #batchGradient}). The caller owns {@code threads} and closes it when done; it must serve
     * no other objective at the same time. The loss is then called from several threads at once, so it
     * must be stateless or thread-safe (the library's losses are).
     *
     * @throws IllegalArgumentException naming the row and value of the first target outside the loss's domain
     */
    public static LinearObjective of(Dataset data, Loss loss, Penalty penalty, boolean intercept,
                                     GradientThreads threads) {
        if (data == null || loss == null || penalty == null || threads == null) {
            throw new NullPointerException("data, loss, penalty and threads must not be null");
        }
        return new LinearObjective(data, loss, penalty, intercept, threads.threads() > 1 ? threads : null);
    }

    public Loss loss() {
        return loss;
    }

    @Override
    public FeatureMatrix features() {
        return x;
    }

    @Override
    public boolean hasIntercept() {
        return intercept;
    }

    @Override
    public int size() {
        return n;
    }

    @Override
    public int dimension() {
        return intercept ? d + 1 : d;
    }

    @Override
    public double prediction(double[] h, int i) {
        double z = dense != null ? dense.dot(i, h, 0) : x.dot(i, h, 0);
        return intercept ? z + h[d] : z;
    }

    private double omega(int i) {
        return omega == null ? 1.0 : omega[i];
    }

    @Override
    public double weightedLoss(double z, int i) {
        return omega(i) * loss.value(z, y[i]);
    }

    @Override
    public double weightedDerivative(double z, int i) {
        return omega(i) * loss.derivative(z, y[i]);
    }

    @Override
    public void addFeatures(int i, double scale, double[] g) {
        if (dense != null) {
            dense.addRow(i, scale, g, 0);
        } else {
            x.addRow(i, scale, g, 0);
        }
        if (intercept) {
            g[d] += scale;
        }
    }

    @Override
    public double sampleLoss(double[] h, int i) {
        return omega(i) * loss.value(prediction(h, i), y[i]);
    }

    @Override
    public double addSampleGradient(double[] h, int i, double scale, double[] g) {
        double z = prediction(h, i);
        double w = omega(i);
        addFeatures(i, scale * w * loss.derivative(z, y[i]), g);
        return w * loss.value(z, y[i]);
    }

    /**
     * {@inheritDoc}
     *
     * <p>With {@link GradientThreads} of T &gt; 1 threads and B ≥ their parallel threshold, the batch is
     * cut into T contiguous chunks [⌊cB/T⌋, ⌊(c+1)B/T⌋); chunk 0 is accumulated into g on the calling
     * thread and chunk c ≥ 1 into its own buffer on worker c, each in batch order, and the buffers
     * are then added to g in the order 1, 2, …, T − 1 (the chunk losses likewise, from chunk 0), so
     * the result is the same bits on every run. It differs from the one-thread sum, which adds the
     * B terms one after the other, only by the rounding of the different association (relative
     * differences of order B·2<sup>−52</sup> at worst, far smaller in practice).
     */
    @Override
    public double batchGradient(double[] h, int[] batch, double[] scales, int from, int length, double[] g) {
        java.util.Arrays.fill(g, 0.0);
        double inv = 1.0 / length;
        double lossSum;
        if (threads != null && threads.splits(length)) {
            lossSum = parallelBatch(h, batch, scales, from, length, inv, g);
        } else {
            lossSum = accumulate(h, batch, scales, from, 0, length, inv, g);
        }
        layout.addGradient(h, 1.0, g);
        return lossSum;
    }

    /** g += Σ<sub>k ∈ [lo, hi)</sub> s<sub>k</sub> ω<sub>i</sub> ℓ'(z<sub>i</sub>) (x<sub>i</sub>, 1)/B in batch order; returns the chunk's weighted loss. */
    private double accumulate(double[] h, int[] batch, double[] scales, int from, int lo, int hi, double inv,
                              double[] g) {
        double lossSum = 0;
        for (int k = lo; k < hi; k++) {
            int i = batch[from + k];
            double s = scales == null ? inv : scales[from + k] * inv;
            double z = prediction(h, i);
            double w = omega(i) * s;
            lossSum += w * loss.value(z, y[i]);
            addFeatures(i, w * loss.derivative(z, y[i]), g);
        }
        return lossSum;
    }

    private double parallelBatch(double[] h, int[] batch, double[] scales, int from, int length, double inv,
                                 double[] g) {
        ChunkJob job = chunkJob;
        job.set(h, batch, scales, from, length, inv, g);
        try {
            threads.run(job);
        } finally {
            job.clear();
        }
        int chunks = partialGradients.length;
        int p = dimension();
        double lossSum = partialLosses[0];
        for (int c = 1; c < chunks; c++) {
            double[] part = partialGradients[c];
            for (int j = 0; j < p; j++) {
                g[j] += part[j];
            }
            lossSum += partialLosses[c * DOUBLES_PER_LINE];
        }
        return lossSum;
    }

    /**
     * One batch's chunks, reused for every batch (so nothing is allocated per step). Its fields are
     * written by the calling thread before {@link GradientThreads#run} publishes them.
     */
    private final class ChunkJob implements GradientThreads.Chunks {
        private double[] h;
        private int[] batch;
        private double[] scales;
        private int from;
        private int length;
        private double inv;
        private double[] g;

        void set(double[] h, int[] batch, double[] scales, int from, int length, double inv, double[] g) {
            this.h = h;
            this.batch = batch;
            this.scales = scales;
            this.from = from;
            this.length = length;
            this.inv = inv;
            this.g = g;
        }

        void clear() {
            set(null, null, null, 0, 0, 0, null); // keep no caller arrays alive between steps
        }

        @Override
        public void run(int chunk) {
            int chunks = partialGradients.length;
            int lo = (int) ((long) chunk * length / chunks);
            int hi = (int) ((long) (chunk + 1) * length / chunks);
            double[] target = g;
            if (chunk > 0) {
                target = partialGradients[chunk];
                java.util.Arrays.fill(target, 0.0);
            }
            partialLosses[chunk * DOUBLES_PER_LINE] = accumulate(h, batch, scales, from, lo, hi, inv, target);
        }
    }

    @Override
    public double value(double[] h) {
        double sum = 0;
        for (int i = 0; i < n; i++) {
            sum += omega(i) * loss.value(prediction(h, i), y[i]);
        }
        return sum / n + layout.value(h);
    }

    @Override
    public double gradient(double[] h, double[] g) {
        java.util.Arrays.fill(g, 0.0);
        double inv = 1.0 / n;
        double sum = 0;
        for (int i = 0; i < n; i++) {
            double z = prediction(h, i);
            double w = omega(i);
            sum += w * loss.value(z, y[i]);
            addFeatures(i, inv * w * loss.derivative(z, y[i]), g);
        }
        layout.addGradient(h, 1.0, g);
        return sum * inv + layout.value(h);
    }

    /**
     * Reads rows [from, to) of the features sequentially, one load per 64-byte cache line, so that
     * a sampler about to visit those rows in a random order finds them in cache (see
     * {@code dev.riskmin.sampling.RowPrefetcher}). The loads feed a field, so the compiler cannot drop
     * them; nothing that is computed changes. Allocation-free.
     *
     * @throws IndexOutOfBoundsException unless 0 ≤ from ≤ to ≤ n
     */
    public void prefetchRows(int from, int to) {
        if (from < 0 || from > to || to > n) {
            throw new IndexOutOfBoundsException("rows [" + from + ", " + to + ") outside [0, " + n + ")");
        }
        if (from == to) {
            return;
        }
        double sum = 0;
        if (dense != null) {
            final double[] v = dense.values();
            long lo = (long) from * d;
            long hi = (long) to * d;
            for (long q = lo; q < hi; q += DOUBLES_PER_LINE) {
                sum += v[(int) q];
            }
            sum += v[(int) (hi - 1)]; // the last line, when the range does not start on a line boundary
        } else if (sparse != null) {
            final int[] start = sparse.rowStart();
            final double[] v = sparse.values();
            final int[] column = sparse.columnIndex();
            int lo = start[from];
            int hi = start[to];
            for (int q = lo; q < hi; q += DOUBLES_PER_LINE) {
                sum += v[q] + column[q];
            }
        }
        prefetched += sum;
    }

    @Override
    public double sampleSmoothness(int i) {
        return loss.smoothness() * omega(i) * (x.rowSquaredNorm(i) + (intercept ? 1.0 : 0.0));
    }

    @Override
    public boolean splitsBatches() {
        return threads != null;
    }

    @Override
    public LinearStructure linearStructure() {
        return this;
    }
}
