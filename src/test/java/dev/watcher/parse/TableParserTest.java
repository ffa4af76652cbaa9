package dev.watcher.parse;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertSame;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.model.InputFileException;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.LineParser;
import dev.watcher.model.Malformed;
import java.nio.CharBuffer;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

/**
 * The table layout. Expected values are the numbers written in the lines themselves (read by the JDK's
 * Double.parseDouble as the reference); the layouts are our own (LAYOUTS.md).
 */
class TableParserTest {

    private static LineParser builtIn() {
        return Formats.builtIn("table").newParser();
    }

    private static LineParser loaded(String yaml) throws InputFileException {
        return Formats.load("t.yaml", "kind: format\nlayout: table\n" + yaml).newParser();
    }

    @Test
    void readsACommentedHeaderAndRowsWithEveryOtherColumnAResidual() {
        ListSink s = ListSink.run(builtIn(),
                "# pass      cont        mom-x       mom-y       vmid",
                "  1    1.0000e+00  1.0000e+00  1.0000e+00  0.0000e+00",
                "  2    5.1000e-01  7.2000e-01  6.0000e-01  1.2000e-01");
        assertEquals(2, s.records.size());
        IterationRecord r = s.records.get(1);
        assertEquals(2, r.iter());
        assertEquals(List.of("cont", "mom-x", "mom-y", "vmid"), r.residuals().names());
        assertEquals(Double.parseDouble("7.2000e-01"), r.residuals().get("mom-x", -1));
        assertEquals(3, r.line());
        assertTrue(r.monitors().isEmpty());
        assertTrue(s.malformed.isEmpty());
    }

    @Test
    void sharesOneNamesListAcrossTheRowsOfOneHeader() {
        ListSink s = ListSink.run(builtIn(), "iter a b", "1 1 2", "2 3 4", "3 5 6");
        assertSame(s.records.get(0).residuals().names(), s.records.get(2).residuals().names());
    }

    @Test
    void readsFromAReusedCharacterViewWithoutKeepingIt() {
        LineParser p = builtIn();
        ListSink s = new ListSink();
        char[] buf = new char[64];
        String[] lines = {"# pass cont", "1 2.5e-01", "2 1.5e-01"};
        long n = 0;
        for (String l : lines) {
            l.getChars(0, l.length(), buf, 0);
            p.accept(CharBuffer.wrap(buf, 0, l.length()), ++n, s);
            java.util.Arrays.fill(buf, 'x'); // the reader reuses its buffer
        }
        assertEquals(List.of("cont"), s.records.get(0).residuals().names());
        assertEquals(0.25, s.records.get(0).residuals().value(0));
        assertEquals(0.15, s.records.get(1).residuals().value(0));
    }

    @Test
    void splitsResidualsAndMonitorsAsTheFormatSays() throws Exception {
        ListSink s = ListSink.run(loaded("iteration: pass\nresiduals: [cont, mom-x]\nmonitors: [vmid]\n"),
                "# pass cont mom-x vmid", "7 1e-2 2e-2 0.2134");
        IterationRecord r = s.records.get(0);
        assertEquals(Map.of("cont", 1e-2, "mom-x", 2e-2), r.residuals().toMap());
        assertEquals(Map.of("vmid", 0.2134), r.monitors().toMap());
    }

    @Test
    void toleratesWindowsLineEndingsAndReadsTheDataAfterAProgressCarriageReturn() {
        ListSink s = ListSink.run(builtIn(),
                "# iter cont\r",
                "1 1.0e-01\r",
                "  solving 10%\r  solving 50%\r2 5.0e-02\r");
        assertEquals(2, s.records.size());
        assertEquals(0.05, s.records.get(1).residuals().value(0));
        assertTrue(s.malformed.isEmpty(), s.malformed.toString());
    }

    @Test
    void skipsBannersAndWarningsBetweenRows() {
        ListSink s = ListSink.run(builtIn(),
                "Solver of the tunnel fan case",
                "# iter cont mom",
                "1 1 1",
                "WARNING: bounded temperature in 3 cells",
                "# checkpoint written",
                "2 0.5 0.5");
        assertEquals(List.of(1L, 2L), s.records.stream().map(IterationRecord::iter).toList());
        assertTrue(s.malformed.isEmpty(), s.malformed.toString());
        assertTrue(s.segments.isEmpty());
    }

