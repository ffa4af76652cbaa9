package dev.watcher.live;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import java.util.List;
import org.junit.jupiter.api.Test;

/**
 * What the event stream replays to a connecting client. Positions are {@code RUN:SEQ} ({@code seq} per run,
 * increasing by one, as the timeline contract says); the header is the standard {@code Last-Event-ID} of the
 * HTML Living Standard's "Server-sent events" section.
 */
class StreamBacklogTest {

    private static StreamBacklog.Entry entry(String run, long seq) {
        return new StreamBacklog.Entry(run, seq, run + "#" + seq);
    }

    /** a1 b1 a2 a3 b2 a4, in the order written. */
    private static StreamBacklog interleaved(int capacity) {
        StreamBacklog b = new StreamBacklog(capacity);
        for (StreamBacklog.Entry e : List.of(entry("a", 1), entry("b", 1), entry("a", 2), entry("a", 3),
                entry("b", 2), entry("a", 4))) {
            b.add(e);
        }
        return b;
    }

    @Test
    void aClientNamingNoPositionGetsNothingReplayed() {
        assertEquals(List.of(), interleaved(10).replay(null, null));
        assertEquals(List.of(), interleaved(10).replay(null, ""));
        assertEquals(List.of(), interleaved(10).replay("not a position", "nor,this"));
    }

    @Test
    void afterReplaysPerRunWhatComesAfterEachRunsSeqAndWholeRunsItDoesNotName() {
        assertEquals(List.of("a#3", "b#2", "a#4"), interleaved(10).replay(null, "a:2,b:1"));
        assertEquals(List.of("b#1", "a#3", "b#2", "a#4"), interleaved(10).replay(null, "a:2"),
                "run b is not named: all of it");
        assertEquals(List.of(), interleaved(10).replay(null, "a:4,b:2"));
    }

    @Test
    void aHeldLastEventIdReplaysEverythingAfterItWhateverTheRun() {
        assertEquals(List.of("a#3", "b#2", "a#4"), interleaved(10).replay("a:2", null));
        // the header wins over a stale after of the same URL
        assertEquals(List.of("b#2", "a#4"), interleaved(10).replay("a:3", "a:0,b:0"));
        assertEquals(List.of(), interleaved(10).replay("a:4", "a:0"));
    }

    @Test
    void aLastEventIdNoLongerHeldCountsAsOneMorePositionOfItsRun() {
        // capacity 3: a3 b2 a4 are held; a1 is gone
        StreamBacklog b = interleaved(3);
        assertEquals(3, b.size());
        assertEquals(List.of("a#3", "a#4"), b.replay("a:1", "b:2"));
        assertEquals(List.of("a#3", "b#2", "a#4"), b.replay("a:1", null), "b unknown: all of it");
    }

    @Test
    void runNamesAreUrlEncodedInTheIdSoAColonOrCommaInANameDoesNotSplitIt() {
        String run = "fan: loop, 2%";
        assertEquals("fan%3A+loop%2C+2%25:7", StreamBacklog.id(run, 7));
        StreamBacklog b = new StreamBacklog(5);
        b.add(entry(run, 6));
        b.add(entry(run, 7));
        b.add(entry(run, 8));
        assertEquals(List.of(run + "#8"), b.replay(StreamBacklog.id(run, 7), null));
        // the page encodes with encodeURIComponent: a space as %20
        assertEquals(List.of(run + "#8"), b.replay(null, "fan%3A%20loop%2C%202%25:7"));
        assertEquals(List.of(), b.replay("fan%3A+loop%2C+2%ZZ:7", null), "a broken escape is no position");
    }

    @Test
    void capacityMustBePositive() {
        assertThrows(IllegalArgumentException.class, () -> new StreamBacklog(0));
    }
}
