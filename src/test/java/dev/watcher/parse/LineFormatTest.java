package dev.watcher.parse;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.model.InputFileException;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.LineParser;
import dev.watcher.model.Malformed;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

/**
 * Line formats from regular expressions. The YAML texts here are the same rules as the shipped
 * test-logs/formats files (those files are read from disk in ShippedFormatsIT); the lines are our own
 * layouts (LAYOUTS.md).
 */
class LineFormatTest {

    static final String PASS_LINE = """
            kind: format
            name: pass-line
            layout: lines
            families:
              momentum: [mom-x, mom-y]
            rules:
              - match: '^\\*\\* restart\\b'
                action: restart
              - match: '^\\*\\*'
                action: ignore
              - match: '^~ pass (?<iteration>\\d+)'
                action: record
                find:
                  - '\\|\\s*probe\\s+(?<monitor>[^\\s=|]+)\\s*=\\s*(?<value>[^\\s|]+)'
                  - '\\|\\s*(?<equation>[^\\s|]+)\\s+(?<residual>[^\\s|]+)'
            """;

    static final String SWEEP_BLOCK = """
            kind: format
            name: sweep-block
            layout: lines
            rules:
              - match: '^>> step (?<step>\\d+)\\s+t=(?<time>\\S+)'
                action: context
              - match: '^\\.\\. sweep (?<inner>\\d+) \\(pass (?<iteration>\\d+)\\)'
                action: open
              - match: '^\\s+probe\\s+(?<monitor>[^\\s=]+)\\s*=\\s*(?<value>\\S+)'
                action: values
              - match: '^\\s+(?<equation>[A-Za-z][\\w/.-]*)\\s+(?<residual>\\S+)\\s*$'
                action: values
              - match: '^\\*\\* restart\\b'
                action: restart
              - match: '^\\*\\*'
                action: ignore
            """;

    private static LineParser parser(String yaml) throws InputFileException {
        return Formats.load("f.yaml", yaml).newParser();
    }

    @Test
    void readsAPassLineWithEquationsAndProbes() throws Exception {
        ListSink s = ListSink.run(parser(PASS_LINE),
                "~ pass 1200 | cont 3.2e-02 | mom-x 1.1e-01 | mom-y 9.0e-02 | probe vmid=0.2134 m/s "
                        + "| probe wall_q=12.7 W");
        IterationRecord r = s.records.get(0);
        assertEquals(1200, r.iter());
        assertEquals(List.of("cont", "mom-x", "mom-y"), r.residuals().names());
        assertEquals(9.0e-02, r.residuals().get("mom-y", -1));
        assertEquals(Map.of("vmid", 0.2134, "wall_q", 12.7), r.monitors().toMap());
        assertTrue(s.malformed.isEmpty(), s.malformed.toString());
        assertEquals(Map.of("momentum", List.of("mom-x", "mom-y")), Formats.load("f.yaml", PASS_LINE).families());
    }

    @Test
    void skipsBannersAndStartsASegmentAtADeclaredRestart() throws Exception {
        ListSink s = ListSink.run(parser(PASS_LINE),
                "solver of the heat-exchanger header, version 3",
                "~ pass 799 | cont 1.0e-03",
                "** note: relaxation changed: mom 0.7 -> 0.5",
                "~ pass 800 | cont 9.0e-04",
                "** restart from snapshot pass 800",
                "** note: restart banner repeated",
                "~ pass 801 | cont 9.5e-04");
        assertEquals(List.of(0, 0, 1), s.records.stream().map(IterationRecord::segment).toList());
        assertEquals(1, s.segments.size());
        assertEquals(5, s.segments.get(0).line());
        assertTrue(s.segments.get(0).reason().contains("restart from snapshot pass 800"));
        assertTrue(s.malformed.isEmpty());
    }

    @Test
    void aRestartThatWindsTheCounterBackMakesOneSegmentNotTwo() throws Exception {
        ListSink s = ListSink.run(parser(PASS_LINE), "~ pass 1000 | cont 1e-3", "** restart from snapshot pass 800",
                "~ pass 801 | cont 2e-3");
        assertEquals(List.of("record 1000", "segment 1", "record 801"), s.order);
    }

    @Test
    void anIterationGoingBackWithoutBannerStartsASegment() throws Exception {
        ListSink s = ListSink.run(parser(PASS_LINE), "~ pass 1000 | cont 1e-3", "~ pass 801 | cont 2e-3");
        assertEquals(1, s.records.get(1).segment());
    }

