package dev.watcher.tail;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.model.TailPosition;
import java.io.IOException;
import java.io.OutputStream;
import java.nio.channels.FileChannel;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.nio.file.StandardOpenOption;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicBoolean;
import java.util.function.BooleanSupplier;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The follower on real files that another thread or a child process writes while it polls. */
class FileFollowerIT {

    private static final TailOptions FAST = TailOptions.DEFAULTS.withPoll(Duration.ofMillis(100),
            Duration.ofMillis(800));

    @TempDir
    Path dir;

    private static void append(Path p, String s) throws IOException {
        append(p, s.getBytes(StandardCharsets.UTF_8));
    }

    private static void append(Path p, byte[] b) throws IOException {
        Files.write(p, b, StandardOpenOption.CREATE, StandardOpenOption.APPEND);
    }

    private static void pollUntil(FileFollower f, RecordingHandler h, BooleanSupplier done) {
        await().atMost(30, TimeUnit.SECONDS).pollInterval(Duration.ofMillis(10)).until(() -> {
            f.poll(h);
            return done.getAsBoolean();
        });
    }

    private static byte[] raw(int... b) {
        byte[] r = new byte[b.length];
        for (int i = 0; i < b.length; i++) {
            r[i] = (byte) b[i];
        }
        return r;
    }

    @Test
    void deliversEveryLineInOrderWhileAChildProcessAppendsHalfLinesWithPauses() throws Exception {
        Path log = dir.resolve("run.log");
        int n = 120;
        Process writer = new ProcessBuilder("bash", "-c",
                "for i in $(seq 1 " + n + "); do printf 'pass %d cont' $i >> \"$1\"; sleep 0.003; "
                        + "printf ' 1.0e-0%d\\n' $((i % 9)) >> \"$1\"; done", "_", log.toString())
                .redirectErrorStream(true).start();
        RecordingHandler h = new RecordingHandler();
        try (FileFollower f = new FileFollower(log, null, FAST)) {
            pollUntil(f, h, () -> h.lines.size() >= n);
            assertTrue(writer.waitFor(30, TimeUnit.SECONDS));
            f.poll(h);
            List<String> expected = new ArrayList<>();
            for (int i = 1; i <= n; i++) {
                expected.add("pass " + i + " cont 1.0e-0" + (i % 9));
            }
            assertEquals(expected, h.lines, "no half line delivered, none lost, none repeated");
            assertEquals(n, f.position().lineNo());
            assertEquals(Files.size(log), f.position().offset());
        }
    }

    @Test
    void holdsPartialLineUntilNewline() throws IOException {
        Path log = dir.resolve("p.log");
        append(log, "first\r\nsecond\nthird");
        RecordingHandler h = new RecordingHandler();
        try (FileFollower f = new FileFollower(log, null, FAST)) {
            assertEquals(2, f.poll(h));
            assertEquals(List.of("first", "second"), h.lines);
            assertEquals(0, f.poll(h));
            assertEquals(14, f.position().offset());
            append(log, "\n");
            assertEquals(1, f.poll(h));
            assertEquals(List.of("first", "second", "third"), h.lines);
            assertEquals(List.of(), h.notices);
        }
    }

    @Test
    void readsAgainFromTheStartAfterTruncation() throws IOException {
        Path log = dir.resolve("t.log");
        append(log, "l1\nl2\nl3\n");
        RecordingHandler h = new RecordingHandler();
        try (FileFollower f = new FileFollower(log, null, FAST)) {
            f.poll(h);
            try (FileChannel c = FileChannel.open(log, StandardOpenOption.WRITE)) {
                c.truncate(0);
            }
            append(log, "n1\n");
            f.poll(h);
            assertEquals(List.of("l1", "l2", "l3", "!TRUNCATED", "n1"), h.events);
            assertEquals(1, f.position().lineNo());
            assertEquals(3, f.position().offset());
        }
    }

    @Test
    void seesTruncationAndRegrowthBetweenTwoPollsByTheFirstBytes() throws IOException {
        Path log = dir.resolve("r.log");
        append(log, "aaaa\n".repeat(3));
        RecordingHandler h = new RecordingHandler();
        try (FileFollower f = new FileFollower(log, null, FAST)) {
            f.poll(h);
            Files.write(log, "bbbbbbbb\n".repeat(5).getBytes(StandardCharsets.US_ASCII),
                    StandardOpenOption.TRUNCATE_EXISTING, StandardOpenOption.WRITE);
            f.poll(h);
            assertEquals(List.of("aaaa", "aaaa", "aaaa", "!TRUNCATED", "bbbbbbbb", "bbbbbbbb", "bbbbbbbb",
                    "bbbbbbbb", "bbbbbbbb"), h.events);
        }
    }

