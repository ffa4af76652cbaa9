package dev.watcher.report;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.api.Test;

/**
 * Spans of time as the report shows them. The units are those the SI accepts for use with it (SI Brochure,
 * 9th edition, table 8: 1 min = 60 s, 1 h = 3600 s, 1 d = 86 400 s); the two-unit form with the smaller unit
 * truncated is the report's own choice.
 */
class NumbersTest {

    @Test
    void spansOfTimeUseTwoUnitsAtMost() {
        assertEquals("0 s", Numbers.duration(0));
        assertEquals("59 s", Numbers.duration(59));
        assertEquals("1 min 00 s", Numbers.duration(60));
        assertEquals("3 min 20 s", Numbers.duration(200));
        assertEquals("59 min 59 s", Numbers.duration(3599));
        assertEquals("1 h 00 min", Numbers.duration(3600));
        assertEquals("2 h 05 min", Numbers.duration(2 * 3600 + 5 * 60 + 59));
        assertEquals("1 d 00 h", Numbers.duration(86_400));
        assertEquals("3 d 04 h", Numbers.duration(3 * 86_400 + 4 * 3600 + 3599));
        assertEquals("0 s", Numbers.duration(-5), "a negative span is shown as none");
    }
}
