package dev.riskmin.diagnostics.report;

import java.math.BigDecimal;
import java.math.MathContext;
import java.math.RoundingMode;

/**
 * Builds the report's text: markup that is at once well-formed XML and HTML that browsers parse the
 * same way, with every piece of outside text escaped, and numbers written independently of the
 * platform's locale.
 *
 * <p>Escaping: {@code & < > " '} become character references, so text is safe in element content and
 * in double- or single-quoted attributes alike. Characters that XML 1.0 forbids (C0 controls other
 * than tab and line feed, lone surrogates, U+FFFE, U+FFFF), carriage returns and the C1 controls
 * U+007F–U+009F are shown as U+FFFD: they cannot be written into a well-formed document and would
 * otherwise let a hostile trace break the parse.
 */
final class Markup {
    private final StringBuilder out;

    Markup(int capacity) {
        this.out = new StringBuilder(capacity);
    }

    /** Appends markup written by this package (never outside text). */
    Markup raw(String markup) {
        out.append(markup);
        return this;
    }

    Markup raw(char c) {
        out.append(c);
        return this;
    }

    /** Appends outside text, escaped. */
    Markup text(String text) {
        escapeInto(text, out);
        return this;
    }

    /** Appends {@code  name="value"} with the value escaped. */
    Markup attr(String name, String value) {
        out.append(' ').append(name).append("=\"");
        escapeInto(value, out);
        out.append('"');
        return this;
    }

    /** Appends {@code  name="value"} with a pixel coordinate, one decimal. */
    Markup attr(String name, double pixels) {
        out.append(' ').append(name).append("=\"").append(pixel(pixels)).append('"');
        return this;
    }

    int length() {
        return out.length();
    }

    @Override
    public String toString() {
        return out.toString();
    }

    static String escape(String text) {
        StringBuilder b = new StringBuilder(text == null ? 0 : text.length() + 16);
        escapeInto(text, b);
        return b.toString();
    }

    private static void escapeInto(String text, StringBuilder b) {
        if (text == null) {
            return;
        }
        int n = text.length();
        for (int i = 0; i < n; i++) {
            char c = text.charAt(i);
            switch (c) {
                case '&' -> b.append("&amp;");
                case '<' -> b.append("&lt;");
                case '>' -> b.append("&gt;");
                case '"' -> b.append("&quot;");
                case '\'' -> b.append("&#39;");
                case '\t', '\n' -> b.append(c);
                default -> {
                    if (Character.isHighSurrogate(c) && i + 1 < n && Character.isLowSurrogate(text.charAt(i + 1))) {
                        b.append(c).append(text.charAt(++i));
                    } else if (c < 0x20 || (c >= 0x7f && c <= 0x9f) || Character.isSurrogate(c)
                            || c == '\uFFFE' || c == '\uFFFF') {
                        b.append('\uFFFD');
                    } else {
                        b.append(c);
                    }
                }
            }
        }
    }

    /** A pixel coordinate with one decimal, rounded half up: "12.3", "-0.5", "640". */
    static String pixel(double v) {
        long tenths = Math.round(v * 10);
        long whole = tenths / 10;
        long frac = Math.abs(tenths % 10);
        String sign = tenths < 0 && whole == 0 ? "-" : "";
        return frac == 0 ? sign + whole : sign + whole + "." + frac;
    }

    /**
     * A value for a person to read: whole numbers below 10<sup>15</sup> in full, else four significant
     * digits, plain between 10<sup>−4</sup> and 10<sup>7</sup> and scientific outside ("1.235e-07");
     * NaN and infinities by name.
     */
    static String readable(double v) {
        if (Double.isNaN(v)) {
            return "NaN";
        }
        if (Double.isInfinite(v)) {
            return v > 0 ? "∞" : "−∞";
        }
        if (v == Math.rint(v) && Math.abs(v) < 1e15) {
            return Long.toString((long) v);
        }
        double a = Math.abs(v);
        BigDecimal rounded = new BigDecimal(v).round(new MathContext(4, RoundingMode.HALF_EVEN)).stripTrailingZeros();
        return a >= 1e-4 && a < 1e7 ? rounded.toPlainString() : scientific(rounded);
    }

    /** "2.5e-5", "1e6": the digits of the decimal without trailing zeros, one before the point. */
    static String scientific(BigDecimal value) {
        if (value.signum() == 0) {
            return "0";
        }
        BigDecimal b = value.stripTrailingZeros();
        int exponent = b.precision() - b.scale() - 1;
        return b.movePointLeft(exponent).toPlainString() + "e" + exponent;
    }

    /** The exact value, as {@link Double#toString} writes it (it parses back to the same double). */
    static String exact(double v) {
        return Double.toString(v);
    }
}
