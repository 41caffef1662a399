package dev.riskmin.examples.cli;

import dev.riskmin.data.Dataset;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Arrays;
import java.util.List;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** The held-out split: seeded, disjoint, and keeping each class's share. */
class RowSplitTest {
    @TempDir
    Path dir;

    /** 103 rows: y = 1 on every 10th row (11 positives, 92 negatives), x = the row's index. */
    private CsvTable table() throws Exception {
        StringBuilder b = new StringBuilder("y,x\n");
        for (int i = 0; i < 103; i++) {
            b.append(i % 10 == 0 ? 1 : 0).append(',').append(i).append('\n');
        }
        Path file = dir.resolve("rows.csv");
        Files.writeString(file, b);
        return CsvTable.read(file, ',', '#', "y", List.of());
    }

    @Test
    void eachClassKeepsItsShareAndTheRowsFittedKeepTheFilesOrder() throws Exception {
        CsvTable t = table();
        RowSplit split = RowSplit.of(t, 2, 0.25, 9);
        assertEquals(2 + 23, split.heldOutRows()); // floor(0.25 x 11) + floor(0.25 x 92)
        assertEquals(103 - 25, split.fittedRows());
        int[] held = split.heldOutIndices();
        long positives = Arrays.stream(held).filter(i -> t.y[i] == 1).count();
        assertEquals(2, positives);
        Dataset fitted = split.fitted(false);
        Dataset heldOut = split.heldOut(false);
        double previous = -1;
        for (int r = 0; r < fitted.size(); r++) {
            double x = fitted.features().get(r, 0);
            assertTrue(x > previous, "file order");
            previous = x;
            for (int h : held) {
                assertFalse(x == h, "row " + h + " is both fitted and held out");
            }
        }
        assertEquals(25, heldOut.size());
    }

    @Test
    void theSameSeedGivesTheSameSplitAndAnotherSeedAnother() throws Exception {
        CsvTable t = table();
        assertArrayEquals(RowSplit.of(t, 0, 0.2, 4).heldOutIndices(), RowSplit.of(t, 0, 0.2, 4).heldOutIndices());
        assertFalse(Arrays.equals(RowSplit.of(t, 0, 0.2, 4).heldOutIndices(),
                RowSplit.of(t, 0, 0.2, 5).heldOutIndices()));
        assertEquals(20, RowSplit.of(t, 0, 0.2, 4).heldOutRows()); // floor(0.2 x 103) over all rows
        RowSplit none = RowSplit.of(t, 0, 0, 4);
        assertEquals(0, none.heldOutRows());
        assertNull(none.heldOut(false));
    }
}