    @Test
    void readsInterleavedMpiRankOutputAndCanKeepOnlyOneRank() throws Exception {
        String[] lines = {"[0] # iter cont", "[0] 1 1.0e-01", "[3] 1 9.9e+00", "[0] 2 5.0e-02"};
        ListSink all = ListSink.run(builtIn(), lines);
        assertEquals(3, all.records.size());
        ListSink rank0 = ListSink.run(loaded("rank: 0\n"), lines);
        assertEquals(List.of(0.1, 0.05), rank0.records.stream().map(r -> r.residuals().value(0)).toList());
    }

    @Test
    void keepsAnExactZeroResidualAndReadsNonFiniteValuesAndOverflowFields() {
        ListSink s = ListSink.run(builtIn(), "# iter cont temp k", "1 0 -nan *******", "2 1.#QNAN inf 1.234-105");
        double[] v1 = s.records.get(0).residuals().values();
        assertEquals(0.0, v1[0]);
        assertTrue(Numbers.isNaNValue(v1[1]));
        assertEquals(Double.POSITIVE_INFINITY, v1[2]);
        double[] v2 = s.records.get(1).residuals().values();
        assertTrue(Double.isNaN(v2[0]));
        assertEquals(Double.POSITIVE_INFINITY, v2[1]);
        assertEquals(1.234e-105, v2[2]);
        assertTrue(s.malformed.isEmpty());
    }

    @Test
    void countsMalformedRowsByKindAndSkipsThem() {
        ListSink s = ListSink.run(builtIn(),
                "1 2 3",                 // before any header
                "# iter cont mom",
                "1 1.2.3e-4 1",          // bad number
                "2 1 1",
                "3 1",                   // truncated row
                "4.5 1 1",               // not an iteration number
                "5 1 1");
        assertEquals(List.of(2L, 5L), s.records.stream().map(IterationRecord::iter).toList());
        assertEquals(Map.of(Malformed.BAD_SHAPE, 2, Malformed.BAD_NUMBER, 2), s.malformedByKind());
        assertEquals(List.of(1L, 3L, 5L, 6L), s.malformed.stream().map(ListSink.Bad::line).toList());
        assertTrue(s.malformed.get(1).detail().contains("1.2.3e-4"), s.malformed.get(1).detail());
    }

    @Test
    void aHeaderThatGainsAColumnStartsANewSegmentAndReadsTheNewColumn() {
        ListSink s = ListSink.run(builtIn(),
                "# pass cont mom-x",
                "1 1 1",
                "2 0.5 0.5",
                "# pass cont mom-x temp",
                "3 0.4 0.4 0.9");
        assertEquals(3, s.records.size());
        assertEquals(List.of("cont", "mom-x", "temp"), s.records.get(2).residuals().names());
        assertEquals(1, s.records.get(2).segment());
        assertEquals(List.of(new ListSink.Segment(1, 4, "header changed to: pass cont mom-x temp")), s.segments);
        assertEquals(List.of("record 1", "record 2", "segment 1", "record 3"), s.order);
    }

    @Test
    void aReprintedHeaderCanBeReadAsAContinuation() throws Exception {
        ListSink s = ListSink.run(loaded("reprinted-header: continue\n"), "# pass cont", "1 1", "# pass cont",
                "2 0.5");
        assertTrue(s.segments.isEmpty());
        assertEquals(0, s.records.get(1).segment());
    }

    @Test
    void anIterationCounterGoingBackStartsANewSegment() {
        ListSink s = ListSink.run(builtIn(), "# pass cont", "800 1", "801 1", "802 1", "801 2", "802 2");
        assertEquals(List.of(0, 0, 0, 1, 1), s.records.stream().map(IterationRecord::segment).toList());
        assertEquals(5, s.segments.get(0).line());
        assertTrue(s.segments.get(0).reason().contains("802 to 801"), s.segments.get(0).reason());
    }