    @Test
    void toleratesCarriageReturnsRankPrefixesAndProgressLines() throws Exception {
        ListSink s = ListSink.run(parser(PASS_LINE),
                "~ pass 1 | cont 1.0e-01\r",
                "[0] ~ pass 2 | cont 5.0e-02\r",
                "[2] ** note: partition 2 has 4180 cells",
                "writing snapshot 40%\rwriting snapshot 90%\r~ pass 3 | cont 2.5e-02\r");
        assertEquals(List.of(1L, 2L, 3L), s.records.stream().map(IterationRecord::iter).toList());
        assertEquals(0.025, s.records.get(2).residuals().value(0));
        assertTrue(s.malformed.isEmpty());
    }

    @Test
    void readsOnlyTheChosenRankWhenRanksInterleave() throws Exception {
        String yaml = PASS_LINE.replace("layout: lines\n", "layout: lines\nrank: 0\n");
        ListSink s = ListSink.run(parser(yaml), "[0] ~ pass 1 | cont 1e-1", "[1] ~ pass 1 | cont 7e-1",
                "[0] ~ pass 2 | cont 5e-2", "[1] ~ pass 2 | cont 6e-1");
        assertEquals(List.of(0.1, 0.05), s.records.stream().map(r -> r.residuals().value(0)).toList());
        assertTrue(s.segments.isEmpty());
    }

    @Test
    void readsQuirkyNumbersInsideLines() throws Exception {
        ListSink s = ListSink.run(parser(PASS_LINE), "~ pass 5 | cont 0 | mom-x 1.234-105 | temp 1.234D-05 "
                + "| k -nan | omega ******* | vof 1.#QNAN");
        double[] v = s.records.get(0).residuals().values();
        assertEquals(0.0, v[0]);
        assertEquals(1.234e-105, v[1]);
        assertEquals(1.234e-05, v[2]);
        assertTrue(Numbers.isNaNValue(v[3]));
        assertEquals(Double.POSITIVE_INFINITY, v[4]);
        assertTrue(Double.isNaN(v[5]));
    }

    @Test
    void aBadNumberSpoilsItsRecordAndIsCounted() throws Exception {
        ListSink s = ListSink.run(parser(PASS_LINE), "~ pass 1 | cont 1.2.3e-4 | mom-x 1e-2",
                "~ pass 2 | cont 1e-3");
        assertEquals(List.of(2L), s.records.stream().map(IterationRecord::iter).toList());
        assertEquals(Map.of(Malformed.BAD_NUMBER, 1), s.malformedByKind());
        assertEquals(1, s.malformed.get(0).line());
    }

    @Test
    void assemblesASweepBlockFromSeveralLinesWithStepAndTimeFromTheContextLine() throws Exception {
        ListSink s = ListSink.run(parser(SWEEP_BLOCK),
                ">> step 12 t=6.000e-02",
                ".. sweep 3 (pass 1203)",
                "   cont   3.20e-02",
                "   mom-x  1.10e-01",
                "   mom-y  9.00e-02",
                "   probe vmid = 0.2134",
                ".. sweep 4 (pass 1204)",
                "   cont   2.10e-02",
                ">> step 13 t=6.500e-02",
                ".. sweep 1 (pass 1205)",
                "   cont   4.00e-02");
        assertEquals(3, s.records.size());
        IterationRecord a = s.records.get(0);
        assertEquals(1203, a.iter());
        assertEquals(12, a.step());
        assertEquals(6.0e-02, a.time());
        assertEquals(3, a.inner());
        assertEquals(List.of("cont", "mom-x", "mom-y"), a.residuals().names());
        assertEquals(Map.of("vmid", 0.2134), a.monitors().toMap());
        assertEquals(6, a.line());
        IterationRecord b = s.records.get(1);
        assertEquals(1204, b.iter());
        assertEquals(4, b.inner());
        assertEquals(8, b.line());
        IterationRecord c = s.records.get(2);
        assertEquals(13, c.step());
        assertEquals(6.5e-02, c.time());
        assertEquals(1, c.inner());
        assertEquals(11, c.line()); // completed by flush at the end of input
    }

    @Test
    void doesNotEmitTheLastBlockBeforeItIsCompleteOrFlushed() throws Exception {
        LineParser p = parser(SWEEP_BLOCK);
        ListSink s = new ListSink();
        p.accept(".. sweep 1 (pass 1)", 1, s);
        p.accept("   cont 1e-1", 2, s);
        assertTrue(s.records.isEmpty());
        p.accept(".. sweep 2 (pass 2)", 3, s);
        assertEquals(1, s.records.size());
        p.flush(s);
        assertEquals(1, s.records.size()); // the open record has no values yet
        assertEquals(Map.of(Malformed.BAD_SHAPE, 1), s.malformedByKind());
    }

