package dev.riskmin.diagnostics.stopping;

import dev.riskmin.util.Arguments;
import org.apache.commons.math3.distribution.TDistribution;

/**
 * The statistic of the fluctuation–dissipation test (Yaida, arXiv:1810.00004, ICLR 2019; the test of
 * Lang, Zhang &amp; Xiao, "Using statistics to automate stochastic optimization", NeurIPS 2019,
 * arXiv:1909.09785), as a pure computation on a window of paired values z<sub>k</sub> (the
 * fluctuation–dissipation residual) and v<sub>k</sub> (its scale):
 * <ul>
 * <li>Batch means (METHODS §4, confirmed against the authors' research code): of the N window values,
 * batches of m = ⌊√N⌋ consecutive values, b = ⌊N/m⌋ batches (the newest b·m values are used);
 * z̄ and v̄ are their means, z̄<sub>j</sub> the batch means, and the long-run variance is
 * σ² = (m/(b − 1)) Σ<sub>j</sub> (z̄<sub>j</sub> − z̄)², with df = m − 1 degrees of freedom (the
 * code's choice; since b ≥ m it is the conservative one of m − 1 and the textbook b − 1).</li>
 * <li>Interval: z̄ ± h with h = t<sub>1−γ/2, df</sub> σ/√(b m) (the Student t quantile from
 * commons-math3).</li>
 * <li>Equivalence (not "0 inside the interval"): the interval lies inside the band
 * (−δ v̄, δ v̄), i.e. −δ v̄ &lt; z̄ − h and z̄ + h &lt; δ v̄.</li>
 * <li>Guards (same source): the means of the two halves of the used values share a sign; before the
 * first cut of a fit each half's mean z̄<sub>i</sub> must also satisfy −δ v̄ &lt; z̄<sub>i</sub> − h and
 * z̄<sub>i</sub> + h &lt; δ v̄.</li>
 * </ul>
 * As a hypothesis test: H<sub>0</sub> "not stationary", |E z| ≥ δ E v, against H<sub>1</sub>
 * |E z| &lt; δ E v. The equivalence rule is the two one-sided tests procedure (Schuirmann, J.
 * Pharmacokinet. Biopharm. 15, 1987), each side at level γ/2, so its false-alarm probability (firing
 * under H<sub>0</sub>) is at most about γ/2, attained at the band's edge |E z| = δ E v; the guards
 * only lower it.
 *
 * <p>Immutable and thread-safe. {@link #evaluate} allocates its result and the t distribution:
 * call it at a test's cadence, never per step.
 */
public final class BatchMeansEquivalence {
    private final double delta;
    private final double gamma;

    private BatchMeansEquivalence(double delta, double gamma) {
        this.delta = delta;
        this.gamma = gamma;
    }

    /**
     * @param delta the relative half-width δ of the equivalence band (−δ v̄, δ v̄), in (0, 1)
     * @param gamma the significance γ of the interval z̄ ± h (confidence 1 − γ), in (0, 1)
     * @throws IllegalArgumentException naming the option if delta or gamma is outside (0, 1)
     */
    public static BatchMeansEquivalence of(double delta, double gamma) {
        Arguments.inOpenRange("delta", delta, 0.0, 1.0);
        Arguments.inOpenRange("gamma", gamma, 0.0, 1.0);
        return new BatchMeansEquivalence(delta, gamma);
    }

    public double delta() {
        return delta;
    }

    public double gamma() {
        return gamma;
    }