    @Test
    void finishesTheOldFileThenFollowsTheOneRenamedOverIt() throws IOException {
        Path log = dir.resolve("rep.log");
        append(log, "old 1\n");
        RecordingHandler h = new RecordingHandler();
        try (FileFollower f = new FileFollower(log, null, FAST)) {
            f.poll(h);
            String oldKey = f.position().fileKey();
            append(log, "old 2\nold tail");
            Path tmp = dir.resolve("rep.log.tmp");
            append(tmp, "new 1\nnew 2\n");
            Files.move(tmp, log, StandardCopyOption.ATOMIC_MOVE, StandardCopyOption.REPLACE_EXISTING);
            f.poll(h);
            assertEquals(List.of("old 1", "old 2", "old tail", "!REPLACED", "new 1", "new 2"), h.events);
            assertEquals(List.of(1L, 2L, 3L, 1L, 2L), h.numbers);
            assertNotNull(oldKey, "Linux gives a device and inode");
            assertFalse(oldKey.equals(f.position().fileKey()));
        }
    }

    @Test
    void waitsForAFileCreatedLateAndBacksOffMeanwhile() throws IOException {
        Path log = dir.resolve("late.log");
        RecordingHandler h = new RecordingHandler();
        try (FileFollower f = new FileFollower(log, null, FAST)) {
            List<Duration> delays = new ArrayList<>();
            for (int i = 0; i < 5; i++) {
                assertEquals(0, f.poll(h));
                assertTrue(f.idle());
                delays.add(f.nextDelay());
            }
            assertEquals(List.of(Duration.ofMillis(200), Duration.ofMillis(400), Duration.ofMillis(800),
                    Duration.ofMillis(800), Duration.ofMillis(800)), delays);
            assertEquals(List.of(), h.events);
            append(log, "hello\n");
            assertEquals(1, f.poll(h));
            assertEquals(List.of("!APPEARED", "hello"), h.events);
            assertFalse(f.idle());
            assertEquals(Duration.ofMillis(100), f.nextDelay());
        }
    }

    @Test
    void readsWhatRemainsOfADeletedFileThenWaitsForItToComeBack() throws IOException {
        Path log = dir.resolve("del.log");
        append(log, "a\nb\n");
        RecordingHandler h = new RecordingHandler();
        try (FileFollower f = new FileFollower(log, null, FAST)) {
            f.poll(h);
            append(log, "c\nfrag");
            Files.delete(log);
            f.poll(h);
            assertEquals(List.of("a", "b", "c", "frag", "!GONE"), h.events);
            assertEquals(dev.watcher.model.Malformed.FILE_GONE, h.notices.get(0).malformed());
            assertEquals(0, f.poll(h));
            append(log, "again\n");
            f.poll(h);
            assertEquals(List.of("a", "b", "c", "frag", "!GONE", "!APPEARED", "again"), h.events);
            assertEquals(List.of(1L, 2L, 3L, 4L, 1L), h.numbers);
        }
    }

    @Test
    void resumesFromASavedPositionWithNoLostAndNoRepeatedLine() throws Exception {
        Path log = dir.resolve("resume.log");
        int n = 400;
        AtomicBoolean failed = new AtomicBoolean();
        Thread writer = new Thread(() -> {
            try (OutputStream out = Files.newOutputStream(log, StandardOpenOption.CREATE,
                    StandardOpenOption.APPEND)) {
                for (int i = 1; i <= n; i++) {
                    // split each line into two writes so a restart can fall inside a line
                    out.write(("iter " + i).getBytes(StandardCharsets.US_ASCII));
                    out.flush();
                    out.write(" res 3.2e-02\n".getBytes(StandardCharsets.US_ASCII));
                    out.flush();
                    if (i % 10 == 0) {
                        Thread.sleep(5);
                    }
                }
            } catch (IOException | InterruptedException e) {
                failed.set(true);
            }
        });
        writer.start();
        RecordingHandler first = new RecordingHandler();
        TailPosition saved;
        try (FileFollower a = new FileFollower(log, null, FAST)) {
            pollUntil(a, first, () -> first.lines.size() >= 50);
            saved = a.position();
        }
        RecordingHandler second = new RecordingHandler();
        try (FileFollower b = new FileFollower(log, saved, FAST)) {
            assertEquals(saved, b.position(), "before the first poll it stands where it was told");
            pollUntil(b, second, () -> first.lines.size() + second.lines.size() >= n);
            writer.join(30_000);
            b.poll(second);
        }
        assertFalse(failed.get());
        List<String> all = new ArrayList<>(first.lines);
        all.addAll(second.lines);
        List<String> expected = new ArrayList<>();
        for (int i = 1; i <= n; i++) {
            expected.add("iter " + i + " res 3.2e-02");
        }
        assertEquals(expected, all);
        assertEquals(first.lines.size() + 1, second.numbers.get(0));
        assertEquals(List.of(), second.notices);
    }

