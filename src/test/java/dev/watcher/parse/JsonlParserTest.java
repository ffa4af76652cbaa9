package dev.watcher.parse;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertSame;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.model.IterationRecord;
import dev.watcher.model.LineParser;
import dev.watcher.model.Malformed;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

/** The canonical JSON Lines input; the contract example is the one in CONTRACT.md. */
class JsonlParserTest {

    private static LineParser parser() {
        return Formats.builtIn("jsonl").newParser();
    }

    @Test
    void readsTheContractExample() {
        // CONTRACT.md, "Built-in input", the record shown there (on one line).
        ListSink s = ListSink.run(parser(), "{\"iter\": 1234, \"step\": 12, \"time\": 0.06, \"inner\": 3, "
                + "\"residuals\": {\"continuity\": 3.2e-02, \"x-momentum\": 1.1e-01}, "
                + "\"monitors\": {\"drag-force\": 412.7}}");
        assertEquals(1, s.records.size());
        IterationRecord r = s.records.get(0);
        assertEquals(1234, r.iter());
        assertEquals(12, r.step());
        assertEquals(0.06, r.time());
        assertEquals(3, r.inner());
        assertEquals(List.of("continuity", "x-momentum"), r.residuals().names());
        assertEquals(3.2e-02, r.residuals().get("continuity", -1));
        assertEquals(1.1e-01, r.residuals().get("x-momentum", -1));
        assertEquals(Map.of("drag-force", 412.7), r.monitors().toMap());
        assertEquals(1, r.line());
    }

    @Test
    void readsASteadyRecordWithoutStepTimeOrInner() {
        IterationRecord r = ListSink.run(parser(),
                "{\"iter\": 1200, \"residuals\": {\"cont\": 3.2e-02, \"mom-x\": 1.1e-01}, \"monitors\": "
                        + "{\"vmid\": 0.2134}}").records.get(0);
        assertFalse(r.hasStep());
        assertFalse(r.hasTime());
        assertFalse(r.hasInner());
        assertEquals(0.2134, r.monitors().get("vmid", -1));
    }

    @Test
    void readsTheNonFiniteStringsAndIgnoresUnknownKeys() {
        IterationRecord r = ListSink.run(parser(), "{\"iter\": 5, \"solver\": {\"name\": \"x\", \"v\": [1,2]}, "
                + "\"residuals\": {\"a\": \"NaN\", \"b\": \"Infinity\", \"c\": \"-Infinity\", \"d\": 0}}")
                .records.get(0);
        double[] v = r.residuals().values();
        assertTrue(Numbers.isNaNValue(v[0]));
        assertEquals(Double.POSITIVE_INFINITY, v[1]);
        assertEquals(Double.NEGATIVE_INFINITY, v[2]);
        assertEquals(0.0, v[3]);
    }

    @Test
    void sharesTheNamesListBetweenRecordsWithTheSameEquations() {
        ListSink s = ListSink.run(parser(), "{\"iter\":1,\"residuals\":{\"a\":1,\"b\":2}}",
                "{\"iter\":2,\"residuals\":{\"a\":1,\"b\":2}}");
        assertSame(s.records.get(0).residuals().names(), s.records.get(1).residuals().names());
    }

    @Test
    void countsMalformedLinesByKindAndKeepsGoing() {
        ListSink s = ListSink.run(parser(),
                "{\"iter\": 1, \"residuals\": {\"a\": 1}}",
                "{\"iter\": 2, \"residuals\": {\"a\": 1",          // cut short
                "\u0000\u0001garbage",                              // binary
                "{\"residuals\": {\"a\": 1}}",                      // no iter
                "{\"iter\": 4, \"residuals\": {\"a\": \"1.2.3e-4\"}}",
                "{\"iter\": \"four\", \"residuals\": {\"a\": 1}}",
                "[1, 2]",
                "{\"iter\": 5, \"residuals\": {\"a\": 0.5}}\r");
        assertEquals(List.of(1L, 5L), s.records.stream().map(IterationRecord::iter).toList());
        assertEquals(Map.of(Malformed.BAD_SHAPE, 3, Malformed.MISSING_FIELD, 1, Malformed.BAD_NUMBER, 2),
                s.malformedByKind());
        assertEquals(List.of(2L, 3L, 4L, 5L, 6L, 7L), s.malformed.stream().map(ListSink.Bad::line).toList());
    }

    @Test
    void startsANewSegmentWhenTheIterationGoesBack() {
        ListSink s = ListSink.run(parser(), "{\"iter\":10,\"residuals\":{\"a\":1}}",
                "{\"iter\":11,\"residuals\":{\"a\":1}}", "[2] {\"iter\":3,\"residuals\":{\"a\":1}}");
        assertEquals(List.of(0, 0, 1), s.records.stream().map(IterationRecord::segment).toList());
        assertEquals(List.of("record 10", "record 11", "segment 1", "record 3"), s.order);
    }

    @Test
    void keepsTheChosenValueWhenAnEquationIsRepeated() throws Exception {
        String line = "{\"iter\":1,\"residuals\":{\"temp\":2e-3,\"temp\":7e-3,\"temp\":1e-3}}";
        for (String[] c : new String[][] {{"first", "2e-3"}, {"last", "1e-3"}, {"max", "7e-3"}}) {
            LineParser p = Formats.load("j.yaml", "kind: format\nlayout: jsonl\nrepeated: " + c[0] + "\n")
                    .newParser();
            IterationRecord r = ListSink.run(p, line).records.get(0);
            assertEquals(List.of("temp"), r.residuals().names());
            assertEquals(Double.parseDouble(c[1]), r.residuals().value(0), c[0]);
        }
    }
}
