package dev.riskmin.diagnostics.estimator;

/**
 * Gradient-noise statistics as pure functions on flat arrays (METHODS §1–2). Nothing here
 * allocates, so a monitor may call these at every probe.
 *
 * <p>Notation (METHODS): per-sample gradients g<sub>i</sub> = ∇f<sub>i</sub>(h), i = 1 … n; the full
 * gradient G = (1/n) Σ<sub>i</sub> g<sub>i</sub>; the population covariance
 * Σ = (1/n) Σ<sub>i</sub> (g<sub>i</sub> − G)(g<sub>i</sub> − G)<sup>T</sup> and S² = n Σ/(n − 1). A batch
 * g<sub>1</sub> … g<sub>B</sub> is stored row-major: row j occupies {@code gradients[j p … j p + p)}.
 *
 * <p>Sources:
 * <ul>
 * <li>Variance of a batch mean with and without replacement, the finite-population correction and
 * stratified sampling: W. G. Cochran, <i>Sampling Techniques</i>, 3rd ed., Wiley 1977, ch. 2 (simple
 * random sampling) and ch. 5 (stratified random sampling); chapter numbers from memory. Each
 * coordinate of the gradient is one "variable" of Cochran's theory; the trace sums the
 * coordinates.</li>
 * <li>Two-batch estimates and the simple noise scale: S. McCandlish, J. Kaplan, D. Amodei et al.,
 * "An Empirical Model of Large-Batch Training", arXiv:1812.06162, 2018 (appendix A for the
 * estimators; appendix and section numbers from memory).</li>
 * </ul>
 *
 * <p>Non-finite values propagate: a NaN or infinite gradient entry gives a NaN or infinite result.
 * A quantity that cannot be formed from the data (a sample variance of one row) is NaN.
 */
public final class NoiseStatistics {
    private NoiseStatistics() {
    }

    // ---- one batch ------------------------------------------------------------------------------

    /**
     * The one-batch trace estimator T = (1/(B − 1)) Σ<sub>j</sub> ‖g<sub>j</sub> − ḡ‖², ḡ the row mean.
     * E[T] = tr Σ when the rows are drawn uniformly with replacement, and E[T] = tr S² when they
     * are drawn without replacement (Cochran 1977, ch. 2: the sample variance is unbiased for
     * S² under simple random sampling; METHODS §1).
     *
     * @param gradients read only; at least rows × p entries, row-major
     * @param rows      B ≥ 0
     * @param p         the number of parameters, ≥ 1
     * @return T, or NaN when B &lt; 2
     */
    public static double sampleTrace(double[] gradients, int rows, int p) {
        return sampleTrace(gradients, null, rows, p);
    }

    /**
     * The one-batch trace estimator of the scaled rows u<sub>j</sub> = s<sub>j</sub> g<sub>j</sub>:
     * T = (1/(B − 1)) Σ<sub>j</sub> ‖u<sub>j</sub> − ū‖². With importance sampling the u<sub>j</sub>
     * (scale s = 1/(n p<sub>i</sub>)) are the i.i.d. terms whose mean is the batch gradient, so T is
     * unbiased for the trace of their covariance Σ<sub>p</sub> = Σ<sub>i</sub> p<sub>i</sub>
     * (g<sub>i</sub>/(n p<sub>i</sub>) − G)(…)<sup>T</sup> (METHODS §9 with §1).
     *
     * @param gradients read only; at least rows × p entries, row-major
     * @param scales    read only; at least rows entries, or null for all one
     * @param rows      B ≥ 0
     * @param p         ≥ 1
     * @return T, or NaN when B &lt; 2
     * @implNote Two passes per coordinate (mean, then squared deviations), so no cancellation of the
     * form Σ‖g‖² − B‖ḡ‖² and no work array.
     */
    public static double sampleTrace(double[] gradients, double[] scales, int rows, int p) {
        checkBlock(gradients, scales, rows, p);
        if (rows < 2) {
            return Double.NaN;
        }
        double inverseRows = 1.0 / rows;
        double sum = 0;
        for (int c = 0; c < p; c++) {
            double mean = 0;
            for (int j = 0, at = c; j < rows; j++, at += p) {
                mean += scales == null ? gradients[at] : scales[j] * gradients[at];
            }
            mean *= inverseRows;
            for (int j = 0, at = c; j < rows; j++, at += p) {
                double d = (scales == null ? gradients[at] : scales[j] * gradients[at]) - mean;
                sum += d * d;
            }
        }
        return sum / (rows - 1);
    }

