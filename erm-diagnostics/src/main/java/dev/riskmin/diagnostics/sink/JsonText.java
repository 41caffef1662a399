package dev.riskmin.diagnostics.sink;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.regex.Pattern;

/**
 * A minimal, strict JSON encoder and parser (RFC 8259: Bray, "The JavaScript Object Notation (JSON)
 * Data Interchange Format", IETF, 2017), enough for trace lines without a JSON dependency in the
 * core. Strings escape every control character and lone surrogates; numbers are written so that
 * they read back to the same double; the parser accepts exactly the RFC's grammar (no NaN, no
 * trailing commas, no comments, no duplicate keys) and keeps number tokens as text, so that integers
 * and doubles are converted by the caller without a detour through double.
 */
final class JsonText {
    private static final Pattern NUMBER = Pattern.compile("-?(0|[1-9][0-9]*)(\\.[0-9]+)?([eE][+-]?[0-9]+)?");
    private static final char[] HEX = "0123456789abcdef".toCharArray();

    private JsonText() {
    }

    /** A number as it stood in the text. */
    record Number(String token) {
    }

    /** Appends {@code value} as a JSON string literal. */
    static void string(StringBuilder out, String value) {
        out.append('"');
        for (int i = 0, n = value.length(); i < n; i++) {
            char ch = value.charAt(i);
            switch (ch) {
                case '"' -> out.append("\\\"");
                case '\\' -> out.append("\\\\");
                case '\n' -> out.append("\\n");
                case '\r' -> out.append("\\r");
                case '\t' -> out.append("\\t");
                case '\b' -> out.append("\\b");
                case '\f' -> out.append("\\f");
                default -> {
                    boolean lone = Character.isHighSurrogate(ch)
                            ? !(i + 1 < n && Character.isLowSurrogate(value.charAt(i + 1)))
                            : Character.isLowSurrogate(ch)
                                    && !(i > 0 && Character.isHighSurrogate(value.charAt(i - 1)));
                    // Lone surrogates would not survive UTF-8; line and paragraph separators break
                    // some line-oriented readers. Both are legal as escapes.
                    if (ch < 0x20 || ch == '\u2028' || ch == '\u2029' || lone) {
                        out.append("\\u").append(HEX[ch >> 12 & 15]).append(HEX[ch >> 8 & 15])
                                .append(HEX[ch >> 4 & 15]).append(HEX[ch & 15]);
                    } else {
                        out.append(ch);
                    }
                }
            }
        }
        out.append('"');
    }

    /** Appends a double: {@link Double#toString(double)} when finite, {@code null} for NaN and ±Infinity. */
    static void number(StringBuilder out, double value) {
        if (Double.isFinite(value)) {
            out.append(Double.toString(value));
        } else {
            out.append("null");
        }
    }

    /**
     * Parses one JSON object.
     *
     * @return its members in order: String, {@link Number}, Boolean, null, List or Map values
     * @throws IllegalArgumentException naming {@code where} and the offset of the first error
     */
    @SuppressWarnings("unchecked")
    static Map<String, Object> object(String text, String where) {
        Parser p = new Parser(text, where);
        p.space();
        if (p.peek() != '{') {
            throw p.error("expected an object");
        }
        Object value = p.value();
        p.space();
        if (p.pos < text.length()) {
            throw p.error("unexpected text after the object");
        }
        return (Map<String, Object>) value;
    }

    private static final class Parser {
        final String s;
        final String where;
        int pos;

        Parser(String s, String where) {
            this.s = s;
            this.where = where;
        }

        IllegalArgumentException error(String what) {
            return new IllegalArgumentException(where + ", column " + (pos + 1) + ": " + what);
        }

        int peek() {
            return pos < s.length() ? s.charAt(pos) : -1;
        }

        void space() {
            while (pos < s.length()) {
                char ch = s.charAt(pos);
                if (ch != ' ' && ch != '\t' && ch != '\n' && ch != '\r') {
                    return;
                }
                pos++;
            }
        }