    @Test
    void resumeBetweenACarriageReturnAndItsLineFeedMakesNoEmptyLine() throws IOException {
        Path log = dir.resolve("cr.log");
        append(log, "one\r");
        TailPosition saved;
        try (FileFollower a = new FileFollower(log, null, FAST)) {
            RecordingHandler h = new RecordingHandler();
            a.poll(h);
            assertEquals(List.of("one"), h.lines);
            saved = a.position();
        }
        append(log, "\ntwo\n");
        RecordingHandler h = new RecordingHandler();
        try (FileFollower b = new FileFollower(log, saved, FAST)) {
            b.poll(h);
        }
        assertEquals(List.of("two"), h.lines);
        assertEquals(List.of(2L), h.numbers);
    }

    @Test
    void startsOverWhenTheSavedPositionBelongsToAnotherFile() throws IOException {
        Path log = dir.resolve("other.log");
        append(log, "run one 1\nrun one 2\n");
        TailPosition saved;
        try (FileFollower a = new FileFollower(log, null, FAST)) {
            a.poll(new RecordingHandler());
            saved = a.position();
        }
        Files.delete(log);
        append(log, "run two 1\nrun two 2\nrun two 3\n");
        RecordingHandler h = new RecordingHandler();
        try (FileFollower b = new FileFollower(log, saved, FAST)) {
            b.poll(h);
        }
        assertEquals(List.of("!REPLACED", "run two 1", "run two 2", "run two 3"), h.events);
    }

    @Test
    void cutsATenMegabyteLineWrittenWithoutNewlineAndCarriesOn() throws Exception {
        Path log = dir.resolve("long.log");
        append(log, "before\n");
        int cap = 64 * 1024;
        RecordingHandler h = new RecordingHandler();
        try (FileFollower f = new FileFollower(log, null, TailOptions.DEFAULTS.withMaxLineBytes(cap))) {
            f.poll(h);
            byte[] chunk = new byte[256 * 1024];
            Arrays.fill(chunk, (byte) 'x');
            Thread writer = new Thread(() -> {
                try {
                    for (int i = 0; i < 40; i++) {
                        append(log, chunk);
                    }
                } catch (IOException e) {
                    throw new IllegalStateException(e);
                }
            });
            writer.start();
            pollUntil(f, h, () -> !writer.isAlive());
            f.poll(h);
            assertEquals(List.of("before"), h.lines, "the unterminated line is not delivered");
            assertEquals(List.of(TailNotice.Kind.LINE_CUT), h.kinds(), "counted once while still growing");
            assertEquals(2, h.notices.get(0).lineNo());
            assertEquals(7, f.position().offset(), "the position stays before the incomplete line");
            append(log, "\nafter\n");
            f.poll(h);
            assertEquals(3, h.lines.size());
            assertEquals("x".repeat(cap), h.lines.get(1));
            assertEquals("after", h.lines.get(2));
            assertEquals(List.of(1L, 2L, 3L), h.numbers);
            assertEquals(1, h.count(TailNotice.Kind.LINE_CUT));
        }
    }

    @Test
    void aFortyMegabyteLineFitsIntoASixteenMegabyteHeap() throws Exception {
        Path log = dir.resolve("huge.log");
        append(log, "before\n");
        byte[] chunk = new byte[1 << 20];
        Arrays.fill(chunk, (byte) '7');
        for (int i = 0; i < 40; i++) {
            append(log, chunk);
        }
        String java = Path.of(System.getProperty("java.home"), "bin", "java").toString();
        Process p = new ProcessBuilder(java, "-Xmx16m", "-cp", System.getProperty("java.class.path"),
                LongLineProbe.class.getName(), log.toString()).redirectErrorStream(true).start();
        String out = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
        assertTrue(p.waitFor(60, TimeUnit.SECONDS));
        assertEquals(0, p.exitValue(), out);
        assertTrue(out.contains("follow lines=1 cut=1"), out);
        assertTrue(out.contains("read lines=2 cut=1 last=262144"), out);
    }

