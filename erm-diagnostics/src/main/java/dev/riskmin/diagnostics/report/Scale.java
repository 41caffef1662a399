package dev.riskmin.diagnostics.report;

import java.math.BigDecimal;
import java.util.ArrayList;
import java.util.List;

/**
 * One axis of a plot: maps data values to pixels, linearly or by log<sub>10</sub>, and places labelled
 * ticks.
 *
 * <p>Linear ticks sit at multiples of a "nice" step m·10<sup>k</sup>, m ∈ {1, 2, 2.5, 5}: the smallest
 * such step that covers the range in at most the wanted number of intervals, with the axis widened to
 * the multiples just outside the data (the nice-number rule of Heckbert, "Nice numbers for graph
 * labels", Graphics Gems, 1990, from memory; the 2.5 is our addition). Tick values are formed in
 * decimal arithmetic, so labels never show binary rounding ("0.3", not "0.30000000000000004").
 * Labels are plain unless a tick reaches 10<sup>6</sup> in magnitude or the step falls below
 * 10<sup>−4</sup>; then scientific ("2.5e-5").
 *
 * <p>Log ticks sit at the powers of ten around the data (every k-th decade labelled so that at most
 * about seven are; over 20 decades only the labelled ones are drawn), with unlabelled minor ticks at
 * 2–9 times each power when the axis spans at most five decades. Powers from 10<sup>−3</sup> to
 * 10<sup>5</sup> are written out ("0.001", "100"), others as 10 with a superscript exponent.
 */
final class Scale {
    /** When all values are positive and max/min reaches this ratio (about 1.5 decades), the axis is logarithmic. */
    static final double LOG_RATIO = 30;

    /** A tick: its data value, its label (empty for a minor tick). */
    record Tick(double value, String label) {
        boolean major() {
            return !label.isEmpty();
        }
    }

    private static final BigDecimal[] MANTISSAS = {
            BigDecimal.ONE, BigDecimal.valueOf(2), new BigDecimal("2.5"), BigDecimal.valueOf(5), BigDecimal.TEN};
    private static final String SUPERSCRIPTS = "⁰¹²³⁴⁵⁶⁷⁸⁹";

    private final boolean log;
    private final double lo;
    private final double hi;
    private final double from;
    private final double to;
    private final List<Tick> ticks;

    private Scale(boolean log, double lo, double hi, double from, double to, List<Tick> ticks) {
        this.log = log;
        this.lo = lo;
        this.hi = hi;
        this.from = from;
        this.to = to;
        this.ticks = List.copyOf(ticks);
    }

    /**
     * A log axis when {@code allowLog}, every value is positive and max/min ≥ {@value #LOG_RATIO};
     * else a linear one with nice ticks.
     */
    static Scale auto(double min, double max, boolean allowLog, double from, double to, int intervals) {
        if (allowLog && min > 0 && max / min >= LOG_RATIO) {
            return log(min, max, from, to);
        }
        return linear(min, max, from, to, intervals);
    }

    /** A linear axis over the nice multiples around [min, max] (a single value is widened by 10 %, or 1 if 0). */
    static Scale linear(double min, double max, double from, double to, int intervals) {
        if (min == max) {
            double pad = min == 0 ? 1 : Math.abs(min) * 0.1;
            min -= pad;
            max += pad;
        }
        double raw = (max / intervals - min / intervals); // no overflow near ±MAX_VALUE
        if (!(raw > 0) || !Double.isFinite(raw)) {
            return ends(min, max, from, to);
        }
        int exponent = (int) Math.floor(Math.log10(raw));
        BigDecimal step = null;
        for (BigDecimal m : MANTISSAS) {
            BigDecimal candidate = m.scaleByPowerOfTen(exponent);
            if (candidate.doubleValue() >= raw * (1 - 1e-12)) {
                step = candidate;
                break;
            }
        }
        if (step == null) {
            step = BigDecimal.ONE.scaleByPowerOfTen(exponent + 1);
        }
        double s = step.doubleValue();
        double kLo = Math.floor(min / s + 1e-9);
        double kHi = Math.ceil(max / s - 1e-9);
        double lo = kLo * s;
        double hi = kHi * s;
        if (!Double.isFinite(lo) || !Double.isFinite(hi) || kHi - kLo > 4L * intervals || kHi <= kLo
                || Math.abs(kLo) > 1e15 || Math.abs(kHi) > 1e15) {
            return ends(min, max, from, to);
        }
        boolean scientific = Math.max(Math.abs(lo), Math.abs(hi)) >= 1e6 || s < 1e-4;
        List<Tick> ticks = new ArrayList<>();
        for (long k = (long) kLo; k <= (long) kHi; k++) {
            BigDecimal value = step.multiply(BigDecimal.valueOf(k));
            ticks.add(new Tick(value.doubleValue(), label(value, scientific)));
        }
        return new Scale(false, lo, hi, from, to, ticks);
    }