    /**
     * tr Σ = (1/n) Σ<sub>i</sub> ‖g<sub>i</sub> − G‖² of a whole population of n rows (the exact
     * gradient-noise variance when the rows are all n per-sample gradients).
     *
     * @param gradients read only; at least rows × p entries
     * @param rows      n ≥ 1
     * @return tr Σ (0 for a single row)
     */
    public static double populationTrace(double[] gradients, int rows, int p) {
        checkBlock(gradients, null, rows, p);
        if (rows < 1) {
            throw new IllegalArgumentException("rows (" + rows + ") must be >= 1 for a population trace");
        }
        return rows == 1 ? 0.0 : sampleTrace(gradients, null, rows, p) * (rows - 1) / rows;
    }

    /**
     * ū = (1/B) Σ<sub>j</sub> s<sub>j</sub> g<sub>j</sub>, the (scaled) batch mean.
     *
     * @param gradients read only
     * @param scales    read only, or null for all one
     * @param rows      B ≥ 1
     * @param into      written; length ≥ p
     */
    public static void meanGradient(double[] gradients, double[] scales, int rows, int p, double[] into) {
        checkBlock(gradients, scales, rows, p);
        if (rows < 1) {
            throw new IllegalArgumentException("rows (" + rows + ") must be >= 1 for a mean");
        }
        if (into.length < p) {
            throw new IllegalArgumentException("into has " + into.length + " entries, p is " + p);
        }
        java.util.Arrays.fill(into, 0, p, 0.0);
        for (int j = 0; j < rows; j++) {
            double s = scales == null ? 1.0 : scales[j];
            int base = j * p;
            for (int c = 0; c < p; c++) {
                into[c] += s * gradients[base + c];
            }
        }
        double inverseRows = 1.0 / rows;
        for (int c = 0; c < p; c++) {
            into[c] *= inverseRows;
        }
    }

    // ---- variance of the batch mean -------------------------------------------------------------

    /**
     * E‖g<sub>B</sub> − G‖² = tr Σ / B for B draws with replacement (Cov(g<sub>B</sub>) = Σ/B; METHODS §1).
     *
     * @param traceSigma tr Σ ≥ 0
     * @param batch      B ≥ 1
     */
    public static double withReplacementVariance(double traceSigma, int batch) {
        checkBatch(batch);
        return traceSigma / batch;
    }

    /**
     * E‖g<sub>B</sub> − G‖² = (1 − B/n) tr S² / B for B draws without replacement from n, equal to
     * tr Σ (n − B)/(B (n − 1)); the factor (n − B)/(n − 1) is the finite-population correction
     * (Cochran 1977, ch. 2, chapter from memory; METHODS §1). Zero when B = n.
     *
     * @param traceS2    tr S² ≥ 0
     * @param batch      1 ≤ B ≤ n
     * @param population n ≥ 1
     */
    public static double withoutReplacementVariance(double traceS2, int batch, int population) {
        checkBatch(batch);
        checkAtMost(batch, population);
        return (1.0 - (double) batch / population) * traceS2 / batch;
    }

    /**
     * The same variance from tr Σ: tr Σ (n − B)/(B (n − 1)) (Cochran 1977, ch. 2; METHODS §1).
     *
     * @param traceSigma tr Σ ≥ 0
     * @param batch      1 ≤ B ≤ n
     * @param population n ≥ 2 (with n = 1 the variance is 0)
     */
    public static double withoutReplacementVarianceFromSigma(double traceSigma, int batch, int population) {
        checkBatch(batch);
        checkAtMost(batch, population);
        if (population == 1) {
            return 0.0;
        }
        return traceSigma * (population - batch) / ((double) batch * (population - 1));
    }

    /** @return tr Σ = ((n − 1)/n) tr S², for a population of n ≥ 1 */
    public static double traceSigmaFromS2(double traceS2, int population) {
        checkBatch(population);
        return traceS2 * (population - 1) / population;
    }

    /** @return tr S² = (n/(n − 1)) tr Σ, for a population of n ≥ 2 */
    public static double traceS2FromSigma(double traceSigma, int population) {
        if (population < 2) {
            throw new IllegalArgumentException("population (" + population + ") must be >= 2 for S²");
        }
        return traceSigma * population / (population - 1);
    }

