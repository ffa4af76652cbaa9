package dev.watcher.tail;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.nio.charset.StandardCharsets;
import java.util.List;
import org.junit.jupiter.api.Test;

class LineSplitterTest {

    private static final int MAX = 64;

    private static byte[] bytes(String s) {
        return s.getBytes(StandardCharsets.UTF_8);
    }

    private static byte[] raw(int... b) {
        byte[] r = new byte[b.length];
        for (int i = 0; i < b.length; i++) {
            r[i] = (byte) b[i];
        }
        return r;
    }

    private static byte[] concat(byte[]... parts) {
        ByteArrayOutputStream o = new ByteArrayOutputStream();
        for (byte[] p : parts) {
            o.writeBytes(p);
        }
        return o.toByteArray();
    }

    private static LineSplitter splitter() {
        LineSplitter s = new LineSplitter(MAX, "test.log");
        s.reset(0, 0, false);
        return s;
    }

    private static void feed(LineSplitter s, byte[] b, RecordingHandler h) {
        s.feed(b, 0, b.length, h);
    }

    @Test
    void holdsPartialLineUntilNewline() {
        // the line decoder case: "first\r\nsecond\nthird" gives first, second and nothing for the unterminated third
        LineSplitter s = splitter();
        RecordingHandler h = new RecordingHandler();
        feed(s, bytes("first\r\nsecond\nthird"), h);
        assertEquals(List.of("first", "second"), h.lines);
        assertEquals(List.of(1L, 2L), h.numbers);
        assertEquals(14, s.committed(), "offset just after second\\n");
        assertTrue(s.holdsFragment());
        feed(s, bytes("\n"), h);
        assertEquals(List.of("first", "second", "third"), h.lines);
        assertEquals(20, s.committed());
    }

    @Test
    void everySplitPointOfTheInputGivesTheSameLines() {
        // CRLF split between reads, a 3-byte character split between reads, a bare CR progress line, empty lines
        byte[] input = bytes("a\r\nb\rc\n\n\u20ac uro \u00e9t\u00e9\r\n  12%\r  50%\rdone\n");
        List<String> expected = List.of("a", "b", "c", "", "\u20ac uro \u00e9t\u00e9", "  12%", "  50%", "done");
        for (int cut = 0; cut <= input.length; cut++) {
            for (int cut2 = cut; cut2 <= input.length; cut2 += 3) {
                LineSplitter s = splitter();
                RecordingHandler h = new RecordingHandler();
                s.feed(input, 0, cut, h);
                s.feed(input, cut, cut2, h);
                s.feed(input, cut2, input.length, h);
                assertEquals(expected, h.lines, "split at " + cut + "/" + cut2);
                assertEquals(List.of(), h.notices, "split at " + cut + "/" + cut2);
                assertEquals(input.length, s.committed());
            }
        }
    }

    @Test
    void randomTextInRandomReadsGivesTheLinesOfTheJdkReader() throws java.io.IOException {
        // reference: java.io.BufferedReader.readLine, whose line ends are ours (\n, \r\n, a bare \r); long
        // printable runs cross the eight-byte words the splitter skips at once, at every alignment
        java.util.Random rnd = new java.util.Random(20261202);
        String[] pieces = {"pass 1200 | cont 3.2e-02", "x", "ab", "\t", "\u00e9t\u00e9", "\u20ac", "\r", "\n", "\r\n",
            " ", "~", "0123456789abcdef"};
        for (int round = 0; round < 300; round++) {
            StringBuilder text = new StringBuilder();
            int n = rnd.nextInt(60);
            for (int k = 0; k < n; k++) {
                text.append(pieces[rnd.nextInt(pieces.length)]);
            }
            List<String> expected = new java.io.BufferedReader(new java.io.StringReader(text.toString())).lines().toList();
            byte[] b = bytes(text.toString());
            LineSplitter s = new LineSplitter(1 << 20, "test.log");
            s.reset(0, 0, false);
            RecordingHandler h = new RecordingHandler();
            int at = 0;
            while (at < b.length) {
                int to = Math.min(b.length, at + 1 + rnd.nextInt(40));
                s.feed(b, at, to, h);
                at = to;
            }
            s.finish(h);
            assertEquals(expected, h.lines, "text: " + text.toString().replace("\r", "\\r").replace("\n", "\\n"));
            assertEquals(List.of(), h.notices);
        }
    }

    @Test
    void decodesValidMultiByteUtf8LikeTheJdkDecoder() {
        // RFC 3629 section 3: U+00E9 is C3 A9, U+20AC is E2 82 AC, U+1F600 is F0 9F 98 80
        byte[] line = raw(0x71, 0x3d, 0xc3, 0xa9, 0x20, 0xe2, 0x82, 0xac, 0x20, 0xf0, 0x9f, 0x98, 0x80);
        RecordingHandler h = new RecordingHandler();
        LineSplitter s = splitter();
        feed(s, concat(line, bytes("\n")), h);
        assertEquals(List.of(new String(line, StandardCharsets.UTF_8)), h.lines);
        assertEquals("q=\u00e9 \u20ac \ud83d\ude00", h.lines.get(0));
        assertEquals(List.of(), h.notices);
    }

    @Test
    void truncatedUtf8IsReplacedAndCounted() {
        // E2 82 is the start of a three-byte sequence cut short (RFC 3629): one U+FFFD, as the JDK decoder gives
        byte[] bad = raw(0x61, 0xe2, 0x82);
        RecordingHandler h = new RecordingHandler();
        LineSplitter s = splitter();
        feed(s, concat(bad, bytes("\nnext\n")), h);
        assertEquals(List.of(new String(bad, StandardCharsets.UTF_8), "next"), h.lines);
        assertEquals("a\ufffd", h.lines.get(0));
        assertEquals(List.of(TailNotice.Kind.BAD_UTF8), h.kinds());
        assertEquals(1, h.notices.get(0).lineNo());
        assertEquals(dev.watcher.model.Malformed.BAD_UTF8, h.notices.get(0).malformed());
    }