    /**
     * Evaluates the test on the window z[start], z[start + 1], …, of {@code length} values, indices
     * taken modulo the array length (so a ring buffer can be passed as it is); v likewise.
     *
     * @param z              read only; the residuals
     * @param v              read only; the scales (same length as z)
     * @param start          the index of the oldest window value, in [0, z.length)
     * @param length         N, at most z.length
     * @param beforeFirstCut whether the fit has not yet been cut (adds the per-half guard)
     * @return the figures and the decision; {@link Outcome#fires()} is false when N &lt; 4 (too few values
     * for two batches of two)
     * @throws IllegalArgumentException if the arrays differ in length or start/length are out of range
     */
    public Outcome evaluate(double[] z, double[] v, int start, int length, boolean beforeFirstCut) {
        int cap = z.length;
        if (v.length != cap) {
            throw new IllegalArgumentException("z has " + cap + " entries, v " + v.length);
        }
        if (start < 0 || (cap > 0 && start >= cap) || (cap == 0 && start != 0)) {
            throw new IllegalArgumentException("start (" + start + ") must be in [0, " + cap + ")");
        }
        if (length < 0 || length > cap) {
            throw new IllegalArgumentException("length (" + length + ") must be in [0, " + cap + "]");
        }
        if (length < 4) {
            return new Outcome(length, 0, 0, Double.NaN, Double.NaN, Double.NaN, 0, Double.NaN, Double.NaN,
                    Double.NaN, Double.NaN, false, false);
        }
        int m = (int) Math.floor(Math.sqrt(length));
        int b = length / m;
        int used = b * m;
        int first = start + (length - used); // drop the oldest leftovers
        double zSum = 0;
        double vSum = 0;
        double firstHalf = 0;
        int half = used / 2;
        for (int k = 0; k < used; k++) {
            int i = (first + k) % cap;
            zSum += z[i];
            vSum += v[i];
            if (k == half - 1) {
                firstHalf = zSum;
            }
        }
        double zMean = zSum / used;
        double vMean = vSum / used;
        double firstHalfMean = firstHalf / half;
        double secondHalfMean = (zSum - firstHalf) / (used - half);
        double variance = batchMeansVariance(z, first, m, b, zMean);
        int df = m - 1;
        double quantile = new TDistribution(null, df).inverseCumulativeProbability(1 - gamma / 2);
        double h = quantile * Math.sqrt(variance / used);
        double band = delta * vMean;
        boolean equivalent = -band < zMean - h && zMean + h < band;
        boolean guards = firstHalfMean * secondHalfMean > 0;
        if (beforeFirstCut) {
            guards &= -band < firstHalfMean - h && firstHalfMean + h < band
                    && -band < secondHalfMean - h && secondHalfMean + h < band;
        }
        return new Outcome(used, m, b, zMean, vMean, variance, df, h, band, firstHalfMean, secondHalfMean,
                equivalent, guards);
    }

    /**
     * The batch-means estimate of the long-run variance σ² = lim N Var(x̄) of a stationary series
     * (the same m = ⌊√N⌋, b = ⌊N/m⌋ and newest b·m values as {@link #evaluate}). For an AR(1) series
     * x<sub>t</sub> = ρ x<sub>t−1</sub> + e<sub>t</sub> it tends to s<sub>e</sub>²/(1 − ρ)².
     *
     * @param x read only; indices modulo x.length as in {@link #evaluate}
     * @return σ², or NaN when length &lt; 4
     */
    public static double longRunVariance(double[] x, int start, int length) {
        if (length < 0 || length > x.length) {
            throw new IllegalArgumentException("length (" + length + ") must be in [0, " + x.length + "]");
        }
        if (start < 0 || (x.length > 0 && start >= x.length)) {
            throw new IllegalArgumentException("start (" + start + ") must be in [0, " + x.length + ")");
        }
        if (length < 4) {
            return Double.NaN;
        }
        int m = (int) Math.floor(Math.sqrt(length));
        int b = length / m;
        int used = b * m;
        int first = start + (length - used);
        double sum = 0;
        for (int k = 0; k < used; k++) {
            sum += x[(first + k) % x.length];
        }
        return batchMeansVariance(x, first, m, b, sum / used);
    }

    /** (m/(b − 1)) Σ<sub>j</sub> (x̄<sub>j</sub> − mean)² over b batches of m values from index first (modulo). */
    private static double batchMeansVariance(double[] x, int first, int m, int b, double mean) {
        int cap = x.length;
        double squares = 0;
        for (int j = 0; j < b; j++) {
            double s = 0;
            for (int k = 0; k < m; k++) {
                s += x[(first + j * m + k) % cap];
            }
            double d = s / m - mean;
            squares += d * d;
        }
        return m * squares / (b - 1);
    }

    /**
     * One evaluation.
     *
     * @param samples          the number of values used, b·m
     * @param batchSize        m
     * @param batches          b
     * @param zMean            z̄
     * @param vMean            v̄
     * @param longRunVariance  σ²
     * @param degreesOfFreedom df = m − 1
     * @param halfWidth        h = t<sub>1−γ/2, df</sub> σ/√(b m)
     * @param band             δ v̄
     * @param firstHalfMean    the mean of z over the older half of the used values
     * @param secondHalfMean   the mean of z over the newer half
     * @param equivalent       whether z̄ ± h lies inside (−δ v̄, δ v̄)
     * @param guardsPass       whether the guards hold
     */
    public record Outcome(int samples, int batchSize, int batches, double zMean, double vMean,
                          double longRunVariance, int degreesOfFreedom, double halfWidth, double band,
                          double firstHalfMean, double secondHalfMean, boolean equivalent, boolean guardsPass) {

        /** @return whether the test declares stationarity: the interval is inside the band and the guards hold */
        public boolean fires() {
            return equivalent && guardsPass;
        }

        /** @return |z̄| + h, the farthest end of the interval from 0, which must fall below {@link #band()} */
        public double statistic() {
            return Math.abs(zMean) + halfWidth;
        }
    }
}
