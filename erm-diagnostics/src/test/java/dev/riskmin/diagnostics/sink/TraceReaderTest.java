package dev.riskmin.diagnostics.sink;

import dev.riskmin.diagnostics.DiagnosticEvent;
import dev.riskmin.diagnostics.LossEvent;
import org.junit.jupiter.api.Test;

import java.io.IOException;
import java.io.StringReader;
import java.util.List;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** The trace readers reject malformed input with a message naming the line and the field. */
class TraceReaderTest {
    private static final String LOSS = "{\"kind\":\"loss\",\"step\":7,\"epoch\":1,\"batchSize\":16,\"batchLoss\":0.5,"
            + "\"smoothedBatchLoss\":null,\"objective\":0.47,\"heldOutLoss\":null,\"gradientNorm\":0.128,"
            + "\"stepSize\":0.05}";
    private static final LossEvent EVENT = new LossEvent(7, 1, 0.5, Double.NaN, 0.47, Double.NaN, 0.128, 0.05, 16);

    static void rejectsJson(String line2, String... fragments) {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> TraceReader.jsonLines(new StringReader(LOSS + "\n" + line2 + "\n")));
        assertTrue(e.getMessage().startsWith("line 2"), e.getMessage());
        for (String f : fragments) {
            assertTrue(e.getMessage().contains(f), e.getMessage());
        }
    }

    @Test
    void jsonReaderReadsTheWrittenFormAndSkipsBlankLinesAndUnknownMembers() throws IOException {
        String extra = LOSS.replace("}", ",\"note\":[1,true,{\"x\":\"\\/\"}]}");
        List<DiagnosticEvent> events = TraceReader.jsonLines(new StringReader("\uFEFF" + LOSS + "\n\n  \n" + extra));
        assertEquals(List.of(EVENT, EVENT), events);
    }

    @Test
    void jsonReaderRejectsWhatRfc8259Forbids() {
        // RFC 8259: no NaN literal (section 6), no trailing comma (section 4), control characters
        // escaped in strings (section 7); duplicate names are legal there but ambiguous, so refused.
        rejectsJson(LOSS.replace("0.47", "NaN"), "column", "unexpected 'N'");
        rejectsJson(LOSS.replace("}", ",}"), "expected a member name");
        rejectsJson(LOSS.replace("}", ",\"objective\":1}"), "duplicate member \"objective\"");
        rejectsJson(LOSS.replace("\"loss\"", "\"lo\tss\""), "unescaped control character U+0009");
        rejectsJson(LOSS.replace("0.47", "01"), "malformed number 01");
        rejectsJson(LOSS.replace("0.47", ".5"), "unexpected '.'");
        rejectsJson(LOSS + " x", "unexpected text after the object");
        rejectsJson(LOSS.replace("\"loss\"", "\"\\q\""), "unknown escape \\q");
    }

    @Test
    void jsonReaderNamesTheMissingOrMistypedMember() {
        rejectsJson(LOSS.replace(",\"objective\":0.47", ""), "the member \"objective\" is missing");
        rejectsJson(LOSS.replace("\"step\":7", "\"step\":7.5"), "step (7.5) is not an integer");
        rejectsJson(LOSS.replace("\"epoch\":1", "\"epoch\":4294967296"), "epoch (4294967296) does not fit an int");
        rejectsJson(LOSS.replace("\"loss\"", "\"lost\""), "kind (lost) is not one of");
        rejectsJson(LOSS.replace("0.47", "\"0.47\""), "objective (0.47) is not a number");
        rejectsJson(LOSS.replace("{\"kind\":\"loss\",", "{"), "kind (null)");
    }

    static String csv(String row) {
        return String.join(",", TraceSchema.COLUMNS) + "\r\n" + row + "\r\n";
    }

    static final String ROW = "loss,7,1,16,,,,,,,,,,,0.5,NaN,0.47,NaN,0.128,0.05,,,,,,,,,";

    static void rejectsCsv(String text, String... fragments) {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> TraceReader.csv(new StringReader(text)));
        for (String f : fragments) {
            assertTrue(e.getMessage().contains(f), e.getMessage());
        }
    }

    @Test
    void csvReaderAcceptsLfLineEndsReorderedColumnsAndABom() throws IOException {
        assertEquals(List.of(EVENT), TraceReader.csv(new StringReader("\uFEFF" + csv(ROW).replace("\r\n", "\n"))));
        // The same row with the first two columns swapped, plus an unknown column at the end.
        String header = "step,kind," + String.join(",", TraceSchema.COLUMNS.subList(2, TraceSchema.COLUMNS.size()))
                + ",extra";
        String row = "7,loss" + ROW.substring("loss,7".length()) + ",whatever";
        assertEquals(List.of(EVENT), TraceReader.csv(new StringReader(header + "\n" + row + "\n")));
    }

    @Test
    void csvReaderRejectsMalformedRowsNamingTheLine() {
        rejectsCsv("", "line 1", "no header");
        rejectsCsv(csv(ROW).replace(",figures", ""), "line 1", "lacks the column figures");
        rejectsCsv(csv(ROW + ",x"), "line 2", "30 cells, the header has 29");
        rejectsCsv(csv(ROW.replace("0.47", "0,47")), "line 2", "30 cells");
        rejectsCsv(csv(ROW.replace("0.47", "0.4.7")), "line 2", "objective (0.4.7) is not a number");
        rejectsCsv(csv(ROW.replace("0.47", "1d")), "line 2", "objective (1d) is not a number");
        rejectsCsv(csv(ROW.replace(",0.05,", ",\"0.05")), "line 2", "quoted cell is not closed");
        rejectsCsv(csv(ROW.replace("0.05", "\"0.05\"x")), "line 2", "text after the closing quote");
        rejectsCsv(csv(ROW.replace("0.05", "0.0\"5")), "line 2", "a quote inside unquoted cell 20");
        rejectsCsv(csv(ROW) + "loss,8,1,16,,,,,,,,,,,0.5,NaN,0.47,NaN,0.128,0.05,,,,,,,,,\r" + "x",
                "line 3", "CR not followed by LF");
    }

    @Test
    void csvReaderCountsLinesInsideQuotedCells() {
        String stopping = "stopping,1,0,,,,,,,,,,,,,,,,,,t,1.0,2.0,stop,\"two\r\nlines\",,,,";
        rejectsCsv(csv(stopping) + ROW.replace("0.47", "bad") + "\r\n", "line 4", "objective (bad)");
        rejectsCsv(csv(stopping.replace(",stop,", ",halt,")), "line 2", "decision (halt) is not a Decision");
    }
}
