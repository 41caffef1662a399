package dev.riskmin.examples.bench;

import org.junit.jupiter.api.Test;

import java.util.List;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** The suite's table and the rows its figure JVMs hand back (the benchmarks themselves are not run here). */
class ResultTableTest {

    @Test
    void verdictFollowsTheTargetsDirection() {
        assertEquals("PASS", row(0.6, Target.atLeast(0.5)).verdict());
        assertEquals("FAIL", row(0.4, Target.atLeast(0.5)).verdict());
        assertEquals("PASS", row(1.5, Target.atMost(1.5)).verdict());
        assertEquals("FAIL", row(1.51, Target.atMost(1.5)).verdict());
        assertEquals("info", row(3.0, null).verdict());
        assertEquals("n/a", ResultRow.unavailable("7", "not available", Target.atLeast(1.6), "absent").verdict());
    }

    @Test
    void encodedRowsReadBackUnchanged() {
        List<ResultRow> rows = List.of(
                row(0.25, Target.atLeast(0.5)),
                row(1e-3, Target.atMost(0.1)),
                row(2.0, null),
                ResultRow.unavailable("2 block", "epoch", Target.atMost(1.5), "Sampling.blockShuffled() not available"));
        for (ResultRow r : rows) {
            assertTrue(ResultRow.isEncoded(r.encode()));
            assertEquals(r, ResultRow.parse(r.encode()));
        }
        assertThrows(IllegalArgumentException.class, () -> ResultRow.parse("row\tonly\tthree"));
    }

    @Test
    void tableHasAHeaderARuleAndOneAlignedLinePerRow() {
        String table = ResultTable.format(List.of(row(0.25, Target.atLeast(0.5)), row(2.0, null)));
        String[] lines = table.split("\n");
        assertEquals(4, lines.length);
        assertTrue(lines[0].startsWith("| #"));
        assertTrue(lines[1].matches("\\|( -+ \\|)+"), lines[1]);
        for (String line : lines) {
            assertEquals(lines[0].length(), line.length(), "every line padded to the same width: " + line);
        }
        assertTrue(lines[2].contains("| 0.250 ") && lines[2].contains("| >= 0.5 ") && lines[2].contains("| FAIL "),
                lines[2]);
        assertTrue(lines[3].contains("| —") && lines[3].contains("| info "), lines[3]);
    }

    @Test
    void targetsPrintWithoutTrailingZeros() {
        assertEquals(">= 1.6", Target.atLeast(1.6).toString());
        assertEquals("<= 2", Target.atMost(2.0).toString());
        assertEquals("<= 1000", Target.atMost(1000).toString());
    }

    @Test
    void settingsParseSeveralOptionsInOneArgument() {
        BenchSettings s = BenchSettings.parse("--size-mb=800 --figures=2,6", "");
        assertEquals(800, s.sizeMb());
        assertEquals(List.of("2", "2b", "6"), s.figures());
        assertEquals(100_000_000, s.denseEntries());
        assertThrows(IllegalArgumentException.class, () -> BenchSettings.parse("--figures=9"));
        assertThrows(IllegalArgumentException.class, () -> BenchSettings.parse("--fast"));
    }

    private static ResultRow row(double ratio, Target target) {
        return new ResultRow("1 case", "figure 1 GB/s", "baseline 2 GB/s", ratio, target, "");
    }
}
