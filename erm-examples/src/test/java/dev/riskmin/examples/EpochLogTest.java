package dev.riskmin.examples;

import org.junit.jupiter.api.Test;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

/** The figures in epoch lines: four significant digits, whatever the default locale. */
class EpochLogTest {
    @Test
    void figuresHaveFourSignificantDigitsAndNoTrailingZeros() {
        assertEquals("0.09213", EpochLog.figure(0.0921349));
        assertEquals("212", EpochLog.figure(212.0));
        assertEquals("212.5", EpochLog.figure(212.5));
        assertEquals("1.5e-07", EpochLog.figure(1.5e-7));
        assertEquals("2.987e+14", EpochLog.figure(2.98712e14));
        assertEquals("-3", EpochLog.figure(-3.0));
        assertEquals("0", EpochLog.figure(-0.0));
        assertEquals("NaN", EpochLog.figure(Double.NaN));
        assertEquals("Infinity", EpochLog.figure(Double.POSITIVE_INFINITY));
    }

    @Test
    void theNumberOfLinesMustBePositive() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> EpochLog.labelled("x").withMaxLines(0));
        assertEquals("maxLines (0) must be >= 1", e.getMessage());
    }
}
