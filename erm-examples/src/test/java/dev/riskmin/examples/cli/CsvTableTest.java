package dev.riskmin.examples.cli;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** Reading the numeric columns of CSV files: line numbers, selection, and what counts as a number. */
class CsvTableTest {
    @TempDir
    Path dir;

    private Path write(String text) throws IOException {
        Path file = dir.resolve("t.csv");
        Files.write(file, text.getBytes(StandardCharsets.UTF_8));
        return file;
    }

    @Test
    void rowsKnowTheLineTheyStartOnPastCommentsBlankLinesAndQuotedLineBreaks() throws Exception {
        Path file = write("\uFEFF# source: made by hand\r\ny,a,b,label\r\n1,2,3,x\r\n\r\n# note\r\n"
                + "2,\"3\r\n\",4,\"y, z\"\r\n3,4,5,w");
        CsvTable t = CsvTable.read(file, ',', '#', "y", List.of("a", "b"));
        assertEquals(List.of("y", "a", "b", "label"), t.header);
        assertArrayEquals(new int[] {3, 6, 8}, t.lines);
        assertArrayEquals(new double[] {1, 2, 3}, t.y);
        assertArrayEquals(new double[] {3, 4}, t.x[1]);
        // By default every column but the target is a feature, so the text column 'label' is refused.
        InputException e = assertThrows(InputException.class, () -> CsvTable.read(file, ',', '#', "y", List.of()));
        assertTrue(e.getMessage().contains("line 3, column 'label' (column 4): 'x' is not a number"), e.getMessage());
    }

    @Test
    void onlyTheSelectedColumnsMustBeNumbers() throws Exception {
        Path file = write("id;y;a;b\nr1;1;2.5;-3e2\nr2;0;.5;+4\n");
        CsvTable t = CsvTable.read(file, ';', null, "y", List.of("b", "a"));
        assertArrayEquals(new double[] {-300, 2.5}, t.x[0]);
        assertArrayEquals(new double[] {4, 0.5}, t.x[1]);
        assertArrayEquals(new int[] {2, 3}, t.lines);
    }

    @Test
    void anythingButAPlainFiniteDecimalIsRefusedWithItsPlace() throws IOException {
        // Double.parseDouble would take all but the empty cell (Java SE API, Double.valueOf grammar).
        for (String cell : List.of("1f", "2d", "0x1p3", "NaN", "Infinity", "1e400", "1,5", "")) {
            Path file = write("y,a\n1,2\n0,\"" + cell + "\"\n");
            InputException e = assertThrows(InputException.class, () -> CsvTable.read(file, ',', '#', "y", List.of()),
                    cell);
            assertTrue(e.getMessage().contains("line 3, column 'a' (column 2)"), cell + ": " + e.getMessage());
        }
    }

    @Test
    void withoutACommentMarkerAHashIsData() throws IOException {
        Path file = write("y,a\n# 1,2\n");
        InputException e = assertThrows(InputException.class, () -> CsvTable.read(file, ',', null, "y", List.of()));
        assertTrue(e.getMessage().contains("line 2, column 'y' (column 1): '# 1' is not a number"), e.getMessage());
    }

    @Test
    void aHeaderWithoutRowsOrWithARepeatedNameIsRefused() throws IOException {
        InputException empty = assertThrows(InputException.class,
                () -> CsvTable.read(write("# only a comment\ny,a\n"), ',', '#', "y", List.of()));
        assertTrue(empty.getMessage().contains("no data row"), empty.getMessage());
        InputException repeated = assertThrows(InputException.class,
                () -> CsvTable.read(write("y,a,a\n1,2,3\n"), ',', '#', "y", List.of()));
        assertTrue(repeated.getMessage().contains("header"), repeated.getMessage());
        InputException nothing = assertThrows(InputException.class,
                () -> CsvTable.read(write(""), ',', '#', "y", List.of()));
        assertTrue(nothing.getMessage().contains("no header row"), nothing.getMessage());
    }
}
