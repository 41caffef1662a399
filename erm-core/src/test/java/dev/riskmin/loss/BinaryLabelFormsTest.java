package dev.riskmin.loss;

import dev.riskmin.testing.Cases;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertEquals;

/**
 * The binary losses accept y in {0, 1} or {−1, +1} with the same meaning (y' = 2y − 1), and each
 * agrees with its textbook ±1 form (METHODS §11 table; checks: "{0,1} form equals ±1 form").
 */
class BinaryLabelFormsTest {

    private static double sigmoid(double u) {
        return 1.0 / (1.0 + Math.exp(-u));
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void logisticZeroOneFormEqualsPlusMinusOneForm(long seed) {
        RandomGenerator rng = Cases.rng(seed);
        Loss loss = Losses.logistic();
        for (int p = 0; p < 8; p++) {
            double z = 6.0 * rng.nextGaussian();
            int y = rng.nextInt(2);
            int ypm = 2 * y - 1;
            assertEquals(loss.value(z, y), loss.value(z, ypm), 0.0, "z = " + z);
            assertEquals(loss.derivative(z, y), loss.derivative(z, ypm), 0.0, "z = " + z);
            // Textbook forms (METHODS §11): log(1 + e^z) − y z = log(1 + e^(−y'z)); ℓ' = σ(z) − y = −y' σ(−y'z).
            // Elementary calculus; |z| stays small enough here for the naive forms to be accurate.
            double naive01 = Math.log1p(Math.exp(z)) - y * z;
            double naivePm = Math.log1p(Math.exp(-ypm * z));
            assertEquals(naivePm, loss.value(z, y), 1e-12 * (1 + naivePm), "z = " + z);
            assertEquals(naive01, loss.value(z, y), 1e-12 * (1 + Math.abs(z)), "z = " + z);
            assertEquals(-ypm * sigmoid(-ypm * z), loss.derivative(z, y), 1e-15, "z = " + z);
            assertEquals(sigmoid(z) - y, loss.derivative(z, y), 1e-15, "z = " + z);
        }
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void hingeFamilyZeroOneFormEqualsPlusMinusOneForm(long seed) {
        RandomGenerator rng = Cases.rng(seed);
        double gamma = 0.05 + 2 * rng.nextDouble();
        Loss hinge = Losses.hinge();
        Loss squared = Losses.squaredHinge();
        Loss smoothed = Losses.smoothedHinge(gamma);
        for (int p = 0; p < 8; p++) {
            double z = 2.0 * rng.nextGaussian();
            int y = rng.nextInt(2);
            int ypm = 2 * y - 1;
            for (Loss loss : new Loss[] {hinge, squared, smoothed}) {
                assertEquals(loss.value(z, y), loss.value(z, ypm), 0.0, loss + " at z = " + z);
                assertEquals(loss.derivative(z, y), loss.derivative(z, ypm), 0.0, loss + " at z = " + z);
            }
            // Textbook ±1 forms, METHODS §11 table (a = y'z).
            double a = ypm * z;
            double gap = Math.max(0, 1 - a);
            assertEquals(gap, hinge.value(z, y), 1e-15, "hinge at z = " + z);
            assertEquals(a < 1 ? -ypm : 0.0, hinge.derivative(z, y), 0.0, "hinge at z = " + z);
            assertEquals(gap * gap, squared.value(z, y), 1e-14 * (1 + gap * gap), "squared hinge at z = " + z);
            assertEquals(-2 * ypm * gap, squared.derivative(z, y), 1e-14 * (1 + gap), "squared hinge at z = " + z);
            double smooth = a >= 1 ? 0 : a <= 1 - gamma ? 1 - a - gamma / 2 : (1 - a) * (1 - a) / (2 * gamma);
            assertEquals(smooth, smoothed.value(z, y), 1e-14 * (1 + smooth), "smoothed hinge at z = " + z);
            assertEquals(-ypm * Math.min(1, Math.max(0, (1 - a) / gamma)), smoothed.derivative(z, y), 1e-14,
                    "smoothed hinge at z = " + z);
        }
    }
}