    @Test
    void keepsTheChosenValueOfAColumnNameThatAppearsTwice() throws Exception {
        String[] lines = {"# iter temp temp", "1 3e-3 5e-3"};
        assertEquals(3e-3, ListSink.run(loaded("repeated: first\n"), lines).records.get(0).residuals().value(0));
        assertEquals(5e-3, ListSink.run(loaded("repeated: last\n"), lines).records.get(0).residuals().value(0));
        ListSink max = ListSink.run(loaded("repeated: max\n"), "# iter temp temp", "1 5e-3 3e-3");
        assertEquals(List.of("temp"), max.records.get(0).residuals().names());
        assertEquals(5e-3, max.records.get(0).residuals().value(0));
    }

    @Test
    void readsRegionPrefixedColumnsAndPrefixPatterns() throws Exception {
        ListSink s = ListSink.run(loaded("residuals: [\"fluid/*\", \"solid/*\"]\n"),
                "# iter fluid/energy solid/energy probe_t", "1 1e-3 2e-4 300.5");
        IterationRecord r = s.records.get(0);
        assertEquals(List.of("fluid/energy", "solid/energy"), r.residuals().names());
        assertEquals(Map.of("probe_t", 300.5), r.monitors().toMap());
    }

    @Test
    void readsCommaAndTabSeparatedTablesWithStepTimeAndInnerColumns() throws Exception {
        ListSink csv = ListSink.run(loaded("delimiter: comma\niteration: iter\nstep: step\ntime: time\n"
                + "inner: inner\nmonitors: [lift]\n"),
                "iter, step, time, inner, cont, lift",
                "41, 3, 6.0e-02, 2, 3.2e-02, 0.75");
        IterationRecord r = csv.records.get(0);
        assertEquals(41, r.iter());
        assertEquals(3, r.step());
        assertEquals(0.06, r.time());
        assertEquals(2, r.inner());
        assertEquals(Map.of("cont", 3.2e-02), r.residuals().toMap());
        assertEquals(Map.of("lift", 0.75), r.monitors().toMap());
        ListSink tab = ListSink.run(loaded("delimiter: tab\n"), "it\tcont\tmom", "1\t0.5\t0.25\r");
        assertEquals(Map.of("cont", 0.5, "mom", 0.25), tab.records.get(0).residuals().toMap());
    }

    @Test
    void readsAHeaderlessTableWithDeclaredColumns() throws Exception {
        ListSink s = ListSink.run(loaded("columns: [n, cont, vmid]\nmonitors: [vmid]\n"), "1 0.5 0.2", "2 0.4 0.21");
        assertEquals(2, s.records.size());
        assertEquals(Map.of("cont", 0.4), s.records.get(1).residuals().toMap());
    }

    @Test
    void takesTheLastWordLineWithTheRightWidthAsTheHeaderWhenTheFormatNamesNoIterationColumn() {
        ListSink s = ListSink.run(builtIn(), "# written by the rooftop array case", "# iter cont mom", "1 1 2");
        assertEquals(List.of("cont", "mom"), s.records.get(0).residuals().names());
    }

    @Test
    void readsRandomRowsExactlyAsTheJdkReadsEachField() {
        // Reference: Double.parseDouble of the JDK on every field of every row.
        java.util.SplittableRandom rnd = new java.util.SplittableRandom(42);
        String[] formats = {"%.4e", "%.9e", "%.5f", "%.17g", "%.3E"};
        LineParser p = builtIn();
        ListSink s = new ListSink();
        p.accept("# it a b c d", 1, s);
        List<double[]> expected = new java.util.ArrayList<>();
        for (int row = 0; row < 5000; row++) {
            StringBuilder line = new StringBuilder().append(row + 1);
            double[] want = new double[4];
            for (int c = 0; c < 4; c++) {
                double v = Math.pow(10, rnd.nextDouble(-30, 30)) * (rnd.nextInt(5) == 0 ? -1 : 1);
                String f = String.format(java.util.Locale.ROOT, formats[rnd.nextInt(formats.length)], v);
                want[c] = Double.parseDouble(f);
                line.append(rnd.nextBoolean() ? " " : "\t  ").append(f);
            }
            expected.add(want);
            p.accept(line + (row % 7 == 0 ? "\r" : ""), row + 2, s);
        }
        assertEquals(5000, s.records.size());
        for (int row = 0; row < 5000; row++) {
            org.junit.jupiter.api.Assertions.assertArrayEquals(expected.get(row),
                    s.records.get(row).residuals().values(), "row " + row);
        }
    }
}
