package dev.riskmin.data;

/**
 * Validation and normalization of sample weights: ω<sub>i</sub> = n w<sub>i</sub> / Σ<sub>k</sub> w<sub>k</sub>,
 * so the weights have mean one and the weighted data term (1/n) Σ ω<sub>i</sub> ℓ<sub>i</sub> is the
 * weighted mean loss.
 */
public final class SampleWeights {
    private SampleWeights() {
    }

    /**
     * @param weights read only; length n, finite, ≥ 0, not all zero
     * @param n       the number of samples they belong to
     * @return a new array of normalized weights ω (mean one)
     * @throws IllegalArgumentException naming the first negative or non-finite weight, a length
     *                                  mismatch, or weights that are all zero
     */
    public static double[] normalize(double[] weights, int n) {
        if (weights.length != n) {
            throw new IllegalArgumentException("weights have " + weights.length + " entries, but there are " + n
                    + " rows");
        }
        double max = 0;
        for (int i = 0; i < n; i++) {
            double w = weights[i];
            if (!Double.isFinite(w) || w < 0) {
                throw new IllegalArgumentException("weights[" + i + "] (" + w + ") must be finite and >= 0");
            }
            max = Math.max(max, w);
        }
        if (!(max > 0)) {
            throw new IllegalArgumentException("weights are all zero (" + n + " rows): nothing to fit");
        }
        // Dividing by the largest weight first keeps the sum in [1, n] and n / sum in [1, n], so
        // neither huge weights (sum overflows) nor subnormal ones (n / sum overflows) break ω.
        double sum = 0;
        for (int i = 0; i < n; i++) {
            sum += weights[i] / max;
        }
        double scale = n / sum;
        double[] omega = new double[n];
        for (int i = 0; i < n; i++) {
            omega[i] = (weights[i] / max) * scale;
        }
        return omega;
    }
}
