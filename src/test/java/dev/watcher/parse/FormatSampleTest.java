package dev.watcher.parse;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;
import org.junit.jupiter.api.Test;

/** What `watcher check FORMAT --sample LOG` prints. */
class FormatSampleTest {

    @Test
    void describesTheFirstRecordsSegmentsAndMalformedLinesWithTheirReasons() throws Exception {
        FormatSpec spec = Formats.load("pass-line.yaml", LineFormatTest.PASS_LINE);
        String text = FormatSample.describe(spec, List.of(
                "~ pass 1 | cont 1.0e-01 | probe vmid=0.2 m/s",
                "~ pass 2 | cont 1.2.3e-4",
                "** restart from snapshot pass 1",
                "~ pass 2 | cont 5.0e-02",
                "~ pass 3 | cont 2.5e-02"), 2);
        String[] lines = text.split("\n");
        assertEquals("format pass-line (layout lines)", lines[0]);
        assertEquals("family momentum: mom-x, mom-y", lines[1]);
        assertEquals("line 1: iter 1 | residuals cont=0.1000 | monitors vmid=0.2000", lines[2]);
        assertEquals("line 2: malformed, bad-number: \"residual\": \"1.2.3e-4\" is not a number", lines[3]);
        assertEquals("line 3: segment 1 starts (restart declared: ** restart from snapshot pass 1)", lines[4]);
        assertEquals("line 4: iter 2 segment 1 | residuals cont=0.05000 | monitors (none)", lines[5]);
        assertEquals("5 lines: 3 records (first 2 shown), 1 new segment, 1 malformed (bad-number 1)", lines[6]);
    }

    @Test
    void showsStepTimeAndInnerOfUnsteadyRecords() {
        String text = FormatSample.describe(Formats.builtIn("jsonl"), List.of(
                "{\"iter\": 1234, \"step\": 12, \"time\": 0.06, \"inner\": 3, \"residuals\": {\"cont\": \"NaN\"}}"), 5);
        assertTrue(text.contains("line 1: iter 1234 step 12 time 0.06000 inner 3 | residuals cont=NaN"), text);
    }
}