    /** A linear axis over exactly [min, max] (nice values given by the caller), ticks every {@code step}. */
    static Scale fixed(double min, double max, String step, double from, double to) {
        BigDecimal s = new BigDecimal(step);
        BigDecimal start = new BigDecimal(Double.toString(min));
        List<Tick> ticks = new ArrayList<>();
        for (BigDecimal v = start; v.doubleValue() <= max + 1e-12; v = v.add(s)) {
            ticks.add(new Tick(v.doubleValue(), label(v, false)));
        }
        return new Scale(false, min, max, from, to, ticks);
    }

    /** A log<sub>10</sub> axis over the decades around [min, max]; both must be positive. */
    static Scale log(double min, double max, double from, double to) {
        int lo = (int) Math.floor(Math.log10(min));
        int hi = (int) Math.ceil(Math.log10(max));
        if (hi <= lo) {
            hi = lo + 1;
        }
        int decades = hi - lo;
        int every = Math.max(1, (decades + 6) / 7);
        List<Tick> ticks = new ArrayList<>();
        for (int k = lo; k <= hi; k++) {
            boolean labelled = (k - lo) % every == 0;
            if (!labelled && decades > 20) {
                continue; // a grid line per decade would crowd a very long axis
            }
            ticks.add(new Tick(Math.pow(10, k), labelled ? power(k) : ""));
            if (decades <= 5 && k < hi) {
                for (int m = 2; m <= 9; m++) {
                    ticks.add(new Tick(m * Math.pow(10, k), ""));
                }
            }
        }
        return new Scale(true, lo, hi, from, to, ticks);
    }

    private static Scale ends(double min, double max, double from, double to) {
        return new Scale(false, min, max, from, to, List.of(new Tick(min, Markup.readable(min)),
                new Tick(max, Markup.readable(max))));
    }

    private static String label(BigDecimal value, boolean scientific) {
        String text = scientific ? Markup.scientific(value) : value.stripTrailingZeros().toPlainString();
        return text.startsWith("-") ? "−" + text.substring(1) : text;
    }

    private static String power(int k) {
        if (k >= -3 && k <= 5) {
            return BigDecimal.ONE.scaleByPowerOfTen(k).toPlainString();
        }
        StringBuilder b = new StringBuilder("10");
        if (k < 0) {
            b.append('⁻');
        }
        for (char c : Integer.toString(Math.abs(k)).toCharArray()) {
            b.append(SUPERSCRIPTS.charAt(c - '0'));
        }
        return b.toString();
    }

    /** @return the pixel of a data value (values outside the axis are clamped to its ends) */
    double map(double v) {
        double t = log ? Math.log10(v) : v;
        double u = (t - lo) / (hi - lo);
        if (Double.isNaN(u)) {
            u = 0.5;
        }
        u = Math.max(0, Math.min(1, u));
        return from + u * (to - from);
    }

    boolean isLog() {
        return log;
    }

    List<Tick> ticks() {
        return ticks;
    }

    /** @return the longest label, in characters (for the margin) */
    int widestLabel() {
        int w = 0;
        for (Tick t : ticks) {
            w = Math.max(w, t.label().length());
        }
        return w;
    }
}