    /**
     * E‖g<sub>st</sub> − G‖² = Σ<sub>h</sub> W<sub>h</sub>² (1 − n<sub>h</sub>/N<sub>h</sub>) tr S²<sub>h</sub>/n<sub>h</sub>
     * for the stratified estimator g<sub>st</sub> = Σ<sub>h</sub> W<sub>h</sub> ḡ<sub>h</sub>, with
     * n<sub>h</sub> draws without replacement from stratum h of size N<sub>h</sub>, weight
     * W<sub>h</sub> = N<sub>h</sub>/N, and S²<sub>h</sub> the stratum's S² (Cochran 1977, ch. 5, chapter
     * from memory; METHODS §1).
     *
     * @param weights read only; W<sub>h</sub>, h &lt; strata
     * @param drawn   read only; n<sub>h</sub> ≥ 1 with n<sub>h</sub> ≤ N<sub>h</sub>
     * @param sizes   read only; N<sub>h</sub> ≥ 1
     * @param traceS2 read only; tr S²<sub>h</sub> (any value when N<sub>h</sub> = n<sub>h</sub>, whose term is 0)
     * @param strata  the number of strata, ≥ 1
     */
    public static double stratifiedVariance(double[] weights, int[] drawn, int[] sizes, double[] traceS2, int strata) {
        if (strata < 1 || weights.length < strata || drawn.length < strata || sizes.length < strata
                || traceS2.length < strata) {
            throw new IllegalArgumentException("strata (" + strata + ") must be >= 1 and at most the lengths of"
                    + " weights (" + weights.length + "), drawn (" + drawn.length + "), sizes (" + sizes.length
                    + ") and traceS2 (" + traceS2.length + ")");
        }
        double sum = 0;
        for (int h = 0; h < strata; h++) {
            int nh = drawn[h];
            int bigNh = sizes[h];
            if (nh < 1 || nh > bigNh) {
                throw new IllegalArgumentException("drawn[" + h + "] (" + nh + ") must be in [1, sizes[" + h + "] = "
                        + bigNh + "]");
            }
            if (nh == bigNh) {
                continue; // a census of the stratum: no sampling error
            }
            double w = weights[h];
            sum += w * w * (1.0 - (double) nh / bigNh) * traceS2[h] / nh;
        }
        return sum;
    }

    /**
     * The stratified variance under proportional allocation n<sub>h</sub> = B W<sub>h</sub>:
     * ((1 − B/N)/B) Σ<sub>h</sub> W<sub>h</sub> tr S²<sub>h</sub> (Cochran 1977, ch. 5, chapter from
     * memory; METHODS §1).
     *
     * @param weights    read only; W<sub>h</sub>
     * @param traceS2    read only; tr S²<sub>h</sub>
     * @param strata     ≥ 1
     * @param batch      1 ≤ B ≤ N
     * @param population N
     */
    public static double proportionalStratifiedVariance(double[] weights, double[] traceS2, int strata, int batch,
                                                        int population) {
        checkBatch(batch);
        checkAtMost(batch, population);
        if (strata < 1 || weights.length < strata || traceS2.length < strata) {
            throw new IllegalArgumentException("strata (" + strata + ") must be >= 1 and at most the lengths of"
                    + " weights (" + weights.length + ") and traceS2 (" + traceS2.length + ")");
        }
        double sum = 0;
        for (int h = 0; h < strata; h++) {
            sum += weights[h] * traceS2[h];
        }
        return (1.0 - (double) batch / population) / batch * sum;
    }

    // ---- |G|² and the noise scale ---------------------------------------------------------------

    /**
     * An unbiased estimate of ‖G‖² from one batch mean: ‖ū‖² − V, where V is an unbiased estimate of
     * the batch mean's variance E‖ū − G‖² (for example T/B with replacement). It follows from
     * E‖ū‖² = ‖G‖² + E‖ū − G‖² (METHODS §2). Not floored: it can be negative.
     *
     * @param batchNormSquared ‖ū‖²
     * @param meanVariance     the estimate V
     */
    public static double correctedNormSquared(double batchNormSquared, double meanVariance) {
        return batchNormSquared - meanVariance;
    }

    /**
     * The two-batch unbiased estimate of ‖G‖² (McCandlish et al. 2018, appendix A, from memory; METHODS §2):
     * (B<sub>big</sub> ‖G<sub>big</sub>‖² − B<sub>small</sub> ‖G<sub>small</sub>‖²)/(B<sub>big</sub> − B<sub>small</sub>),
     * for independent batches drawn with replacement, from E‖G<sub>B</sub>‖² = ‖G‖² + tr Σ/B.
     * Not floored: it can be negative.
     *
     * @return the estimate, or NaN when the two sizes are equal (no information)
     */
    public static double twoBatchNormSquared(double smallNormSquared, int smallBatch, double bigNormSquared,
                                             int bigBatch) {
        checkBatch(smallBatch);
        checkBatch(bigBatch);
        if (smallBatch == bigBatch) {
            return Double.NaN;
        }
        return ((double) bigBatch * bigNormSquared - (double) smallBatch * smallNormSquared)
                / ((double) bigBatch - smallBatch);
    }