        void expect(char ch) {
            if (peek() != ch) {
                throw error("expected '" + ch + "'");
            }
            pos++;
        }

        Object value() {
            space();
            int ch = peek();
            switch (ch) {
                case '{':
                    return members();
                case '[':
                    return elements();
                case '"':
                    return string();
                case 't':
                    return literal("true", Boolean.TRUE);
                case 'f':
                    return literal("false", Boolean.FALSE);
                case 'n':
                    return literal("null", null);
                default:
                    if (ch == '-' || (ch >= '0' && ch <= '9')) {
                        return number();
                    }
                    throw error(ch < 0 ? "unexpected end of line" : "unexpected '" + (char) ch + "'");
            }
        }

        Object literal(String word, Object value) {
            if (!s.startsWith(word, pos)) {
                throw error("expected " + word);
            }
            pos += word.length();
            return value;
        }

        Map<String, Object> members() {
            expect('{');
            Map<String, Object> map = new LinkedHashMap<>();
            space();
            if (peek() == '}') {
                pos++;
                return map;
            }
            while (true) {
                space();
                if (peek() != '"') {
                    throw error("expected a member name");
                }
                int at = pos;
                String key = string();
                space();
                expect(':');
                Object value = value();
                if (map.containsKey(key)) {
                    pos = at;
                    throw error("duplicate member \"" + key + "\"");
                }
                map.put(key, value);
                space();
                if (peek() == ',') {
                    pos++;
                } else {
                    expect('}');
                    return map;
                }
            }
        }

        List<Object> elements() {
            expect('[');
            List<Object> list = new ArrayList<>();
            space();
            if (peek() == ']') {
                pos++;
                return list;
            }
            while (true) {
                list.add(value());
                space();
                if (peek() == ',') {
                    pos++;
                } else {
                    expect(']');
                    return list;
                }
            }
        }

        Number number() {
            int start = pos;
            while (pos < s.length() && "+-0123456789.eE".indexOf(s.charAt(pos)) >= 0) {
                pos++;
            }
            String token = s.substring(start, pos);
            if (!NUMBER.matcher(token).matches()) {
                pos = start;
                throw error("malformed number " + token);
            }
            return new Number(token);
        }

        String string() {
            expect('"');
            StringBuilder b = new StringBuilder();
            while (true) {
                if (pos >= s.length()) {
                    throw error("unterminated string");
                }
                char ch = s.charAt(pos);
                if (ch == '"') {
                    pos++;
                    return b.toString();
                }
                if (ch < 0x20) {
                    throw error("unescaped control character U+"
                            + String.format(java.util.Locale.ROOT, "%04X", (int) ch) + " in a string");
                }
                if (ch != '\\') {
                    b.append(ch);
                    pos++;
                    continue;
                }
                if (pos + 1 >= s.length()) {
                    throw error("unterminated escape");
                }
                char e = s.charAt(pos + 1);
                pos += 2;
                switch (e) {
                    case '"' -> b.append('"');
                    case '\\' -> b.append('\\');
                    case '/' -> b.append('/');
                    case 'b' -> b.append('\b');
                    case 'f' -> b.append('\f');
                    case 'n' -> b.append('\n');
                    case 'r' -> b.append('\r');
                    case 't' -> b.append('\t');
                    case 'u' -> {
                        if (pos + 4 > s.length()) {
                            throw error("truncated \\u escape");
                        }
                        int code = 0;
                        for (int k = 0; k < 4; k++) {
                            int digit = Character.digit(s.charAt(pos + k), 16);
                            if (digit < 0) {
                                throw error("malformed \\u escape");
                            }
                            code = code * 16 + digit;
                        }
                        b.append((char) code);
                        pos += 4;
                    }
                    default -> {
                        pos -= 2;
                        throw error("unknown escape \\" + e);
                    }
                }
            }
        }
    }
}
