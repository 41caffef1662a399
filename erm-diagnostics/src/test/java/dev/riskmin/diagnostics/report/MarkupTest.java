package dev.riskmin.diagnostics.report;

import org.junit.jupiter.api.Test;

import java.math.BigDecimal;

import static org.junit.jupiter.api.Assertions.assertEquals;

/** Escaping, XML-safe characters and locale-free numbers. */
class MarkupTest {

    @Test
    void specialCharactersBecomeReferencesAndForbiddenOnesBecomeReplacementCharacters() {
        assertEquals("&lt;/svg&gt;&lt;script&gt; &amp;amp; &quot;q&quot; &#39;s&#39;",
                Markup.escape("</svg><script> &amp; \"q\" 's'"));
        // XML 1.0 §2.2 allows tab, LF, CR, U+0020–U+D7FF, U+E000–U+FFFD and supplementary characters
        // (the W3C recommendation); we also drop CR and the C1 controls.
        assertEquals("\t\n\uFFFD\uFFFD\uFFFD\uFFFD\uFFFD\uFFFD\uFFFD é 😀 \uFFFD\uFFFD",
                Markup.escape("\t\n\r\u0000\u001f\u007f\u0085\uFFFE\uFFFF é 😀 \uD800\uDFFF".replace("\uD800\uDFFF",
                        "\uDFFF\uD800")));
        assertEquals("", Markup.escape(null));
    }

    @Test
    void numbersAreWrittenWithoutTheLocale() {
        assertEquals("12.3", Markup.pixel(12.34));
        assertEquals("-0.5", Markup.pixel(-0.46));
        assertEquals("640", Markup.pixel(640.0));
        assertEquals("-0.1", Markup.pixel(-0.1));
        assertEquals("2500", Markup.readable(2500));
        assertEquals("0.1235", Markup.readable(0.123456));
        assertEquals("1.235e-7", Markup.readable(1.23456e-7));
        assertEquals("NaN", Markup.readable(Double.NaN));
        assertEquals("∞", Markup.readable(Double.POSITIVE_INFINITY));
        assertEquals("2.5e-5", Markup.scientific(new BigDecimal("0.000025")));
        assertEquals("1e6", Markup.scientific(new BigDecimal("1000000")));
        assertEquals("0.30000000000000004", Markup.exact(0.1 + 0.2)); // parses back to the same double
    }
}