    /**
     * The two-batch unbiased estimate of tr Σ (McCandlish et al. 2018, appendix A, from memory; METHODS §2):
     * S = (‖G<sub>small</sub>‖² − ‖G<sub>big</sub>‖²)/(1/B<sub>small</sub> − 1/B<sub>big</sub>).
     * Zero when all g<sub>i</sub> are equal. Not floored: it can be negative.
     *
     * @return the estimate, or NaN when the two sizes are equal
     */
    public static double twoBatchTrace(double smallNormSquared, int smallBatch, double bigNormSquared, int bigBatch) {
        checkBatch(smallBatch);
        checkBatch(bigBatch);
        if (smallBatch == bigBatch) {
            return Double.NaN;
        }
        return (smallNormSquared - bigNormSquared) / (1.0 / smallBatch - 1.0 / bigBatch);
    }

    /**
     * The simple noise scale B<sub>simple</sub> = tr Σ / ‖G‖² (McCandlish et al. 2018, §2, section from memory; METHODS §2):
     * the noise scale B<sub>noise</sub> = tr(HΣ)/(G<sup>T</sup>HG) when the Hessian H is a multiple of
     * the identity. Pass separately smoothed numerator and denominator: the ratio of two noisy
     * estimates is biased, and smoothing each first shrinks that bias.
     *
     * @return tr Σ / ‖G‖² (infinite when ‖G‖² = 0 &lt; tr Σ, NaN when both are 0)
     */
    public static double noiseScale(double traceSigma, double normSquared) {
        return traceSigma / normSquared;
    }

    /**
     * The batch size the noise scale suggests: ⌈B<sub>simple</sub>⌉, at least 1 and at most
     * {@code cap} (McCandlish et al. 2018: batches beyond about B<sub>noise</sub> bring diminishing
     * returns, so B<sub>simple</sub> is the useful size).
     *
     * @param cap ≥ 1 (n for sampling without replacement, {@link Integer#MAX_VALUE} otherwise)
     * @return the suggestion, or 1 when the noise scale is NaN or not positive
     */
    public static int suggestedBatchSize(double noiseScale, int cap) {
        checkBatch(cap);
        if (!(noiseScale > 1)) {
            return 1;
        }
        return noiseScale >= cap ? cap : (int) Math.ceil(noiseScale);
    }

    // ---- vectors --------------------------------------------------------------------------------

    /** @return Σ<sub>c &lt; p</sub> a<sub>c</sub> b<sub>c</sub> */
    public static double dot(double[] a, double[] b, int p) {
        double s = 0;
        for (int c = 0; c < p; c++) {
            s += a[c] * b[c];
        }
        return s;
    }

    /** @return ‖a‖² over the first p entries */
    public static double normSquared(double[] a, int p) {
        return dot(a, a, p);
    }

    /** @return ‖a − b‖² over the first p entries */
    public static double distanceSquared(double[] a, double[] b, int p) {
        double s = 0;
        for (int c = 0; c < p; c++) {
            double d = a[c] - b[c];
            s += d * d;
        }
        return s;
    }

    private static void checkBlock(double[] gradients, double[] scales, int rows, int p) {
        if (p < 1) {
            throw new IllegalArgumentException("p (" + p + ") must be >= 1");
        }
        if (rows < 0 || (long) rows * p > gradients.length) {
            throw new IllegalArgumentException("rows (" + rows + ") x p (" + p + ") must be >= 0 and fit in the "
                    + gradients.length + " gradient entries");
        }
        if (scales != null && scales.length < rows) {
            throw new IllegalArgumentException("scales has " + scales.length + " entries, rows is " + rows);
        }
    }

    private static void checkBatch(int batch) {
        if (batch < 1) {
            throw new IllegalArgumentException("batch size (" + batch + ") must be >= 1");
        }
    }

    private static void checkAtMost(int batch, int population) {
        if (batch > population) {
            throw new IllegalArgumentException("batch size (" + batch + ") must be at most the population ("
                    + population + ") without replacement");
        }
    }
}
