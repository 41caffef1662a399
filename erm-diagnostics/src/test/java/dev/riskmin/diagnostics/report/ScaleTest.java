package dev.riskmin.diagnostics.report;

import dev.riskmin.testing.Cases;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;
import org.junit.jupiter.api.Test;

import java.util.List;
import java.util.random.RandomGenerator;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** Axis ticks: nice decimal steps, exact labels, powers of ten on log axes. */
class ScaleTest {

    static List<String> labels(Scale s) {
        return s.ticks().stream().filter(Scale.Tick::major).map(Scale.Tick::label).toList();
    }

    static double parse(String label) {
        String ascii = label.replace('−', '-');
        return Double.parseDouble(ascii);
    }

    @Test
    void linearTicksAreNiceMultiplesWithExactDecimalLabels() {
        // Nice steps 1, 2, 2.5, 5 times a power of ten (Heckbert, Graphics Gems 1990, from memory).
        assertEquals(List.of("0", "1000", "2000", "3000", "4000"), labels(Scale.linear(0, 3750, 0, 1, 6)));
        assertEquals(List.of("0.1", "0.15", "0.2", "0.25", "0.3"), labels(Scale.linear(0.1, 0.3, 0, 1, 5)));
        assertEquals(List.of("0.3", "0.31", "0.32"), labels(Scale.linear(0.1 + 0.2, 0.32, 0, 1, 2)));
        assertEquals(List.of("−1", "−0.5", "0", "0.5", "1"), labels(Scale.fixed(-1, 1, "0.5", 0, 1)));
        assertEquals(List.of("0", "2e-5", "4e-5"), labels(Scale.linear(0, 4e-5, 0, 1, 2)));
        assertEquals(List.of("0", "2.5e-5", "5e-5"), labels(Scale.linear(0, 4.5e-5, 0, 1, 2)));
        assertEquals(List.of("0", "1e6", "2e6", "3e6"), labels(Scale.linear(0, 2.5e6, 0, 1, 3)));
        // A single value is widened by 10 % (or by 1 around 0) so that it has an axis.
        Scale single = Scale.linear(16, 16, 0, 1, 5);
        assertTrue(single.ticks().get(0).value() < 16 && single.ticks().get(single.ticks().size() - 1).value() > 16);
        assertEquals(List.of("−1", "−0.5", "0", "0.5", "1"), labels(Scale.linear(0, 0, 0, 1, 4)));
    }

    @ParameterizedTest(name = "seed={0}")
    @MethodSource("dev.riskmin.testing.Cases#seeds200")
    void linearTicksCoverTheDataEvenlyAndTheirLabelsParseToTheirValues(long seed) {
        RandomGenerator rng = Cases.rng(seed);
        double scale = Math.pow(10, rng.nextInt(-12, 13));
        double a = (rng.nextDouble() * 2 - 1) * scale;
        double b = a + rng.nextDouble() * scale * Math.pow(10, rng.nextInt(-3, 2));
        int intervals = rng.nextInt(2, 9);
        Scale s = Scale.linear(a, b, 10, 610, intervals);
        List<Scale.Tick> ticks = s.ticks();
        assertTrue(ticks.size() >= 2 && ticks.size() <= 2 * intervals + 2, ticks.size() + " ticks");
        assertTrue(ticks.get(0).value() <= a && ticks.get(ticks.size() - 1).value() >= b, "covers [" + a + ", " + b + "]");
        double step = ticks.get(1).value() - ticks.get(0).value();
        for (int i = 0; i < ticks.size(); i++) {
            Scale.Tick t = ticks.get(i);
            assertEquals(t.value(), parse(t.label()), Math.abs(step) * 1e-9, t.label());
            assertTrue(t.label().length() <= 12, t.label());
            if (i > 0) {
                assertEquals(step, t.value() - ticks.get(i - 1).value(), Math.abs(step) * 1e-6, "even spacing");
            }
        }
        assertEquals(10, s.map(ticks.get(0).value()), 1e-9);
        assertEquals(610, s.map(ticks.get(ticks.size() - 1).value()), 1e-9);
        double mid = s.map((a + b) / 2);
        assertTrue(mid > 10 && mid < 610);
    }

    @Test
    void logTicksSitAtPowersOfTenWithMinorTicksOnShortAxes() {
        Scale s = Scale.log(0.0012, 3.7, 300, 0);
        assertTrue(s.isLog());
        assertEquals(List.of("0.001", "0.01", "0.1", "1", "10"), labels(s));
        assertEquals(5 + 4 * 8, s.ticks().size(), "minor ticks at 2–9 × each power");
        assertEquals(300, s.map(1e-3), 1e-9);
        assertEquals(0, s.map(10), 1e-9);
        assertEquals(150, s.map(0.1), 1e-9); // halfway through the decades 1e-3 to 10
        // A long axis labels every k-th decade (at most about seven) with superscript exponents.
        Scale wide = Scale.log(1e-12, 1e6, 0, 1);
        List<String> wideLabels = labels(wide);
        assertTrue(wideLabels.size() <= 8, wideLabels.toString());
        assertEquals("10⁻¹²", wideLabels.get(0));
        assertTrue(wide.ticks().stream().allMatch(t -> Math.log10(t.value()) == Math.rint(Math.log10(t.value()))),
                "no minor ticks on a long axis");
        assertTrue(Scale.auto(1, 30, true, 0, 1, 5).isLog(), "30 times apart: log");
        assertFalse(Scale.auto(1, 29, true, 0, 1, 5).isLog(), "under 30 times: linear");
        assertFalse(Scale.auto(0, 1000, true, 0, 1, 5).isLog(), "a zero: linear");
        assertFalse(Scale.auto(1, 1000, false, 0, 1, 5).isLog(), "log not allowed");
    }
}