    @Test
    void invalidUtf8BytesAreReplacedLikeTheJdkDecoder() {
        // C0 AF is an overlong form and FF never appears in UTF-8 (RFC 3629 sections 3 and 10)
        byte[] bad = raw(0x78, 0xc0, 0xaf, 0x79, 0xff, 0x7a);
        RecordingHandler h = new RecordingHandler();
        LineSplitter s = splitter();
        feed(s, concat(bad, bytes("\n")), h);
        assertEquals(List.of(new String(bad, StandardCharsets.UTF_8)), h.lines);
        assertEquals(1, h.count(TailNotice.Kind.BAD_UTF8));
    }

    @Test
    void binaryLineIsSkippedCountedAndStillNumbered() {
        RecordingHandler h = new RecordingHandler();
        LineSplitter s = splitter();
        feed(s, concat(bytes("ok 1\n"), raw(0, 0, 1, 0x41, 0x42, 0x7, 0x0a), bytes("ok\t2\u001b[0m\n")), h);
        assertEquals(List.of("ok 1", "ok\t2\u001b[0m"), h.lines);
        assertEquals(List.of(1L, 3L), h.numbers);
        assertEquals(List.of(TailNotice.Kind.BINARY), h.kinds());
        assertEquals(2, h.notices.get(0).lineNo());
        assertEquals(3, s.lineNo());
    }

    @Test
    void longLineInOneReadIsCutToTheCapAndCounted() {
        RecordingHandler h = new RecordingHandler();
        LineSplitter s = splitter();
        String longLine = "x".repeat(MAX * 3);
        feed(s, bytes(longLine + "\nshort\n"), h);
        assertEquals(List.of("x".repeat(MAX), "short"), h.lines);
        assertEquals(List.of(TailNotice.Kind.LINE_CUT), h.kinds());
        assertEquals(1, h.notices.get(0).lineNo());
    }

    @Test
    void longLineAcrossReadsIsCountedWhenTheCapIsPassedAndDeliveredCutWhenEnded() {
        RecordingHandler h = new RecordingHandler();
        LineSplitter s = splitter();
        feed(s, bytes("head\n"), h);
        for (int i = 0; i < 100; i++) {
            feed(s, bytes("y".repeat(50)), h);
        }
        assertEquals(List.of("head"), h.lines);
        assertEquals(List.of(TailNotice.Kind.LINE_CUT), h.kinds(), "counted once, before the line ends");
        assertEquals(2, h.notices.get(0).lineNo());
        assertEquals(5, s.committed());
        feed(s, bytes("\nz\n"), h);
        assertEquals(List.of("head", "y".repeat(MAX), "z"), h.lines);
        assertEquals(1, h.count(TailNotice.Kind.LINE_CUT));
    }

    @Test
    void cutThroughAMultiByteCharacterDropsItsPartInsteadOfCountingBadUtf8() {
        RecordingHandler h = new RecordingHandler();
        LineSplitter s = splitter();
        // 63 ASCII bytes then a 3-byte character straddling the 64-byte cap
        feed(s, bytes("a".repeat(MAX - 1) + "\u20ac\u20ac\n"), h);
        assertEquals(List.of("a".repeat(MAX - 1)), h.lines);
        assertEquals(List.of(TailNotice.Kind.LINE_CUT), h.kinds());
    }

    @Test
    void finishDeliversTheUnterminatedLastLine() {
        RecordingHandler h = new RecordingHandler();
        LineSplitter s = splitter();
        feed(s, bytes("one\ntwo"), h);
        assertEquals(1, s.finish(h));
        assertEquals(List.of("one", "two"), h.lines);
        assertEquals(7, s.committed());
        assertEquals(0, s.finish(h));
    }

    @Test
    void resumeAfterACarriageReturnDoesNotMakeAnEmptyLine() {
        RecordingHandler h = new RecordingHandler();
        LineSplitter s = new LineSplitter(MAX, "t");
        s.reset(4, 1, true);
        feed(s, bytes("\nnext\n"), h);
        assertEquals(List.of("next"), h.lines);
        assertEquals(List.of(2L), h.numbers);
        assertEquals(10, s.committed());
    }

    @Test
    void asciiViewBehavesAsACharSequence() {
        RecordingHandler h = new RecordingHandler();
        LineSplitter s = splitter();
        StringBuilder seen = new StringBuilder();
        LineHandler probe = (line, no) -> {
            seen.append(line.length()).append(':').append(line.charAt(0)).append(line.subSequence(1, 3))
                    .append(':').append(line);
        };
        byte[] b = bytes("abcdef\n");
        s.feed(b, 0, b.length, probe);
        assertEquals("6:abc:abcdef", seen.toString());
        assertTrue(h.lines.isEmpty());
    }

    @Test
    void asciiLinesExposeTheirBytesAndNonAsciiLinesArriveDecoded() {
        LineSplitter s = splitter();
        List<String> seen = new java.util.ArrayList<>();
        LineHandler probe = (line, no) -> {
            if (line instanceof dev.watcher.model.AsciiText a) {
                seen.add("bytes:" + new String(a.array(), a.offset(), a.length(), StandardCharsets.US_ASCII));
            } else {
                seen.add("chars:" + line);
            }
        };
        byte[] b = bytes("xx plain\nd\u00e9j\u00e0\n");
        s.feed(b, 3, b.length, probe);
        assertEquals(List.of("bytes:plain", "chars:d\u00e9j\u00e0"), seen);
    }
}