    @Test
    void keepsFirstLastOrLargestForAnEquationSolvedSeveralTimesPerIteration() throws Exception {
        String[] lines = {".. sweep 1 (pass 1)", "   temp 4e-3", "   temp 9e-3", "   temp 2e-3"};
        Map<String, Double> expected = Map.of("first", 4e-3, "last", 2e-3, "max", 9e-3);
        for (Map.Entry<String, Double> e : expected.entrySet()) {
            String yaml = SWEEP_BLOCK.replace("layout: lines\n", "layout: lines\nrepeated: " + e.getKey() + "\n");
            IterationRecord r = ListSink.run(parser(yaml), lines).records.get(0);
            assertEquals(List.of("temp"), r.residuals().names());
            assertEquals(e.getValue(), r.residuals().value(0), e.getKey());
        }
    }

    @Test
    void prefixesNamesWithARegionGivenInTheNameOrByARegionLine() throws Exception {
        String yaml = """
                kind: format
                layout: lines
                rules:
                  - match: '^iteration (?<iteration>\\d+)'
                    action: open
                  - match: '^region (?<region>\\S+)'
                    action: values
                  - match: '^\\s+(?<equation>[\\w/-]+)\\s+(?<residual>\\S+)$'
                    action: values
                """;
        ListSink s = ListSink.run(parser(yaml), "iteration 7", "region fluid", "  energy 1e-3", "  cont 2e-3",
                "region solid", "  energy 4e-4", "  shell/energy 5e-4");
        assertEquals(List.of("fluid/energy", "fluid/cont", "solid/energy", "solid/shell/energy"),
                s.records.get(0).residuals().names());
        String inline = """
                kind: format
                layout: lines
                rules:
                  - match: '^it (?<iteration>\\d+) \\[(?<region>\\w+)\\] (?<equation>\\S+) (?<residual>\\S+)'
                    action: values
                """;
        ListSink t = ListSink.run(parser(inline), "it 1 [fluid] energy 1e-3", "it 1 [solid] energy 2e-4",
                "it 2 [fluid] energy 9e-4", "it 2 [solid] energy 1e-4");
        assertEquals(2, t.records.size(), "one line per equation, grouped by iteration");
        assertEquals(Map.of("fluid/energy", 9e-4, "solid/energy", 1e-4), t.records.get(1).residuals().toMap());
    }

    @Test
    void numbersRecordsWhenTheFormatReadsNoIterationAndCountsRecordsWithoutOne() throws Exception {
        String counting = """
                kind: format
                layout: lines
                rules:
                  - match: '^res (?<equation>\\S+) (?<residual>\\S+)'
                    action: record
                """;
        ListSink s = ListSink.run(parser(counting), "res cont 1e-1", "res cont 5e-2");
        assertEquals(List.of(1L, 2L), s.records.stream().map(IterationRecord::iter).toList());
        String needing = """
                kind: format
                layout: lines
                unmatched: malformed
                rules:
                  - match: '^pass (?<iteration>\\d+)'
                    action: open
                  - match: '^other'
                    action: open
                  - match: '^  (?<equation>\\S+) (?<residual>\\S+)'
                    action: values
                """;
        ListSink t = ListSink.run(parser(needing), "other", "  cont 1e-1", "garbage here", "pass 4", "  cont 1");
        assertEquals(List.of(4L), t.records.stream().map(IterationRecord::iter).toList());
        assertEquals(Map.of(Malformed.MISSING_FIELD, 1, Malformed.BAD_SHAPE, 1), t.malformedByKind());
    }

    @Test
    void aCloseLineCompletesTheRecordAtOnce() throws Exception {
        String yaml = """
                kind: format
                layout: lines
                rules:
                  - match: '^begin (?<iteration>\\d+)'
                    action: open
                  - match: '^  (?<equation>\\S+) (?<residual>\\S+)'
                    action: values
                  - match: '^end'
                    action: close
                """;
        LineParser p = parser(yaml);
        ListSink s = new ListSink();
        p.accept("begin 3", 1, s);
        p.accept("  cont 1e-2", 2, s);
        p.accept("end", 3, s);
        assertEquals(1, s.records.size());
        assertEquals(3, s.records.get(0).line());
    }

    @Test
    void aSteadySweepBlockWithoutStepLinesGivesNoInnerIteration() throws Exception {
        ListSink s = ListSink.run(parser(SWEEP_BLOCK), ".. sweep 7 (pass 7)", "   cont 1e-2", ".. sweep 8 (pass 8)",
                "   cont 9e-3");
        assertEquals(2, s.records.size());
        assertEquals(false, s.records.get(0).hasInner());
        assertEquals(false, s.records.get(1).hasStep());
    }
}