    @Test
    void skipsAndCountsBinaryGarbage() throws IOException {
        Path log = dir.resolve("bin.log");
        append(log, "ok 1\n");
        append(log, raw(0, 0, 0, 1, 2, 3, 0x7f, 0xff, 0xfe, 0x1f, 0, 0x41));
        append(log, "\nok 2\n");
        RecordingHandler h = new RecordingHandler();
        try (FileFollower f = new FileFollower(log, null, FAST)) {
            assertEquals(2, f.poll(h));
        }
        assertEquals(List.of("ok 1", "!BINARY", "ok 2"), h.events);
        assertEquals(List.of(1L, 3L), h.numbers);
        assertEquals(dev.watcher.model.Malformed.BINARY, h.notices.get(0).malformed());
    }

    @Test
    void joinsAMultiByteCharacterSplitAcrossTwoWrites() throws IOException {
        Path log = dir.resolve("utf.log");
        RecordingHandler h = new RecordingHandler();
        try (FileFollower f = new FileFollower(log, null, FAST)) {
            // U+20AC is E2 82 AC in UTF-8 (RFC 3629)
            append(log, raw(0x63, 0x6f, 0x73, 0x74, 0x20, 0xe2, 0x82));
            assertEquals(0, f.poll(h));
            append(log, raw(0xac, 0x20, 0x6f, 0x6b, 0x0a));
            assertEquals(1, f.poll(h));
        }
        assertEquals(List.of("cost \u20ac ok"), h.lines);
        assertEquals(List.of(), h.notices);
    }

    @Test
    void replacesAndCountsTruncatedUtf8() throws IOException {
        Path log = dir.resolve("bad.log");
        append(log, raw(0x61, 0xe2, 0x82, 0x0a, 0x62, 0x0a));
        RecordingHandler h = new RecordingHandler();
        try (FileFollower f = new FileFollower(log, null, FAST)) {
            f.poll(h);
        }
        assertEquals(List.of("a\ufffd", "b"), h.lines);
        assertEquals(List.of(TailNotice.Kind.BAD_UTF8), h.kinds());
        assertEquals(1, h.notices.get(0).lineNo());
    }

    @Test
    void endsLinesAtCrLfAndAtABareCarriageReturn() throws IOException {
        Path log = dir.resolve("crlf.log");
        append(log, "one\r\ntwo\r 50%\rthree\r");
        RecordingHandler h = new RecordingHandler();
        try (FileFollower f = new FileFollower(log, null, FAST)) {
            f.poll(h);
            assertEquals(List.of("one", "two", " 50%", "three"), h.lines);
            append(log, "\nfour\r\n");
            f.poll(h);
        }
        assertEquals(List.of("one", "two", " 50%", "three", "four"), h.lines);
    }

    @Test
    void anEmptyFileGivesNothingAndStaysAtTheStart() throws IOException {
        Path log = dir.resolve("empty.log");
        Files.createFile(log);
        RecordingHandler h = new RecordingHandler();
        try (FileFollower f = new FileFollower(log, null, FAST)) {
            assertEquals(0, f.poll(h));
            assertEquals(0, f.poll(h));
            assertTrue(f.idle());
            assertEquals(0, f.position().offset());
            assertEquals(0, f.position().lineNo());
            assertEquals("0:" + "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855",
                    f.position().fingerprint(), "SHA-256 of no bytes (FIPS 180-4 test vectors)");
        }
        assertEquals(List.of(), h.events);
    }

    @Test
    void fingerprintIsTheSha256OfTheFirstKibibyte() throws IOException {
        Path log = dir.resolve("fp.log");
        append(log, "abc");
        try (FileFollower f = new FileFollower(log, null, FAST)) {
            f.poll(new RecordingHandler());
            // SHA-256("abc") from the FIPS 180-2 example (Appendix B.1)
            assertEquals("3:ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad",
                    f.position().fingerprint());
            append(log, "x".repeat(3000) + "\n");
            f.poll(new RecordingHandler());
            assertTrue(f.position().fingerprint().startsWith("1024:"), f.position().fingerprint());
        }
    }

    @Test
    void catchesUpOnABigFileInBoundedStepsWithoutWaiting() throws IOException {
        Path log = dir.resolve("big.log");
        String line = "  123456 1.0000e-03 2.0000e-03 3.0000e-03\n";
        int n = 20 * 1024 * 1024 / line.length() + 1000;
        try (OutputStream out = Files.newOutputStream(log)) {
            byte[] b = line.getBytes(StandardCharsets.US_ASCII);
            for (int i = 0; i < n; i++) {
                out.write(b);
            }
        }
        LineHandler count = (l, no) -> {
        };
        try (FileFollower f = new FileFollower(log, null, FAST)) {
            int first = f.poll(count);
            assertTrue(first < n, "one poll reads a bounded amount");
            assertEquals(Duration.ZERO, f.nextDelay());
            int second = f.poll(count);
            assertEquals(n, first + second);
            assertEquals(Duration.ofMillis(100), f.nextDelay());
        }
    }
}
