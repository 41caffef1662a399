package dev.riskmin.sampling;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.riskmin.testing.Cases;
import java.util.Arrays;
import org.apache.commons.math3.stat.inference.ChiSquareTest;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

class WithReplacementSamplingTest {

    @ParameterizedTest(name = "seed={0}")
    @ValueSource(longs = {11, 12, 13})
    void drawFrequenciesPassChiSquareAgainstUniform(long seed) {
        int n = 50;
        int batchSize = 16;
        int batches = 12_500; // 200,000 draws, 4,000 expected per sample
        BatchSource source = Sampling.withReplacement().start(SamplingContext.of(n, null, null), Cases.rng(seed));
        assertTrue(source.uniformScales());
        int[] batch = new int[batchSize];
        double[] scales = new double[batchSize];
        long[] observed = new long[n];
        for (int b = 0; b < batches; b++) {
            Arrays.fill(scales, Double.NaN);
            source.next(batch, scales, batchSize);
            for (int k = 0; k < batchSize; k++) {
                observed[batch[k]]++;
                assertEquals(1.0, scales[k]);
            }
        }
        double[] expected = new double[n];
        Arrays.fill(expected, 1.0 / n);
        // Pearson chi-square goodness of fit at alpha = 0.001 (commons-math3 ChiSquareTest; fixed seeds).
        assertFalse(new ChiSquareTest().chiSquareTest(expected, observed, 0.001),
                "frequencies reject uniform: p = " + new ChiSquareTest().chiSquareTest(expected, observed));
    }
}
