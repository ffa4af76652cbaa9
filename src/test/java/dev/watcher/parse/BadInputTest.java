package dev.watcher.parse;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.model.IterationRecord;
import dev.watcher.model.LineParser;
import dev.watcher.model.Malformed;
import java.util.List;
import java.util.Map;
import java.util.function.Supplier;
import org.junit.jupiter.api.Test;

/**
 * Bad input reaches every parser without stopping it: an empty input, a huge line (the tailer cuts lines at
 * its cap and passes the kept part on), binary-looking text and replacement characters from bad UTF-8.
 * After each, the next good line is still read.
 */
class BadInputTest {

    private static final String HUGE = "x".repeat(1_000_000) + " 1.2.3e-4 | | ~ pass";

    private static Map<String, Supplier<LineParser>> parsers() throws Exception {
        FormatSpec pass = Formats.load("pass-line.yaml", LineFormatTest.PASS_LINE);
        FormatSpec sweep = Formats.load("sweep-block.yaml", LineFormatTest.SWEEP_BLOCK);
        return Map.of("jsonl", () -> Formats.builtIn("jsonl").newParser(),
                "table", () -> Formats.builtIn("table").newParser(),
                "pass-line", pass::newParser,
                "sweep-block", sweep::newParser);
    }

    private static final Map<String, List<String>> GOOD = Map.of(
            "jsonl", List.of("{\"iter\": 1, \"residuals\": {\"cont\": 0.5}}", "{\"iter\": 2, \"residuals\": {\"cont\": 0.25}}"),
            "table", List.of("# pass cont", "1 0.5", "2 0.25"),
            "pass-line", List.of("~ pass 1 | cont 0.5", "~ pass 2 | cont 0.25"),
            "sweep-block", List.of(".. sweep 1 (pass 1)", "   cont 0.5", ".. sweep 1 (pass 2)", "   cont 0.25"));

    @Test
    void anEmptyInputGivesNoRecordsAndNoComplaints() throws Exception {
        for (Map.Entry<String, Supplier<LineParser>> e : parsers().entrySet()) {
            ListSink s = ListSink.run(e.getValue().get());
            assertTrue(s.records.isEmpty() && s.malformed.isEmpty() && s.segments.isEmpty(), e.getKey());
        }
    }

    @Test
    void aHugeLineAndGarbageAreSkippedAndTheNextGoodLinesAreRead() throws Exception {
        for (Map.Entry<String, Supplier<LineParser>> e : parsers().entrySet()) {
            List<String> good = GOOD.get(e.getKey());
            String[] lines = new String[good.size() + 3];
            int half = good.size() / 2;
            int k = 0;
            for (int i = 0; i < half; i++) {
                lines[k++] = good.get(i);
            }
            lines[k++] = HUGE;
            lines[k++] = "\u0007\u0000\u001b[2K\uFFFD\uFFFD garbage \uFFFD";
            lines[k++] = "";
            for (int i = half; i < good.size(); i++) {
                lines[k++] = good.get(i);
            }
            ListSink s = ListSink.run(e.getValue().get(), lines);
            assertEquals(List.of(1L, 2L), s.records.stream().map(IterationRecord::iter).toList(), e.getKey());
            assertEquals(List.of(0.5, 0.25), s.records.stream().map(r -> r.residuals().get("cont", -1)).toList(),
                    e.getKey());
            assertTrue(s.segments.isEmpty(), e.getKey());
            for (ListSink.Bad b : s.malformed) {
                assertTrue(b.kind() == Malformed.BAD_SHAPE || b.kind() == Malformed.BAD_NUMBER, e.getKey() + b);
                assertTrue(b.detail().length() < 400, "details stay short: " + e.getKey());
            }
        }
    }

    @Test
    void aFormatFileWithAByteOrderMarkIsRead() throws Exception {
        FormatSpec spec = Formats.load("bom.yaml", "\uFEFFkind: format\nlayout: jsonl\n");
        assertEquals("bom", spec.name());
        assertEquals(1, ListSink.run(spec.newParser(), "{\"iter\": 1, \"residuals\": {\"a\": 1}}").records.size());
    }
}
